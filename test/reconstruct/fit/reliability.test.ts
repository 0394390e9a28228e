import { describe, expect, it } from 'vitest';
import { assessReliability, DEFAULT_RELIABILITY_RULE, type ReliabilityInput } from '../../../core/reconstruct/fit/reliability.js';
import { fitCylinder } from '../../../core/reconstruct/fit/cylinder-fit.js';
import { sampleCylinder } from '../../../core/reconstruct/fit/sample-cylinder.js';

// The thresholds are xylemap's own documented rule (core/reconstruct/fit/reliability.ts); these
// tests pin each clause of it, and tie it to real fits of known cylinders.
const GOOD: ReliabilityInput = {
  radiusM: 0.05,
  radiusSeM: 0.0005,
  rmseM: 0.002,
  arcCoverage: 0.75,
  pointCount: 200,
  inlierCount: 190,
  converged: true,
};

describe('assessReliability', () => {
  it('accepts a well-covered, well-fitted segment with an empty reason', () => {
    expect(assessReliability(GOOD, { rangeNoiseM: 0.002 })).toEqual({ reliable: true, reason: '', reasons: [] });
  });

  it('names each failing clause with its reason code, the first one as the reason', () => {
    const rule = { rangeNoiseM: 0.002 };
    expect(assessReliability({ ...GOOD, inlierCount: 8, pointCount: 10 }, rule).reason).toBe('few_points');
    expect(assessReliability({ ...GOOD, converged: false }, rule).reason).toBe('not_converged');
    expect(assessReliability({ ...GOOD, arcCoverage: 4 / 16 }, rule).reason).toBe('thin_arc');
    expect(assessReliability({ ...GOOD, radiusM: 0.0035, radiusSeM: 0.0005, rmseM: 0.001 }, rule).reason).toBe('below_noise');
    expect(assessReliability({ ...GOOD, rmseM: 0.02 }, rule).reason).toBe('poor_fit');
    expect(assessReliability({ ...GOOD, radiusSeM: 0.02 }, rule).reason).toBe('poor_fit');
    expect(assessReliability({ ...GOOD, inlierCount: 90 }, rule).reason).toBe('poor_fit');
    const many = assessReliability({ ...GOOD, inlierCount: 5, converged: false, arcCoverage: 0.1 }, rule);
    expect(many.reasons).toEqual(['few_points', 'not_converged', 'thin_arc', 'poor_fit']);
  });

  it('calls a radius below the point spacing below_noise even when the range noise is unknown', () => {
    expect(assessReliability({ ...GOOD, radiusM: 0.004, radiusSeM: 0.0001, rmseM: 0.0005 }, { pointSpacingM: 0.005 }).reason).toBe('below_noise');
    expect(assessReliability({ ...GOOD, radiusM: 0.004, radiusSeM: 0.0001, rmseM: 0.0005 }).reliable).toBe(true);
  });

  it('does not call an RMSE poor_fit when the range noise explains it', () => {
    // rmse 0.3r but below 2σ of range noise: scatter is noise, not a wrong shape
    const f = { ...GOOD, radiusM: 0.02, radiusSeM: 0.0005, rmseM: 0.007 };
    expect(assessReliability(f, { rangeNoiseM: 0.004 }).reliable).toBe(true);
    expect(assessReliability(f, { rangeNoiseM: 0.001 }).reason).toBe('poor_fit');
  });

  it('never calls a missing fit or NaN values reliable', () => {
    expect(assessReliability(null).reason).toBe('few_points');
    expect(assessReliability({ ...GOOD, radiusM: NaN }).reliable).toBe(false);
    expect(assessReliability({ ...GOOD, radiusSeM: NaN }).reliable).toBe(false);
    expect(assessReliability({ ...GOOD, arcCoverage: NaN }).reliable).toBe(false);
  });

  it('flags real fits: a 60° arc is thin_arc, a 3 mm twig with 2 mm noise is below_noise, a full arc is reliable', () => {
    const noise = 0.002;
    const fitOf = (radiusM: number, arcRad: number, noiseM: number) => {
      const s = sampleCylinder({ n: 200, radiusM, lengthM: 0.2, arcRad, noiseM, seed: 4 });
      return fitCylinder(s.x, s.y, s.z, s.indices, { rangeNoiseM: noiseM, initialAxis: [0, 0, 1] });
    };
    expect(assessReliability(fitOf(0.05, 2 * Math.PI, noise), { rangeNoiseM: noise }).reliable).toBe(true);
    expect(assessReliability(fitOf(0.05, Math.PI / 3, noise), { rangeNoiseM: noise }).reasons).toContain('thin_arc');
    expect(assessReliability(fitOf(0.003, 2 * Math.PI, noise), { rangeNoiseM: noise }).reasons).toContain('below_noise');
    // the default needs 5 of 16 sectors: a 60° arc can never reach it
    expect(DEFAULT_RELIABILITY_RULE.minArcCoverage).toBeGreaterThan(4 / 16);
  });
});
