/**
 * The reliability flag of a fitted segment: can its radius be trusted as measured?
 *
 * The rule, checked in this order (the first failing test gives the reason code):
 *  1. `few_points`    — fewer than `min_points` inliers. Five parameters from a handful of points
 *                       leave the radius undetermined (common practice, no source).
 *  2. `not_converged` — the least-squares iterations stopped before the step became negligible.
 *  3. `thin_arc`      — arc coverage below `min_arc_coverage` (default 0.3: at least 5 of 16
 *                       sectors, so arcs under 67.5° always fail and arcs over 112.5° always
 *                       pass). On short arcs the radius variance
 *                       grows steeply (roughly as the inverse 4th power of the arc angle for an
 *                       algebraic or geometric circle fit, Chernov 2010, Circular and Linear
 *                       Regression, §6 — from memory), and one-sided scans of branches are where
 *                       radius errors concentrate.
 *  4. `below_noise`   — radius below `below_noise_factor` × the scanner's range noise σ (default
 *                       2), or below the typical point spacing: the points scatter as much as the
 *                       circle is wide, and mixed pixels at the branch edges inflate the fit.
 *                       The factor is low on purpose: on a virtual scan (bench/fit.ts, σ = 2 mm)
 *                       fits of 2–5 mm radii with their true points stayed within −6 % … +4 %
 *                       (10th–90th percentile) after the noise-bias rule, so 5σ = 1 cm would
 *                       have thrown away good fits; poor ones are caught by rules 3 and 5.
 *  5. `poor_fit`      — inlier fraction below `min_inlier_fraction`, RMSE above `max_rmse_ratio` × r
 *                       (when it also exceeds 2 σ of range noise, i.e. noise does not explain it),
 *                       or radius standard error above `max_radius_se_ratio` × r.
 * `taper_outlier` is added later by `correctRadii`, which sees the neighbours along the branch.
 * Thresholds are defaults, not laws; they are options so the scan lab can check them.
 */
export type ReliabilityReason = '' | 'few_points' | 'not_converged' | 'thin_arc' | 'below_noise' | 'poor_fit' | 'taper_outlier';

export interface ReliabilityInput {
  radiusM: number;
  radiusSeM: number;
  rmseM: number;
  arcCoverage: number;
  pointCount: number;
  inlierCount: number;
  converged: boolean;
}

export interface ReliabilityRule {
  /** Scanner range noise (1σ), m; 0 when unknown. */
  rangeNoiseM: number;
  /** Typical distance between neighbouring points on the surface, m; 0 when unknown. */
  pointSpacingM?: number;
  minPoints: number;
  minArcCoverage: number;
  belowNoiseFactor: number;
  maxRmseRatio: number;
  maxRadiusSeRatio: number;
  minInlierFraction: number;
}

/** Defaults of the rule; the `fit` options carry the same numbers for users. */
export const DEFAULT_RELIABILITY_RULE: ReliabilityRule = {
  rangeNoiseM: 0,
  pointSpacingM: 0,
  minPoints: 12,
  minArcCoverage: 0.3,
  belowNoiseFactor: 2,
  maxRmseRatio: 0.3,
  maxRadiusSeRatio: 0.2,
  minInlierFraction: 0.5,
};

export interface Reliability {
  reliable: boolean;
  /** First failing rule, '' when reliable. */
  reason: ReliabilityReason;
  /** Every failing rule, in rule order. */
  reasons: ReliabilityReason[];
}

/**
 * Apply the reliability rule to one fit (a `CylinderFit` or a segment's fit fields).
 *
 * @param fit   the fitted values (radius, SE, RMSE in m; coverage in [0, 1]; counts)
 * @param rule  thresholds; missing fields take `DEFAULT_RELIABILITY_RULE`
 * @example
 * const { reliable, reason } = assessReliability(fit, { rangeNoiseM: 0.002 });
 */
export function assessReliability(fit: ReliabilityInput | null, rule: Partial<ReliabilityRule> = {}): Reliability {
  const r = { ...DEFAULT_RELIABILITY_RULE, ...rule };
  if (!fit) return { reliable: false, reason: 'few_points', reasons: ['few_points'] };
  const reasons: ReliabilityReason[] = [];
  const inliers = fit.inlierCount;
  if (!(inliers >= r.minPoints)) reasons.push('few_points');
  if (!fit.converged) reasons.push('not_converged');
  if (!(fit.arcCoverage >= r.minArcCoverage)) reasons.push('thin_arc');
  const radius = fit.radiusM;
  const noise = r.rangeNoiseM > 0 ? r.rangeNoiseM : 0;
  const spacing = r.pointSpacingM && r.pointSpacingM > 0 ? r.pointSpacingM : 0;
  if (!(radius > r.belowNoiseFactor * noise) || !(radius > spacing)) reasons.push('below_noise');
  const inlierFraction = fit.pointCount > 0 ? inliers / fit.pointCount : 0;
  const rmseBad = fit.rmseM > r.maxRmseRatio * radius && fit.rmseM > 2 * noise;
  const seBad = !(fit.radiusSeM <= r.maxRadiusSeRatio * radius);
  if (!(inlierFraction >= r.minInlierFraction) || rmseBad || seBad || !(radius > 0)) reasons.push('poor_fit');
  return { reliable: reasons.length === 0, reason: reasons[0] ?? '', reasons };
}
