import { readdirSync, readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse, YAMLParseError } from 'yaml';
import { validatePreset, type SpeciesPreset } from '../hydraulics/preset.js';
import { XylemapError } from '../util/errors.js';

/**
 * Species presets of the hydraulics stage, read from YAML. The built-in ones live in
 * core/hydraulics/presets/ beside the sources; `npm run build` copies them to
 * dist/core/hydraulics/presets/, so resolving relative to this module works both from the
 * sources (vitest) and from the compiled file.
 */
export function presetDirectory(): string {
  return fileURLToPath(new URL('../hydraulics/presets/', import.meta.url));
}

/** Names of the built-in presets (file names without .yaml), sorted. */
export function listPresets(): string[] {
  return readdirSync(presetDirectory())
    .filter((f) => f.endsWith('.yaml'))
    .map((f) => basename(f, '.yaml'))
    .sort();
}

const cache = new Map<string, SpeciesPreset>();

/**
 * Load a built-in preset by name.
 * @throws XylemapError naming the known presets when the name is unknown
 */
export function loadPreset(name: string): SpeciesPreset {
  const hit = cache.get(name);
  if (hit) return hit;
  const known = listPresets();
  if (!known.includes(name)) {
    throw new XylemapError(`unknown species preset "${name}"`, {
      stage: 'hydraulics',
      option: 'hydraulics.preset',
      hint: `built-in presets: ${known.join(', ')}; or pass your own YAML with --preset-file`,
    });
  }
  const preset = loadPresetFile(join(presetDirectory(), `${name}.yaml`));
  cache.set(name, preset);
  return preset;
}

/**
 * Load and validate a preset YAML file of the user's.
 * @throws XylemapError (file named) when it cannot be read, is not YAML, or fails validation
 */
export function loadPresetFile(path: string): SpeciesPreset {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'read error';
    throw new XylemapError(`cannot read species preset (${code})`, { file: path, stage: 'hydraulics', hint: 'check the path given to --preset-file' });
  }
  let value: unknown;
  try {
    value = parse(text);
  } catch (e) {
    const where = e instanceof YAMLParseError && e.linePos ? ` at line ${e.linePos[0].line}` : '';
    throw new XylemapError(`not valid YAML${where}`, { file: path, stage: 'hydraulics', hint: 'see core/hydraulics/presets/*.yaml for the layout' });
  }
  return validatePreset(value, path);
}

/** The preset the hydraulics options select: `preset_file` when set, else the built-in `preset`. */
export function resolvePreset(options: { preset: string; preset_file: string }): { preset: SpeciesPreset; source: string } {
  if (options.preset_file) return { preset: loadPresetFile(options.preset_file), source: options.preset_file };
  return { preset: loadPreset(options.preset), source: `built-in:${options.preset}` };
}
