import type { Command } from 'commander';
import type { OptionSpec, StageOptions, OptionSpecs } from '../../core/options/declare.js';
import { XylemapError } from '../../core/util/errors.js';

/**
 * Add one `--<stage>.<key> <value>` flag per declared option of each stage (help text and default
 * from the declaration), and read them back as `{ stage: { key: value } }` of the flags given.
 */
export function addStageFlags(command: Command, stages: StageOptions<OptionSpecs>[]): void {
  for (const st of stages) {
    for (const [key, spec] of Object.entries(st.specs)) {
      command.option(`--${st.stage}.${key} <value>`, `${spec.help} (default ${String(spec.default)}${unitOf(spec)})`);
    }
  }
}

export function stageFlagValues(opts: Record<string, unknown>, stages: StageOptions<OptionSpecs>[]): Record<string, Record<string, unknown>> {
  const out: Record<string, Record<string, unknown>> = {};
  for (const st of stages) {
    const given: Record<string, unknown> = {};
    for (const [key, spec] of Object.entries(st.specs)) {
      const raw = opts[`${st.stage}.${key}`];
      if (raw === undefined) continue;
      given[key] = convert(String(raw), spec, `${st.stage}.${key}`);
    }
    out[st.stage] = given;
  }
  return out;
}

function convert(raw: string, spec: OptionSpec, path: string): unknown {
  if (spec.type === 'number') {
    const v = Number(raw);
    if (raw.trim() === '' || !Number.isFinite(v)) throw new XylemapError(`must be a number, got "${raw}"`, { option: path, hint: spec.help });
    return v;
  }
  if (spec.type === 'boolean') {
    if (raw === 'true' || raw === '1') return true;
    if (raw === 'false' || raw === '0') return false;
    throw new XylemapError(`must be true or false, got "${raw}"`, { option: path, hint: spec.help });
  }
  return raw;
}

function unitOf(spec: OptionSpec): string {
  return spec.type === 'number' && spec.unit !== '1' ? ` ${spec.unit}` : '';
}
