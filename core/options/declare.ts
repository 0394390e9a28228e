import { z } from 'zod';
import { XylemapError } from '../util/errors.js';

/**
 * Options are declared once — key, type, unit, default, valid range, one-line help — and that one
 * declaration drives validation (through zod), `xylemap config --print-defaults` and the docs.
 * Keys are snake_case and carry their unit (`voxel_size_m`).
 */
export interface NumberOption {
  type: 'number';
  default: number;
  /** Unit as written in docs ("m", "MPa", "1" for dimensionless). */
  unit: string;
  min?: number;
  max?: number;
  /** When true, the bounds themselves are not allowed. */
  exclusive?: boolean;
  integer?: boolean;
  help: string;
}
export interface BooleanOption {
  type: 'boolean';
  default: boolean;
  help: string;
}
export interface EnumOption<V extends string = string> {
  type: 'enum';
  values: readonly V[];
  default: V;
  help: string;
}
export interface StringOption {
  type: 'string';
  default: string;
  help: string;
}
export type OptionSpec = NumberOption | BooleanOption | EnumOption | StringOption;
export type OptionSpecs = Record<string, OptionSpec>;

export type OptionValue<S extends OptionSpec> = S extends NumberOption
  ? number
  : S extends BooleanOption
    ? boolean
    : S extends EnumOption<infer V>
      ? V
      : string;
export type OptionValues<S extends OptionSpecs> = { [K in keyof S]: OptionValue<S[K]> };

export interface StageOptions<S extends OptionSpecs> {
  stage: string;
  /** One line on what the stage does, for docs and the YAML file. */
  summary: string;
  specs: S;
  defaults(): OptionValues<S>;
  /** Fill defaults and validate; unknown keys and out-of-range values throw a XylemapError naming `stage.key`. */
  resolve(input?: unknown): OptionValues<S>;
}

export function defineOptions<S extends OptionSpecs>(stage: string, summary: string, specs: S): StageOptions<S> {
  const shape: Record<string, z.ZodType> = {};
  for (const [key, spec] of Object.entries(specs)) shape[key] = schemaOf(spec).optional();
  const schema = z.strictObject(shape);
  const defaults = (): OptionValues<S> =>
    Object.fromEntries(Object.entries(specs).map(([k, s]) => [k, s.default])) as OptionValues<S>;
  return {
    stage,
    summary,
    specs,
    defaults,
    resolve(input?: unknown): OptionValues<S> {
      const given = input ?? {};
      const parsed = schema.safeParse(given);
      if (!parsed.success) throw optionError(stage, specs, parsed.error, given);
      return { ...defaults(), ...(stripUndefined(parsed.data) as Partial<OptionValues<S>>) };
    },
  };
}

function schemaOf(spec: OptionSpec): z.ZodType {
  switch (spec.type) {
    case 'number': {
      let s = z.number();
      if (spec.integer) s = s.int();
      if (spec.min !== undefined) s = spec.exclusive ? s.gt(spec.min) : s.gte(spec.min);
      if (spec.max !== undefined) s = spec.exclusive ? s.lt(spec.max) : s.lte(spec.max);
      return s;
    }
    case 'boolean':
      return z.boolean();
    case 'enum':
      return z.enum(spec.values as [string, ...string[]]);
    case 'string':
      return z.string();
  }
}

/** The rule of an option in words, e.g. "a number in [0.001, 1] m". */
export function describeRule(spec: OptionSpec): string {
  switch (spec.type) {
    case 'number': {
      const kind = spec.integer ? 'an integer' : 'a number';
      const unit = spec.unit && spec.unit !== '1' ? ` ${spec.unit}` : '';
      const lo = spec.min === undefined ? '-∞' : String(spec.min);
      const hi = spec.max === undefined ? '∞' : String(spec.max);
      const [l, r] = spec.exclusive ? ['(', ')'] : ['[', ']'];
      return `${kind} in ${spec.min === undefined ? '(' : l}${lo}, ${hi}${spec.max === undefined ? ')' : r}${unit}`;
    }
    case 'boolean':
      return 'true or false';
    case 'enum':
      return `one of ${spec.values.join(', ')}`;
    case 'string':
      return 'a string';
  }
}

function optionError(stage: string, specs: OptionSpecs, error: z.ZodError, given: unknown): XylemapError {
  const issue = error.issues[0];
  if (issue.code === 'unrecognized_keys') {
    const key = issue.keys[0];
    return new XylemapError(`unknown option "${key}"`, {
      stage,
      option: `${stage}.${key}`,
      hint: `known options: ${Object.keys(specs).join(', ')}`,
    });
  }
  if (issue.path.length === 0) {
    return new XylemapError(`options must be a mapping of keys to values, got ${JSON.stringify(given)}`, { stage });
  }
  const key = String(issue.path[0]);
  const spec = specs[key];
  const value = (given as Record<string, unknown>)[key];
  return new XylemapError(`must be ${describeRule(spec)}, got ${JSON.stringify(value) ?? String(value)}`, {
    stage,
    option: `${stage}.${key}`,
    hint: spec.help,
  });
}

function stripUndefined(o: Record<string, unknown>): Record<string, unknown> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined));
}
