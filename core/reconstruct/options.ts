import { defineOptions, type OptionValues } from '../options/declare.js';

/**
 * Options of the reconstruction stage: geodesic bands, band clusters, pruning, segment length,
 * cylinder fitting and radius correction. Declared once; CLI flags and the YAML `reconstruct:`
 * block are built from this.
 */
export const reconstructOptions = defineOptions('reconstruct', 'Split the tree into geodesic bands and band clusters, follow branches, fit one cylinder per segment.', {
  band_width_ratio: { type: 'number', default: 1, unit: '1', min: 0.1, max: 10, help: 'width of the next geodesic band as a multiple of the local branch radius' },
  band_min_m: { type: 'number', default: 0.03, unit: 'm', min: 0.002, max: 1, help: 'narrowest geodesic band' },
  band_max_m: { type: 'number', default: 0.25, unit: 'm', min: 0.005, max: 5, help: 'widest geodesic band' },
  segment_length_ratio: { type: 'number', default: 4, unit: '1', min: 0.5, max: 50, help: 'target segment length as a multiple of its radius' },
  segment_min_m: { type: 'number', default: 0.08, unit: 'm', min: 0.005, max: 5, help: 'shortest target segment length' },
  segment_max_m: { type: 'number', default: 0.6, unit: 'm', min: 0.01, max: 10, help: 'longest target segment length' },
  prune_length_ratio: { type: 'number', default: 2, unit: '1', min: 0, max: 50, help: 'side shoots shorter than this multiple of the parent radius are noise, not branches' },
  prune_min_length_m: { type: 'number', default: 0.06, unit: 'm', min: 0, max: 5, help: 'side shoots shorter than this are noise, not branches' },
  range_noise_m: { type: 'number', default: 0.003, unit: 'm', min: 0, max: 0.1, help: 'range noise of the scanner (1 sigma), used by the robust fit and the reliability rule' },
  min_fit_points: { type: 'number', default: 10, unit: '1', min: 6, max: 100000, integer: true, help: 'segments with fewer points get a radius from their neighbours, not a fit' },
  correct_radii: { type: 'boolean', default: false, help: 'replace radii of unreliable segments by the taper model (recorded in radius_correction); off by default: it raised radius and volume errors on the validation suite' },
});

export type ReconstructOptionValues = OptionValues<typeof reconstructOptions.specs>;
