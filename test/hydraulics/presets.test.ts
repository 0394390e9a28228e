import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BUILTIN_PRESETS } from '../../core/hydraulics/options.js';
import { validatePreset } from '../../core/hydraulics/preset.js';
import { listPresets, loadPreset, loadPresetFile, resolvePreset } from '../../core/io/presets.js';

const dir = mkdtempSync(join(tmpdir(), 'xylemap-presets-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('listPresets', () => {
  it('finds exactly the built-in presets the options declare', () => {
    expect(listPresets()).toEqual([...BUILTIN_PRESETS].sort());
  });
});

describe('loadPreset', () => {
  it.each([...BUILTIN_PRESETS])('loads and validates the built-in preset %s', (name) => {
    const p = loadPreset(name);
    expect(p.name).toBe(name);
    // Sperry, Hacke & Pittermann 2006 Am. J. Bot. 93:1490: end walls carry 56–64 % of the resistance.
    expect(p.conduit.end_wall_resistance_fraction).toBeGreaterThanOrEqual(0.56);
    expect(p.conduit.end_wall_resistance_fraction).toBeLessThanOrEqual(0.64);
    // Anfodillo et al. 2013 IAWA J. 34:352: within-stem widening exponents around 0.2.
    expect(p.conduit.widening_exponent).toBeGreaterThan(0.1);
    expect(p.conduit.widening_exponent).toBeLessThan(0.3);
  });

  it('names the known presets when the name is unknown', () => {
    expect(() => loadPreset('oak')).toThrow(/unknown species preset "oak"/);
  });
});

describe('loadPresetFile', () => {
  it('names an unknown key with its path', () => {
    const base = loadPreset('conifer');
    const file = join(dir, 'extra.yaml');
    writeFileSync(file, JSON.stringify({ ...base, conduit: { ...base.conduit, pit_area: 3 } }));
    expect(() => loadPresetFile(file)).toThrow(/unknown preset key "conduit.pit_area"/);
  });

  it('reports a missing file with its path', () => {
    const file = join(dir, 'missing.yaml');
    try {
      loadPresetFile(file);
      expect.unreachable();
    } catch (e) {
      expect((e as { file?: string }).file).toBe(file);
      expect(String(e)).toMatch(/cannot read species preset \(ENOENT\)/);
    }
  });

  it('reports YAML syntax errors with the line', () => {
    const file = join(dir, 'broken.yaml');
    writeFileSync(file, 'name: x\nconduit: [1, 2\n');
    expect(() => loadPresetFile(file)).toThrow(/not valid YAML at line/);
  });
});

describe('validatePreset', () => {
  it('rejects a positive P50 with the key path and the rule', () => {
    const base = loadPreset('diffuse-porous');
    expect(() => validatePreset({ ...base, vulnerability: { ...base.vulnerability, p50_mpa: 1 } }, 'x.yaml')).toThrow(
      /preset key "vulnerability.p50_mpa" must be < 0 MPa/,
    );
  });

  it('rejects a minimum conduit diameter above the maximum', () => {
    const base = loadPreset('diffuse-porous');
    expect(() => validatePreset({ ...base, conduit: { ...base.conduit, min_diameter_um: 500 } }, 'x.yaml')).toThrow(/must be ≤/);
  });
});

describe('resolvePreset', () => {
  it('prefers preset_file over the built-in name', () => {
    const file = join(dir, 'mine.yaml');
    writeFileSync(file, JSON.stringify({ ...loadPreset('conifer'), name: 'mine' }));
    expect(resolvePreset({ preset: 'ring-porous', preset_file: file }).preset.name).toBe('mine');
    expect(resolvePreset({ preset: 'ring-porous', preset_file: '' }).preset.name).toBe('ring-porous');
  });
});
