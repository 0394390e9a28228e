/**
 * Cylinder-fit maths for reconstruction: eigen solver, PCA, circle and cylinder fits, reliability,
 * radius correction.
 *
 * Typical use by the pipeline, per network:
 *   1. per segment: `fit = fitCylinder(x, y, z, points, { initialAxis, rangeNoiseM })`;
 *      `{ reliable, reason } = assessReliability(fit, reliabilityRuleOf(opts, pointSpacingM))`;
 *      store radiusM = radiusFitM = fit.radiusM, radiusSeM, fitRmseM, arcCoverage, pointCount.
 *   2. once the parent links exist (branch ids help but are derived if all equal):
 *      `{ segments, summary } = correctRadii(segments, SegmentTree.fromNetwork(segments), correctionOptionsOf(opts))`.
 */
export { eigenSymmetric3 } from './eigen3.js';
export { pca, shapeFeatures, type PcaResult } from './pca.js';
export {
  fitCircleTaubin,
  fitCirclePratt,
  fitCircleTaubinWeighted,
  refineCircleGeometric,
  type Circle,
} from './circle-fit.js';
export {
  fitCylinder,
  ARC_SECTORS,
  MIN_CYLINDER_POINTS,
  INLIER_SIGMAS,
  type CylinderFit,
  type CylinderFitOptions,
} from './cylinder-fit.js';
export type { RobustLoss } from './robust.js';
export {
  assessReliability,
  DEFAULT_RELIABILITY_RULE,
  type Reliability,
  type ReliabilityInput,
  type ReliabilityReason,
  type ReliabilityRule,
} from './reliability.js';
export {
  correctRadii,
  type RadiusCorrectionCode,
  type RadiusCorrectionOptions,
  type RadiusCorrectionResult,
  type RadiusCorrectionSummary,
} from './radius-correction.js';
export { fitRobustLine, type RobustLine } from './robust-line.js';
export { fitOptions, reliabilityRuleOf, correctionOptionsOf, type FitOptionValues } from './options.js';
