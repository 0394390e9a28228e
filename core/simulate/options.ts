import { defineOptions, type OptionValues } from '../options/declare.js';

/**
 * Every option of the scan lab, declared once. The `simulate` block drives the tree generator and
 * the virtual scan (CLI flags `--trunk-base-radius-m` …, YAML key `simulate:`); the `score` block
 * drives the matching of a reconstruction against the truth.
 *
 * Defaults describe a 15 m open-grown broadleaf scanned from four positions; presets
 * (`presets.ts`) override some of them. Instrument defaults are typical of phase/pulse terrestrial
 * scanners (a few mm ranging noise, ~0.3–0.5 mrad divergence, a few mm exit beam) — from memory.
 */
export const simulateOptions = defineOptions('simulate', 'generate a tree with known architecture and scan it virtually', {
  seed: { type: 'number', default: 1, unit: '1', min: 0, max: 4294967295, integer: true, help: 'seed of every random choice (tree and scan)' },
  // --- tree generator
  trunk_base_radius_m: { type: 'number', default: 0.2, unit: 'm', min: 0.01, max: 2, help: 'radius of the stem at its base' },
  tree_height_m: { type: 'number', default: 15, unit: 'm', min: 1, max: 80, help: 'length of the trunk axis from base to leader tip' },
  crown_base_fraction: { type: 'number', default: 0.3, unit: '1', min: 0, max: 0.9, help: 'fraction of the trunk length that is clear bole below the first furcation' },
  exponent_a: { type: 'number', default: 2.2, unit: '1', min: 1.2, max: 4, help: 'area-preservation exponent a: Σ r_child^a = r_parent^a at every furcation (exact)' },
  leading_share: { type: 'number', default: 0.7, unit: '1', min: 0.5, max: 0.97, exclusive: true, help: "share of the parent's r^a carried by the leading child (the rest is split among laterals)" },
  share_jitter: { type: 'number', default: 0.05, unit: '1', min: 0, max: 0.3, help: 'uniform ± jitter on leading_share per furcation (kept inside (0.5, 0.97))' },
  three_way_fraction: { type: 'number', default: 0.2, unit: '1', min: 0, max: 1, help: 'probability that a furcation has two laterals (3 children) instead of one' },
  twig_radius_m: { type: 'number', default: 0.004, unit: 'm', min: 0.0005, max: 0.05, help: 'growth stops where a new lateral would be thinner than this' },
  length_exponent: { type: 'number', default: 0.67, unit: '1', min: 0.2, max: 1.5, help: 'a lateral axis is as long as its parent axis × lateral_length_ratio × (r_lateral / r_parent_axis)^this (WBE: 2/3)' },
  lateral_length_ratio: { type: 'number', default: 0.7, unit: '1', min: 0.05, max: 2, help: 'length of a lateral axis relative to its parent axis (before radius scaling)' },
  crown_shape: { type: 'enum', values: ['ellipsoid', 'cone', 'cylinder'] as const, default: 'ellipsoid', help: 'how first-order branch length varies with height in the crown' },
  cylinders_per_internode: { type: 'number', default: 4, unit: '1', min: 1, max: 20, integer: true, help: 'short cylinders (segments) per internode' },
  taper_fraction: { type: 'number', default: 0.04, unit: '1', min: 0, max: 0.3, help: 'radius decrease along one internode (the furcation rule uses the END radius)' },
  branch_angle_deg: { type: 'number', default: 50, unit: 'deg', min: 5, max: 110, help: 'angle between a lateral and its parent axis' },
  branch_angle_jitter_deg: { type: 'number', default: 10, unit: 'deg', min: 0, max: 45, help: 'standard deviation of the branch angle' },
  phyllotaxis_deg: { type: 'number', default: 137.5, unit: 'deg', min: 0, max: 360, help: 'azimuth rotation between successive laterals on an axis' },
  leader_deflection_deg: { type: 'number', default: 8, unit: 'deg', min: 0, max: 45, help: 'leading child turns away from the lateral by this angle' },
  bend_deg: { type: 'number', default: 4, unit: 'deg', min: 0, max: 30, help: 'standard deviation of the random bend between successive cylinders' },
  gravitropism_deg_per_m: { type: 'number', default: 3, unit: 'deg/m', min: -30, max: 30, help: 'laterals turn toward vertical (+ up, − droop) by this angle per metre' },
  trunk_lean_deg: { type: 'number', default: 0, unit: 'deg', min: 0, max: 45, help: 'lean of the trunk from vertical (random azimuth)' },
  trunk_fork_height_m: { type: 'number', default: 0, unit: 'm', min: 0, max: 80, help: 'height where the trunk forks into two co-dominant stems (0 = no fork)' },
  max_segments: { type: 'number', default: 300000, unit: '1', min: 1, max: 5000000, integer: true, help: 'refuse trees with more segments than this (raise twig_radius_m to shrink a tree)' },
  // --- virtual scan
  scan_positions: { type: 'number', default: 4, unit: '1', min: 0, max: 32, integer: true, help: 'scan positions on a ring around the stem' },
  scan_distance_m: { type: 'number', default: 8, unit: 'm', min: 0.5, max: 200, help: 'radius of the ring of scan positions' },
  scanner_height_m: { type: 'number', default: 1.3, unit: 'm', min: 0, max: 20, help: 'height of the scanner head above the ground' },
  scan_under_crown: { type: 'boolean', default: false, help: 'add one position under the crown, 1 m (or 3 trunk radii) beside the stem' },
  angular_step_deg: { type: 'number', default: 0.08, unit: 'deg', min: 0.002, max: 2, help: 'angular step of the spherical scan, both azimuth and elevation' },
  range_noise_m: { type: 'number', default: 0.002, unit: 'm', min: 0, max: 0.2, help: 'standard deviation of the Gaussian range noise' },
  beam_exit_diameter_m: { type: 'number', default: 0.004, unit: 'm', min: 0, max: 0.05, help: 'beam diameter at the scanner' },
  beam_divergence_mrad: { type: 'number', default: 0.4, unit: 'mrad', min: 0, max: 10, help: 'full-angle beam divergence; footprint radius = exit/2 + range × divergence/2' },
  min_return_fraction: { type: 'number', default: 0.2, unit: '1', min: 0.01, max: 1, help: 'share of the footprint a target must cover to give a return' },
  max_range_m: { type: 'number', default: 150, unit: 'm', min: 1, max: 2000, help: 'returns beyond this range are lost' },
  ground: { type: 'boolean', default: true, help: 'flat ground at the stem base height' },
  ground_radius_m: { type: 'number', default: 12, unit: 'm', min: 0, max: 200, help: 'radius of the ground disc around the stem that returns points' },
  clutter_fraction: { type: 'number', default: 0.002, unit: '1', min: 0, max: 0.2, help: 'share of rays that give a spurious return at a random range before the target' },
  registration_error_m: { type: 'number', default: 0, unit: 'm', min: 0, max: 0.5, help: 'standard deviation of the per-position shift (positions after the first)' },
  registration_error_deg: { type: 'number', default: 0, unit: 'deg', min: 0, max: 5, help: 'standard deviation of the per-position rotation about the vertical' },
  leaves_per_tip: { type: 'number', default: 0, unit: '1', min: 0, max: 50, integer: true, help: 'leaf discs near every tip (0 = leaf-off)' },
  leaf_radius_m: { type: 'number', default: 0.03, unit: 'm', min: 0.005, max: 0.2, help: 'radius of a leaf disc' },
});

export type SimulateOptions = OptionValues<typeof simulateOptions.specs>;

/** Matching of reconstructed segments to true ones. */
export const scoreOptions = defineOptions('score', 'compare a reconstructed network with the truth of a virtual scan', {
  sample_spacing_m: { type: 'number', default: 0.02, unit: 'm', min: 0.001, max: 1, help: 'spacing of the sample points along each true axis' },
  match_radius_factor: { type: 'number', default: 1.5, unit: '1', min: 0.1, max: 20, help: 'a sample matches a reconstructed axis within this × the true radius …' },
  match_min_distance_m: { type: 'number', default: 0.02, unit: 'm', min: 0, max: 1, help: '… or within this distance, whichever is larger' },
  match_max_angle_deg: { type: 'number', default: 35, unit: 'deg', min: 1, max: 90, help: 'largest angle between true and reconstructed axis directions for a match' },
  furcation_tolerance_m: { type: 'number', default: 0.1, unit: 'm', min: 0.001, max: 5, help: 'a true furcation is found when a reconstructed one lies within max(this, 2 × parent radius)' },
});

export type ScoreOptions = OptionValues<typeof scoreOptions.specs>;
