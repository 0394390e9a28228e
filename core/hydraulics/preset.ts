import { z } from 'zod';
import { XylemapError } from '../util/errors.js';

/**
 * A species preset: the assumed xylem anatomy and vulnerability of a group of species. Geometry
 * comes from the scan; everything here is an assumption the user can replace with a file of their
 * own (`--preset-file`). Values are validated with zod; unknown keys are errors naming the key.
 */
const positive = (unit: string) => z.number().refine((v) => v > 0, { message: `must be > 0 ${unit}` });
const fraction = z.number().refine((v) => v > 0 && v < 1, { message: 'must be in (0, 1)' });

export const presetSchema = z.strictObject({
  name: z.string().min(1),
  description: z.string().default(''),
  conduit: z.strictObject({
    /** D_h at the reference distance from the apex, µm. */
    apex_diameter_um: positive('µm'),
    /** Exponent b of D_h = D_apex · (L / L_ref)^b. */
    widening_exponent: z.number().refine((v) => v >= 0 && v <= 1, { message: 'must be in [0, 1]' }),
    reference_length_m: positive('m'),
    min_diameter_um: positive('µm'),
    max_diameter_um: positive('µm'),
    /** Conduits per mm² of sapwood (count rule `conduit_density`). */
    density_per_mm2: positive('per mm²'),
    /** Conduit lumen area per sapwood area (count rule `lumen_fraction`). */
    lumen_fraction: fraction,
    /** Share of total xylem resistance in end walls and pits (0–1). */
    end_wall_resistance_fraction: z.number().refine((v) => v >= 0 && v < 1, { message: 'must be in [0, 1)' }),
  }),
  sapwood: z.strictObject({
    /** Radial depth of conducting sapwood, m (rule `sapwood_depth`). */
    depth_m: positive('m'),
    /** Sapwood share of the cross-section (rule `sapwood_fraction`). */
    fraction: z.number().refine((v) => v > 0 && v <= 1, { message: 'must be in (0, 1]' }),
  }),
  vulnerability: z.strictObject({
    p50_mpa: z.number().refine((v) => v < 0, { message: 'must be < 0 MPa' }),
    slope_percent_per_mpa: positive('% per MPa'),
  }),
  leaf: z.strictObject({
    /** Sapwood area per leaf area it supplies, m² m⁻². */
    huber_value_m2_m2: positive('m² m⁻²'),
  }),
});

export type SpeciesPreset = z.infer<typeof presetSchema>;

/**
 * Validate a parsed preset object.
 * @param value the parsed YAML
 * @param file where it came from, for the error message
 * @throws XylemapError naming the first bad key path
 */
export function validatePreset(value: unknown, file: string): SpeciesPreset {
  const parsed = presetSchema.safeParse(value);
  if (parsed.success) {
    const c = parsed.data.conduit;
    if (!(c.min_diameter_um <= c.max_diameter_um)) {
      throw new XylemapError(`conduit.min_diameter_um (${c.min_diameter_um}) must be ≤ conduit.max_diameter_um (${c.max_diameter_um})`, {
        file,
        stage: 'hydraulics',
        hint: 'fix the preset',
      });
    }
    return parsed.data;
  }
  const issue = parsed.error.issues[0];
  const path = issue.path.map(String).join('.');
  if (issue.code === 'unrecognized_keys') {
    const key = [...issue.path.map(String), issue.keys[0]].join('.');
    return fail(file, `unknown preset key "${key}"`, 'see core/hydraulics/presets/diffuse-porous.yaml for the keys');
  }
  if (issue.path.length === 0) return fail(file, 'a preset must be a YAML mapping', 'see core/hydraulics/presets/ for examples');
  return fail(file, `preset key "${path}" ${issue.code === 'invalid_type' ? 'is missing or has the wrong type' : issue.message}`, 'fix the preset');
}

function fail(file: string, message: string, hint: string): never {
  throw new XylemapError(message, { file, stage: 'hydraulics', hint });
}
