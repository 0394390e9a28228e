import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { parseConfigText } from '../../core/io/config-file.js';
import { formatDefaultsYaml, formatOptionsMarkdown, resolveConfig, setConfigValue } from '../../core/pipeline/config.js';
import { CONFIG_DECLARATIONS, PIPELINE_DECLARATIONS } from '../../core/pipeline/declarations.js';
import { PIPELINE } from '../../core/pipeline/stages.js';
import { XylemapError } from '../../core/util/errors.js';

/** Every declared option with its default, straight from the declarations (the expected values). */
function declaredDefaults(): Record<string, Record<string, unknown>> {
  return Object.fromEntries(CONFIG_DECLARATIONS.map((d) => [d.name, Object.fromEntries(Object.entries(d.options.specs).map(([k, s]) => [k, s.default]))]));
}

function errorOf(f: () => unknown): XylemapError {
  try {
    f();
  } catch (e) {
    if (e instanceof XylemapError) return e;
    throw e;
  }
  throw new Error('expected a XylemapError');
}

describe('resolveConfig', () => {
  it('fills every stage with its declared defaults when no configuration is given', () => {
    expect(resolveConfig(undefined, CONFIG_DECLARATIONS)).toEqual(declaredDefaults());
  });

  it('treats an empty YAML block (null) as the defaults of that stage', () => {
    const r = resolveConfig(parse('clean:\nreport:\n  histogram_bins: 12\n'), CONFIG_DECLARATIONS);
    expect(r.clean).toEqual(declaredDefaults().clean);
    expect(r.report.histogram_bins).toBe(12);
  });

  it('rejects an unknown stage, naming it and the known stage names', () => {
    const e = errorOf(() => resolveConfig({ cleen: {} }, CONFIG_DECLARATIONS, 'x.yaml'));
    expect(e.option).toBe('cleen');
    expect(e.file).toBe('x.yaml');
    expect(e.oneLine()).toContain('unknown stage "cleen"');
    expect(e.hint).toContain('clean');
  });

  it('rejects an unknown key with its key path', () => {
    const e = errorOf(() => resolveConfig({ clean: { voxel_sise_m: 0.01 } }, CONFIG_DECLARATIONS, 'x.yaml'));
    expect(e.option).toBe('clean.voxel_sise_m');
    expect(e.file).toBe('x.yaml');
  });

  it('rejects an out-of-range value naming the key path, the rule and the value', () => {
    const e = errorOf(() => resolveConfig({ clean: { voxel_size_m: -1 } }, CONFIG_DECLARATIONS));
    expect(e.option).toBe('clean.voxel_size_m');
    const spec = CONFIG_DECLARATIONS.find((d) => d.name === 'clean')!.options.specs.voxel_size_m as { min: number; max: number };
    expect(e.message).toBe(`must be a number in [${spec.min}, ${spec.max}] m, got -1`);
  });

  it('rejects a value of the wrong type and an enum value outside its list', () => {
    expect(errorOf(() => resolveConfig({ report: { histogram_bins: 'many' } }, CONFIG_DECLARATIONS)).option).toBe('report.histogram_bins');
    expect(errorOf(() => resolveConfig({ report: { colour_by: 'rainbow' } }, CONFIG_DECLARATIONS)).message).toContain('one of branch_order');
  });

  it('rejects a configuration that is not a mapping', () => {
    expect(errorOf(() => resolveConfig([1, 2], CONFIG_DECLARATIONS)).message).toContain('must be a mapping');
  });

  it('gives the same result when fed its own output (resolving is idempotent)', () => {
    const once = resolveConfig({ scaling: { seed: 5 } }, CONFIG_DECLARATIONS);
    expect(resolveConfig(once, CONFIG_DECLARATIONS)).toEqual(once);
  });
});

describe('setConfigValue', () => {
  it('sets one key path without dropping the other keys of the stage', () => {
    const c = setConfigValue({ hydraulics: { temperature_c: 25 } }, 'hydraulics.preset', 'conifer');
    expect(c).toEqual({ hydraulics: { temperature_c: 25, preset: 'conifer' } });
  });

  it('starts from nothing when there is no configuration', () => {
    expect(setConfigValue(undefined, 'hydraulics.preset', 'conifer')).toEqual({ hydraulics: { preset: 'conifer' } });
  });
});

describe('formatDefaultsYaml', () => {
  it('parses back (YAML 1.2) to exactly the declared defaults', () => {
    const text = formatDefaultsYaml(CONFIG_DECLARATIONS);
    expect(parse(text)).toEqual(declaredDefaults());
    expect(resolveConfig(parseConfigText(text), CONFIG_DECLARATIONS)).toEqual(declaredDefaults());
  });

  it('writes the help line and the rule of every option as comments above its key', () => {
    const lines = formatDefaultsYaml(CONFIG_DECLARATIONS).split('\n');
    let checked = 0;
    for (const d of CONFIG_DECLARATIONS) {
      const start = lines.indexOf(`${d.name}:`);
      expect(start).toBeGreaterThan(0);
      for (const [key, spec] of Object.entries(d.options.specs)) {
        const at = lines.findIndex((l, i) => i > start && l.startsWith(`  ${key}:`));
        expect(lines[at - 2]).toBe(`  # ${spec.help}`);
        expect(lines[at - 1]).toMatch(/^ {2}# {3}.+; default /);
        checked++;
      }
    }
    expect(checked).toBe(CONFIG_DECLARATIONS.reduce((n, d) => n + Object.keys(d.options.specs).length, 0));
  });
});

describe('formatOptionsMarkdown', () => {
  it('has one table row per declared option', () => {
    const md = formatOptionsMarkdown(CONFIG_DECLARATIONS);
    const rows = md.split('\n').filter((l) => l.startsWith('| `'));
    const count = CONFIG_DECLARATIONS.reduce((n, d) => n + Object.keys(d.options.specs).length, 0);
    expect(rows.length).toBe(count);
    expect(md).toContain('| `voxel_size_m` |');
  });
});

describe('PIPELINE_DECLARATIONS', () => {
  it('lists the same stages in the same order as the runnable PIPELINE', () => {
    expect(PIPELINE_DECLARATIONS.map((d) => d.name)).toEqual(PIPELINE.map((s) => s.name));
    expect(PIPELINE_DECLARATIONS.map((d) => d.options)).toEqual(PIPELINE.map((s) => s.options));
  });
});
