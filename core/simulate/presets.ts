import { XylemapError } from '../util/errors.js';
import type { SimulateOptions } from './options.js';

/**
 * Named starting points of our own for `xylemap simulate --preset NAME`. A preset only overrides
 * some `simulate` options; a config file and flags override the preset.
 */
export const PRESETS: Record<string, { summary: string; options: Partial<SimulateOptions> }> = {
  'park-oak': {
    summary: 'broad open-grown broadleaf, 16 m, DBH ≈ 0.5 m, scanned from four positions at 10 m',
    options: {
      trunk_base_radius_m: 0.26,
      tree_height_m: 16,
      crown_base_fraction: 0.22,
      exponent_a: 2.3,
      leading_share: 0.62,
      three_way_fraction: 0.3,
      twig_radius_m: 0.006,
      lateral_length_ratio: 0.9,
      length_exponent: 0.6,
      crown_shape: 'ellipsoid',
      branch_angle_deg: 55,
      gravitropism_deg_per_m: 2,
      scan_distance_m: 10,
    },
  },
  'spire-spruce': {
    summary: 'narrow excurrent conifer, 18 m, strong leader, whorls of drooping laterals',
    options: {
      trunk_base_radius_m: 0.18,
      tree_height_m: 18,
      crown_base_fraction: 0.12,
      exponent_a: 2.0,
      leading_share: 0.86,
      share_jitter: 0.03,
      three_way_fraction: 0.6,
      twig_radius_m: 0.004,
      lateral_length_ratio: 0.42,
      length_exponent: 0.8,
      crown_shape: 'cone',
      branch_angle_deg: 80,
      branch_angle_jitter_deg: 6,
      leader_deflection_deg: 2,
      gravitropism_deg_per_m: -6,
      scan_distance_m: 9,
    },
  },
  sapling: {
    summary: 'small young tree, 4 m, scanned from three close positions',
    options: {
      trunk_base_radius_m: 0.035,
      tree_height_m: 4,
      crown_base_fraction: 0.3,
      exponent_a: 2.5,
      leading_share: 0.68,
      twig_radius_m: 0.003,
      lateral_length_ratio: 0.8,
      branch_angle_deg: 45,
      scan_positions: 3,
      scan_distance_m: 4,
      ground_radius_m: 5,
      angular_step_deg: 0.06,
    },
  },
};

/** The option overrides of a named preset. @throws XylemapError for an unknown name */
export function presetOptions(name: string): Partial<SimulateOptions> {
  const preset = PRESETS[name];
  if (!preset) {
    throw new XylemapError(`unknown preset "${name}"`, {
      stage: 'simulate',
      option: 'preset',
      hint: `known presets: ${Object.keys(PRESETS).join(', ')}`,
    });
  }
  return { ...preset.options };
}
