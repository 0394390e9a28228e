import { defineOptions, type OptionValues } from '../../options/declare.js';
import type { ReliabilityRule } from './reliability.js';
import type { RadiusCorrectionOptions } from './radius-correction.js';

/**
 * User-settable options of the cylinder fit, the reliability rule and the radius correction.
 * The reconstruction stage may fold these into its own options; the keys stay the same.
 */
export const fitOptions = defineOptions('fit', 'Cylinder fitting, reliability flags and radius correction of segments.', {
  robust_loss: {
    type: 'enum',
    values: ['tukey', 'huber', 'none'] as const,
    default: 'tukey',
    help: 'robust weighting of the cylinder fit: Tukey biweight, Huber, or plain least squares',
  },
  max_iterations: {
    type: 'number',
    default: 60,
    unit: '1',
    min: 1,
    max: 10000,
    integer: true,
    help: 'Levenberg–Marquardt iterations per cylinder, over all reweighting rounds',
  },
  range_noise_m: {
    type: 'number',
    default: 0.002,
    unit: 'm',
    min: 0,
    max: 0.1,
    help: 'scanner range noise (1 sigma); used by the below_noise rule and the noise-bias correction',
  },
  min_points: {
    type: 'number',
    default: 12,
    unit: '1',
    min: 6,
    max: 100000,
    integer: true,
    help: 'fewest inlier points for a reliable segment (fewer: few_points)',
  },
  min_arc_coverage: {
    type: 'number',
    default: 0.3,
    unit: '1',
    min: 0,
    max: 1,
    help: 'smallest fraction of the circumference with points for a reliable segment (less: thin_arc)',
  },
  below_noise_factor: {
    type: 'number',
    default: 2,
    unit: '1',
    min: 0,
    max: 100,
    help: 'a radius below this many times range_noise_m is below_noise',
  },
  max_rmse_ratio: {
    type: 'number',
    default: 0.3,
    unit: '1',
    min: 0,
    max: 10,
    exclusive: true,
    help: 'fit RMSE above this fraction of the radius (and above 2x range noise) is poor_fit',
  },
  max_radius_se_ratio: {
    type: 'number',
    default: 0.2,
    unit: '1',
    min: 0,
    max: 10,
    exclusive: true,
    help: 'radius standard error above this fraction of the radius is poor_fit',
  },
  min_inlier_fraction: {
    type: 'number',
    default: 0.5,
    unit: '1',
    min: 0,
    max: 1,
    help: 'fewer inliers than this fraction of the segment points is poor_fit',
  },
  radius_correction: {
    type: 'enum',
    values: ['taper', 'none'] as const,
    default: 'taper',
    help: 'replace radii of unreliable or inflated thin segments by the branch taper model (taper) or keep the raw fits (none)',
  },
  thin_radius_m: {
    type: 'number',
    default: 0.01,
    unit: 'm',
    min: 0,
    max: 1,
    help: 'reliable segments thinner than this are also replaced by the taper model when their fit exceeds it',
  },
  edge_inflation_m: {
    type: 'number',
    default: 0,
    unit: 'm',
    min: 0,
    max: 0.05,
    help: 'outward radius bias from mixed pixels at branch edges, subtracted from every fit (calibrate with the scan lab)',
  },
  taper_outlier_ratio: {
    type: 'number',
    default: 1.15,
    unit: '1',
    min: 1,
    max: 10,
    help: 'a segment thicker than this times its parent (beyond 2 standard errors) is a taper_outlier',
  },
  min_taper_segments: {
    type: 'number',
    default: 3,
    unit: '1',
    min: 2,
    max: 1000,
    integer: true,
    help: 'reliable segments a branch needs for its own taper model (else the tree-wide apex allometry is used)',
  },
});

export type FitOptionValues = OptionValues<typeof fitOptions.specs>;

/** The reliability thresholds named in the options. */
export function reliabilityRuleOf(o: FitOptionValues, pointSpacingM = 0): ReliabilityRule {
  return {
    rangeNoiseM: o.range_noise_m,
    pointSpacingM: pointSpacingM,
    minPoints: o.min_points,
    minArcCoverage: o.min_arc_coverage,
    belowNoiseFactor: o.below_noise_factor,
    maxRmseRatio: o.max_rmse_ratio,
    maxRadiusSeRatio: o.max_radius_se_ratio,
    minInlierFraction: o.min_inlier_fraction,
  };
}

/** The radius-correction settings named in the options. */
export function correctionOptionsOf(o: FitOptionValues): RadiusCorrectionOptions {
  return {
    mode: o.radius_correction === 'none' ? 'none' : 'taper',
    rangeNoiseM: o.range_noise_m,
    edgeInflationM: o.edge_inflation_m,
    thinRadiusM: o.thin_radius_m,
    taperOutlierRatio: o.taper_outlier_ratio,
    minTaperSegments: o.min_taper_segments,
  };
}
