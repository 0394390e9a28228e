import { defineOptions, type OptionValues } from '../options/declare.js';

/** Names of the species presets shipped in core/hydraulics/presets/ (one YAML file each). */
export const BUILTIN_PRESETS = ['diffuse-porous', 'ring-porous', 'conifer'] as const;
export type BuiltinPresetName = (typeof BUILTIN_PRESETS)[number];

/**
 * Options of the hydraulics stage. Anatomy (conduit sizes, densities, P50 …) lives in the species
 * preset; these options pick the rules and set the conditions of the steady-flow calculation.
 */
export const hydraulicsOptions = defineOptions(
  'hydraulics',
  'Model estimates of conduit sizes, conductance, water potentials and safety margins from the network plus assumed anatomy (not measurements).',
  {
    preset: {
      type: 'enum',
      values: BUILTIN_PRESETS,
      default: 'diffuse-porous',
      help: 'built-in species preset (assumed anatomy and vulnerability)',
    },
    preset_file: {
      type: 'string',
      default: '',
      help: 'YAML species preset of your own; overrides preset when set',
    },
    conduit_rule: {
      type: 'enum',
      values: ['apex_widening', 'murray'] as const,
      default: 'apex_widening',
      help: 'conduit diameter: widening with distance from the apex (D_h = D_apex (L/L_ref)^b), or Murray conduits (Σ N D³ kept at furcations)',
    },
    count_rule: {
      type: 'enum',
      values: ['conduit_density', 'lumen_fraction', 'pipe_model'] as const,
      default: 'conduit_density',
      help: 'conduit count: sapwood area × density, sapwood area × lumen fraction / conduit area, or base count shared in proportion to tips supplied',
    },
    sapwood_rule: {
      type: 'enum',
      values: ['sapwood_depth', 'sapwood_fraction'] as const,
      default: 'sapwood_depth',
      help: 'conducting area: outer ring of the preset depth, or the preset fraction of the cross-section',
    },
    vulnerability_curve: {
      type: 'enum',
      values: ['sigmoid', 'weibull'] as const,
      default: 'sigmoid',
      help: 'vulnerability curve form, both set by the preset P50 and slope',
    },
    tip_flux_rule: {
      type: 'enum',
      values: ['terminal_area', 'equal'] as const,
      default: 'terminal_area',
      help: 'how the transpiration is shared among tips: in proportion to the terminal segment cross-section, or equally',
    },
    temperature_c: {
      type: 'number',
      default: 20,
      unit: '°C',
      min: 0,
      max: 50,
      help: 'sap temperature for viscosity (IAPWS 2008) and density (Kell 1975)',
    },
    soil_water_potential_mpa: {
      type: 'number',
      default: -0.1,
      unit: 'MPa',
      min: -10,
      max: 0,
      help: 'water potential at the stem base (soil and root resistances are not modelled)',
    },
    transpiration_kg_s: {
      type: 'number',
      default: 0,
      unit: 'kg/s',
      min: 0,
      help: 'total transpiration of the tree; 0 = leaf area × transpiration_rate_mmol_m2_s',
    },
    transpiration_rate_mmol_m2_s: {
      type: 'number',
      default: 2,
      unit: 'mmol/m²/s',
      min: 0,
      max: 50,
      help: 'transpiration per leaf area, used when transpiration_kg_s is 0',
    },
    leaf_area_m2: {
      type: 'number',
      default: 0,
      unit: 'm²',
      min: 0,
      help: 'one-sided leaf area of the tree; 0 = estimate from base sapwood area / preset Huber value',
    },
    gravity: {
      type: 'boolean',
      default: true,
      help: 'include the hydrostatic gradient ρ g (≈ 0.0098 MPa per m of height)',
    },
    convergence_tolerance_mpa: {
      type: 'number',
      default: 1e-7,
      unit: 'MPa',
      min: 1e-14,
      max: 1e-3,
      help: 'embolism iteration stops when no water potential changes by more than this',
    },
    max_iterations: {
      type: 'number',
      default: 2000,
      unit: '1',
      min: 2,
      max: 100000,
      integer: true,
      help: 'iteration limit of the embolism feedback; not converging counts as runaway embolism',
    },
    critical_transpiration_rtol: {
      type: 'number',
      default: 1e-2,
      unit: '1',
      min: 1e-8,
      max: 0.5,
      exclusive: true,
      help: 'relative width at which the bisection for the critical transpiration stops (the result is a steady lower bound within it)',
    },
  },
);

export type HydraulicsOptionValues = OptionValues<typeof hydraulicsOptions.specs>;
