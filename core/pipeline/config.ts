import { describeRule, type OptionSpec, type OptionSpecs, type OptionValues, type StageOptions } from '../options/declare.js';
import { XylemapError } from '../util/errors.js';
import { stringify } from 'yaml';

/** The part of a pipeline stage that configuration needs: its name and its option declaration. */
export interface StageDeclaration {
  name: string;
  options: StageOptions<OptionSpecs>;
}

/** Resolved options of every stage, keyed by stage name, defaults filled in. */
export type ResolvedConfig = Record<string, OptionValues<OptionSpecs>>;

/**
 * Validate a whole configuration (the parsed YAML object, or undefined for "all defaults") against
 * every stage's declaration, before any point is read. Top-level keys are stage names; a stage
 * given as `null` (an empty YAML block) means its defaults.
 * @throws XylemapError naming the key path, the rule and the value (unknown stage, unknown key, out of range).
 */
export function resolveConfig(input: unknown, stages: readonly StageDeclaration[], file?: string): ResolvedConfig {
  const given = input ?? {};
  if (typeof given !== 'object' || Array.isArray(given)) {
    throw new XylemapError(`configuration must be a mapping of stage names to options, got ${JSON.stringify(given)}`, {
      file,
      hint: `top-level keys are stage names: ${stages.map((s) => s.name).join(', ')}`,
    });
  }
  const known = new Set(stages.map((s) => s.name));
  for (const key of Object.keys(given)) {
    if (!known.has(key)) {
      throw new XylemapError(`unknown stage "${key}"`, {
        file,
        option: key,
        hint: `top-level keys are stage names: ${[...known].join(', ')}`,
      });
    }
  }
  const out: ResolvedConfig = {};
  for (const stage of stages) {
    const block = (given as Record<string, unknown>)[stage.name];
    try {
      out[stage.name] = stage.options.resolve(block ?? undefined);
    } catch (e) {
      if (e instanceof XylemapError && file && !e.file) {
        throw new XylemapError(e.message, { file, stage: e.stage, option: e.option, hint: e.hint });
      }
      throw e;
    }
  }
  return out;
}

/** Set one option by key path ("hydraulics.species_preset") on an unresolved configuration object. */
export function setConfigValue(input: unknown, path: string, value: unknown): Record<string, unknown> {
  const [stage, key] = path.split('.');
  const base = input && typeof input === 'object' && !Array.isArray(input) ? { ...(input as Record<string, unknown>) } : {};
  const block = base[stage];
  base[stage] = { ...(block && typeof block === 'object' ? (block as Record<string, unknown>) : {}), [key]: value };
  return base;
}

/** One YAML scalar as the `yaml` library writes it (quoting strings only when needed). */
function yamlScalar(value: unknown): string {
  return stringify(value).trimEnd();
}

function unitText(spec: OptionSpec): string {
  return spec.type === 'number' && spec.unit && spec.unit !== '1' ? spec.unit : '';
}

/**
 * A commented YAML file with every stage's options at their defaults: the stage summary above each
 * block, and above each key its help, unit and valid range. It parses back to the defaults.
 */
export function formatDefaultsYaml(stages: readonly StageDeclaration[]): string {
  const lines = [
    '# xylemap configuration: every option of every stage, at its default.',
    '# Top-level keys are stage names; delete what you do not change. Units are in the key names.',
    '',
  ];
  for (const stage of stages) {
    lines.push(`# ${stage.name}: ${stage.options.summary}`);
    lines.push(`${stage.name}:`);
    for (const [key, spec] of Object.entries(stage.options.specs)) {
      const unit = unitText(spec);
      lines.push(`  # ${spec.help}`);
      lines.push(`  #   ${describeRule(spec)}; default ${yamlScalar(spec.default)}${unit ? ` ${unit}` : ''}`);
      lines.push(`  ${key}: ${yamlScalar(spec.default)}`);
    }
    lines.push('');
  }
  return lines.join('\n');
}

function mdCell(text: string): string {
  return text.replace(/\|/g, '\\|').replace(/\n/g, ' ');
}

/** A Markdown reference of every option (one table per stage), generated from the same declarations. */
export function formatOptionsMarkdown(stages: readonly StageDeclaration[]): string {
  const out: string[] = [];
  for (const stage of stages) {
    out.push(`### \`${stage.name}\``, '', mdCell(stage.options.summary), '');
    out.push('| key | default | unit | valid values | meaning |', '| --- | --- | --- | --- | --- |');
    for (const [key, spec] of Object.entries(stage.options.specs)) {
      const unit = spec.type === 'number' ? (spec.unit === '1' || !spec.unit ? '–' : spec.unit) : '–';
      out.push(
        `| \`${key}\` | \`${mdCell(yamlScalar(spec.default))}\` | ${mdCell(unit)} | ${mdCell(describeRule(spec))} | ${mdCell(spec.help)} |`,
      );
    }
    out.push('');
  }
  return out.join('\n');
}
