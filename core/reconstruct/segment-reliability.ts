/**
 * Reliability flag of one fitted segment — a stand-in used until the fit stage's own rule
 * (`fit/reliability.ts`) is available; reason codes as in the glossary.
 * Thresholds are common practice, no source: a circle needs points on more than a third of its
 * circumference to pin its radius; a radius within 3 noise σ of zero is noise; residuals above
 * 30 % of the radius mean the points do not lie on one cylinder.
 */
export function segmentReliability(
  fit: { radiusM: number; rmseM: number; arcCoverage: number; pointCount: number; converged: boolean } | null,
  minPoints: number,
  rangeNoiseM: number,
): { reliable: boolean; reason: string } {
  if (!fit || fit.pointCount < minPoints) return { reliable: false, reason: 'few_points' };
  if (!fit.converged) return { reliable: false, reason: 'not_converged' };
  if (fit.radiusM < 3 * rangeNoiseM) return { reliable: false, reason: 'below_noise' };
  if (fit.arcCoverage < 0.35) return { reliable: false, reason: 'thin_arc' };
  if (fit.rmseM > 0.3 * fit.radiusM && fit.rmseM > 2 * rangeNoiseM) return { reliable: false, reason: 'poor_fit' };
  return { reliable: true, reason: '' };
}
