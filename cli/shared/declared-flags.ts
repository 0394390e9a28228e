import { Option, type Command } from 'commander';
import { describeRule, type OptionSpec, type OptionSpecs, type StageOptions } from '../../core/options/declare.js';
import { XylemapError } from '../../core/util/errors.js';

/**
 * Command-line flags built from a stage's option declaration (`core/<stage>/options.ts`), in two
 * spellings that share one conversion/validation rule (`parseDeclaredValue`):
 * - per command: `--voxel-size-m <number>` (`addDeclaredFlags` + `givenFlags`);
 * - namespaced, several stages on one command: `--clean.voxel_size_m <value>` (`addStageFlags` + `stageFlagValues`).
 */

/** Any stage declaration, whatever its specs (`any`: the specs' literal types do not matter here). */
export type AnyStageOptions = StageOptions<any>;

export interface DeclaredFlagStyle {
  /**
   * 'value' (default): `--key <true|false>`; 'switch': `--key`, or `--no-key` when the default is
   * true. With 'switch', enum flags are checked by commander's own choices check.
   */
  booleans?: 'value' | 'switch';
}

/**
 * Convert one flag's text into the declared type and check it against the declaration, so a bad
 * flag fails while parsing with the same rule in the message as `resolve()` gives.
 * @param raw the text the user typed
 * @param spec the option's declaration
 * @param stage stage name, for the error's stage and `stage.key` option path
 * @param key snake_case option key
 * @throws XylemapError "must be <rule>, got <value>" (option stage.key, hint the option's help)
 */
export function parseDeclaredValue(raw: string, spec: OptionSpec, stage: string, key: string): number | boolean | string {
  const fail = (got: string): never => {
    throw new XylemapError(`must be ${describeRule(spec)}, got ${got}`, { stage, option: `${stage}.${key}`, hint: spec.help });
  };
  switch (spec.type) {
    case 'number': {
      const v = Number(raw);
      // Number('') is 0 and Number('NaN') is NaN: both refused here, with the text as typed.
      if (raw.trim() === '' || !Number.isFinite(v)) return fail(`"${raw}"`);
      if (!withinRule(v, spec)) return fail(String(v));
      return v;
    }
    case 'boolean':
      if (raw === 'true' || raw === '1') return true;
      if (raw === 'false' || raw === '0') return false;
      return fail(`"${raw}"`);
    case 'enum':
      if (!spec.values.includes(raw)) return fail(JSON.stringify(raw));
      return raw;
    case 'string':
      return raw;
  }
}

/** The range/integer rule of a number declaration, written so NaN fails it. */
function withinRule(v: number, spec: Extract<OptionSpec, { type: 'number' }>): boolean {
  if (spec.integer && !Number.isInteger(v)) return false;
  if (spec.min !== undefined && !(spec.exclusive ? v > spec.min : v >= spec.min)) return false;
  if (spec.max !== undefined && !(spec.exclusive ? v < spec.max : v <= spec.max)) return false;
  return true;
}

/** ` [m]` after a number's help; nothing for dimensionless ("1") and non-numbers. */
function unitSuffix(spec: OptionSpec, open: string, close: string): string {
  return spec.type === 'number' && spec.unit !== '1' ? ` ${open}${spec.unit}${close}` : '';
}

/**
 * One commander option for a declared key: `temperature_c` → `--temperature-c <number>`.
 * @param style see `DeclaredFlagStyle`
 */
export function declaredFlag(stage: string, key: string, spec: OptionSpec, style: DeclaredFlagStyle = {}): Option {
  const kebab = key.replace(/_/g, '-');
  if (spec.type === 'boolean' && style.booleans === 'switch') {
    return spec.default ? new Option(`--no-${kebab}`, `do not: ${spec.help}`) : new Option(`--${kebab}`, spec.help);
  }
  const placeholder = spec.type === 'number' ? 'number' : spec.type === 'boolean' ? 'true|false' : 'value';
  const option = new Option(`--${kebab} <${placeholder}>`, `${spec.help}${unitSuffix(spec, '[', ']')} (default ${JSON.stringify(spec.default)})`);
  if (spec.type === 'enum') {
    option.choices([...spec.values]);
    // With 'switch', commander's choices check (set just above) stays in charge of enums.
    if (style.booleans === 'switch') return option;
  }
  if (spec.type === 'string' && style.booleans === 'switch') return option;
  return option.argParser((raw: string) => parseDeclaredValue(raw, spec, stage, key));
}

/**
 * Add one `--key-with-dashes` flag per declared option of a stage.
 * @returns option key → commander attribute name (pass to `givenFlags`)
 */
export function addDeclaredFlags(cmd: Command, stage: AnyStageOptions, style: DeclaredFlagStyle = {}): Map<string, string> {
  const attributes = new Map<string, string>();
  for (const [key, spec] of Object.entries(stage.specs as OptionSpecs)) {
    const option = declaredFlag(stage.stage, key, spec, style);
    attributes.set(key, option.attributeName());
    cmd.addOption(option);
  }
  return attributes;
}

/**
 * The declared flags that were typed on the command line (not commander's implied defaults), so
 * they override a configuration file only where the user gave them.
 * @returns option key → value
 */
export function givenFlags(self: Command, flags: Record<string, unknown>, attributes: Map<string, string>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, attr] of attributes) if (self.getOptionValueSource(attr) === 'cli') out[key] = flags[attr];
  return out;
}

/**
 * Add one `--<stage>.<key> <value>` flag per declared option of each stage (help and default from
 * the declaration). Values stay text until `stageFlagValues`.
 */
export function addStageFlags(cmd: Command, stages: AnyStageOptions[]): void {
  for (const st of stages) {
    for (const [key, spec] of Object.entries(st.specs as OptionSpecs)) {
      cmd.option(`--${st.stage}.${key} <value>`, `${spec.help} (default ${String(spec.default)}${unitSuffix(spec, '', '')})`);
    }
  }
}

/**
 * The namespaced flags given, converted and checked, as `{ stage: { key: value } }` (every stage
 * present, empty when none of its flags was given).
 * @param opts `command.opts()` (or the action's options object)
 */
export function stageFlagValues(opts: Record<string, unknown>, stages: AnyStageOptions[]): Record<string, Record<string, unknown>> {
  const out: Record<string, Record<string, unknown>> = {};
  for (const st of stages) {
    const given: Record<string, unknown> = {};
    for (const [key, spec] of Object.entries(st.specs as OptionSpecs)) {
      const raw = opts[`${st.stage}.${key}`];
      if (raw !== undefined) given[key] = parseDeclaredValue(String(raw), spec, st.stage, key);
    }
    out[st.stage] = given;
  }
  return out;
}
