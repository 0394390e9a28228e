import { describe, expect, it } from 'vitest';
import { correctRadii } from '../../../core/reconstruct/fit/radius-correction.js';
import { fitRobustLine } from '../../../core/reconstruct/fit/robust-line.js';
import { refineCircleGeometric, fitCircleTaubin } from '../../../core/reconstruct/fit/circle-fit.js';
import { SegmentTree } from '../../../core/topology/node-tree.js';
import type { Segment } from '../../../core/types/network.js';
import { createRandom } from '../../../core/util/random.js';

/**
 * A two-branch network with an exact geometric taper r(s) = r0·e^(−k s) along each branch,
 * s the distance from the branch base: the analytic truth the taper model must recover.
 * Trunk: 10 segments of 0.5 m from r0 = 0.2 m; branch 1 leaves trunk segment 4 with r0 = 0.05 m,
 * 6 segments of 0.3 m; branch 2 leaves trunk segment 7 with 3 segments of 0.2 m, r0 = 0.03 m.
 */
function taperedNetwork(): { segments: Segment[]; truth: number[] } {
  const segments: Segment[] = [];
  const truth: number[] = [];
  const add = (parentId: number, branchId: number, order: number, s0: number, len: number, r0: number, k: number, z0: number, x0: number) => {
    const id = segments.length;
    const r = r0 * Math.exp(-k * (s0 + len / 2));
    truth.push(r);
    segments.push({
      segmentId: id,
      parentId,
      branchId,
      branchOrder: order,
      strahlerOrder: 1,
      start: [x0, 0, z0],
      end: [x0 + (order ? len : 0), 0, z0 + (order ? 0 : len)],
      radiusM: r,
      radiusSeM: 0.02 * r,
      lengthM: len,
      fitRmseM: 0.001,
      arcCoverage: 1,
      pointCount: 100,
      reliable: true,
      reliabilityReason: '',
    });
    return id;
  };
  let prev = -1;
  for (let j = 0; j < 10; j++) prev = add(prev, 0, 0, j * 0.5, 0.5, 0.2, 0.15, j * 0.5, 0);
  prev = 4;
  for (let j = 0; j < 6; j++) prev = add(prev, 1, 1, j * 0.3, 0.3, 0.05, 0.4, 2.5, j * 0.3);
  prev = 7;
  for (let j = 0; j < 3; j++) prev = add(prev, 2, 1, j * 0.2, 0.2, 0.03, 0.5, 4, j * 0.2);
  return { segments, truth };
}

function run(segments: Segment[], options: Parameters<typeof correctRadii>[2] = {}) {
  return correctRadii(segments, SegmentTree.fromNetwork(segments), options);
}

describe('correctRadii', () => {
  it('replaces unreliable radii by the branch taper line, within 1 % of the analytic taper', () => {
    // Analytic case: log r is exactly linear in s on the reliable segments, so the fitted line is exact.
    const { segments, truth } = taperedNetwork();
    for (const i of [2, 6, 12]) {
      segments[i] = { ...segments[i], radiusM: segments[i].radiusM * 2.5, reliable: false, reliabilityReason: 'thin_arc' };
    }
    const { segments: out, summary } = run(segments);
    for (const i of [2, 6, 12]) {
      expect(out[i].radiusCorrection).toBe('taper_model');
      expect(Math.abs(out[i].radiusM / truth[i] - 1)).toBeLessThan(0.01);
      expect(out[i].radiusFitM).toBeCloseTo(truth[i] * 2.5, 12);
      expect(out[i].reliable).toBe(false);
      expect(out[i].reliabilityReason).toBe('thin_arc');
    }
    expect(summary.byCode.taper_model).toBe(3);
    expect(summary.branchesWithTaperModel).toBe(3);
  });

  it('records radiusFitM on every segment and leaves reliable radii alone when there is no noise', () => {
    // Without range noise the bias term σ²/(2r) is zero: nothing to correct.
    const { segments, truth } = taperedNetwork();
    const { segments: out } = run(segments);
    out.forEach((s, i) => {
      expect(s.radiusFitM).toBe(truth[i]);
      expect(s.radiusM).toBe(truth[i]);
      expect(s.radiusCorrection).toBe('');
    });
  });

  it('removes the noise bias σ²/(2r) of a geometric fit, as a Monte Carlo of noisy circles shows', () => {
    // Taylor expansion √((r+ε_r)² + ε_t²) ≈ r + ε_r + ε_t²/(2r) (derivation in radius-correction.ts);
    // checked against circles fitted to points with isotropic noise.
    const rnd = createRandom(17);
    const r = 0.01;
    const sigma = 0.001;
    let sum = 0;
    const reps = 400;
    for (let k = 0; k < reps; k++) {
      const u = new Float64Array(100), v = new Float64Array(100);
      for (let i = 0; i < 100; i++) {
        const th = rnd.uniform(0, 2 * Math.PI);
        u[i] = r * Math.cos(th) + sigma * rnd.normal();
        v[i] = r * Math.sin(th) + sigma * rnd.normal();
      }
      sum += refineCircleGeometric(u, v, fitCircleTaubin(u, v)!).radius;
    }
    const fitted = sum / reps;
    const bias = (sigma * sigma) / (2 * r);
    // the Monte Carlo mean is r + σ²/(2r) within its standard error (σ/√(100·400) = 5e-6 m)
    expect(Math.abs(fitted - r - bias)).toBeLessThan(2e-5);
    // the rule's correction applied to the fitted mean lands on the true radius
    expect(Math.abs(fitted - (sigma * sigma) / (2 * fitted) - r)).toBeLessThan(0.03 * r);
    const { segments, truth } = taperedNetwork();
    const out = run(segments, { rangeNoiseM: sigma }).segments;
    out.forEach((s, i) => {
      expect(s.radiusCorrection).toBe('noise_bias');
      expect(s.radiusM).toBeCloseTo(truth[i] - (sigma * sigma) / (2 * truth[i]), 12);
      expect(s.radiusFitM).toBe(truth[i]);
    });
  });

  it('subtracts a stated edge inflation and never more than half the radius', () => {
    // Rule 1 of radius-correction.ts: r − σ²/(2r) − edge, capped at r/2.
    const { segments, truth } = taperedNetwork();
    const out = run(segments, { edgeInflationM: 0.001 }).segments;
    expect(out[0].radiusM).toBeCloseTo(truth[0] - 0.001, 12);
    const big = run(segments, { edgeInflationM: 0.05 }).segments;
    expect(big[18].radiusM).toBeCloseTo(Math.max(truth[18] - 0.05, truth[18] / 2), 12);
  });

  it('flags a segment much thicker than its parent as taper_outlier and corrects it', () => {
    // A branch thickens outwards only by fitting error (pipe-model reasoning, Shinozaki et al. 1964).
    const { segments, truth } = taperedNetwork();
    segments[13] = { ...segments[13], radiusM: truth[13] * 1.8 };
    const { segments: out, summary } = run(segments);
    expect(out[13].reliable).toBe(false);
    expect(out[13].reliabilityReason).toBe('taper_outlier');
    expect(out[13].radiusFitM).toBeCloseTo(truth[13] * 1.8, 12);
    expect(Math.abs(out[13].radiusM / truth[13] - 1)).toBeLessThan(0.02);
    expect(summary.taperOutliers).toBeGreaterThanOrEqual(1);
  });

  it('flags a segment far below its branch taper line as taper_outlier', () => {
    // Off the branch's own taper by more than 25 % (rule 2 of radius-correction.ts).
    const { segments, truth } = taperedNetwork();
    segments[5] = { ...segments[5], radiusM: truth[5] * 0.5 };
    const { segments: out } = run(segments);
    expect(out[5].reliabilityReason).toBe('taper_outlier');
    expect(Math.abs(out[5].radiusM / truth[5] - 1)).toBeLessThan(0.01);
  });

  it('falls back to the tree-wide apex allometry on a branch without enough reliable segments', () => {
    // Rule 4: branch 2 keeps one reliable segment, too few for its own taper line.
    const { segments, truth } = taperedNetwork();
    for (const i of [17, 18]) segments[i] = { ...segments[i], radiusM: truth[i] * 3, reliable: false, reliabilityReason: 'below_noise' };
    const { segments: out, summary } = run(segments);
    for (const i of [17, 18]) {
      expect(['apex_allometry', 'parent_cap']).toContain(out[i].radiusCorrection);
      expect(out[i].radiusM).toBeLessThan(truth[i] * 3);
      expect(out[i].radiusM).toBeLessThanOrEqual(out[segments[i].parentId].radiusM);
      expect(out[i].radiusFitM).toBeCloseTo(truth[i] * 3, 12);
    }
    expect(summary.apexAllometry).not.toBeNull();
    expect(summary.apexAllometry!.exponent).toBeGreaterThan(0);
  });

  it('replaces an inflated thin reliable fit but keeps a consistent one', () => {
    // thin_radius_m rule: thin fits above the taper line by > 2 robust σ are inflated (mixed pixels).
    const { segments, truth } = taperedNetwork();
    // 10 % above the line: beyond 2 × the 2 % spread floor, below the 15 % parent-ratio and 25 % outlier limits
    segments[15] = { ...segments[15], radiusM: truth[15] * 1.1 };
    const out = run(segments, { thinRadiusM: 0.05 }).segments;
    expect(out[15].radiusCorrection).toBe('taper_model');
    expect(Math.abs(out[15].radiusM / truth[15] - 1)).toBeLessThan(0.01);
    expect(out[14].radiusCorrection).toBe('');
  });

  it("with mode 'none' keeps every raw radius but still records radiusFitM and taper outliers", () => {
    // Correction must be optional and never hidden (issue 4, item 4).
    const { segments, truth } = taperedNetwork();
    segments[13] = { ...segments[13], radiusM: truth[13] * 1.8 };
    const out = run(segments, { mode: 'none', rangeNoiseM: 0.003 }).segments;
    out.forEach((s, i) => {
      expect(s.radiusM).toBe(segments[i].radiusM);
      expect(s.radiusFitM).toBe(segments[i].radiusM);
      expect(s.radiusCorrection).toBe('');
    });
    expect(out[13].reliabilityReason).toBe('taper_outlier');
  });

  it('does not modify its input and gives the same result when applied twice', () => {
    // Idempotence: the raw fit is read back from radiusFitM.
    const { segments } = taperedNetwork();
    segments[2] = { ...segments[2], radiusM: 0.5, reliable: false, reliabilityReason: 'poor_fit' };
    const copy = JSON.parse(JSON.stringify(segments));
    const once = run(segments, { rangeNoiseM: 0.002 }).segments;
    expect(segments).toEqual(copy);
    const twice = run(once, { rangeNoiseM: 0.002 }).segments;
    expect(twice.map((s) => s.radiusM)).toEqual(once.map((s) => s.radiusM));
  });

  it('derives branches itself when branch ids are not assigned yet', () => {
    // Same analytic taper; every segment says branch 0, so branches must come from the tree shape
    // (main continuation = child with the longest path to a tip).
    const { segments, truth } = taperedNetwork();
    for (let i = 0; i < segments.length; i++) segments[i] = { ...segments[i], branchId: 0 };
    segments[12] = { ...segments[12], radiusM: truth[12] * 2.5, reliable: false, reliabilityReason: 'thin_arc' };
    const out = run(segments).segments;
    expect(out[12].radiusCorrection).toBe('taper_model');
    expect(Math.abs(out[12].radiusM / truth[12] - 1)).toBeLessThan(0.01);
  });

  it('keeps a correction code set upstream when no rule here applies', () => {
    // radiusCorrection must say where every radius came from (issue 4, item 4).
    const { segments } = taperedNetwork();
    segments[3] = { ...segments[3], radiusCorrection: 'cluster_spread' };
    const out = run(segments).segments;
    expect(out[3].radiusCorrection).toBe('cluster_spread');
    expect(run(segments, { mode: 'none' }).segments[3].radiusCorrection).toBe('cluster_spread');
  });

  it('copes with a one-segment network and a NaN radius without producing NaN', () => {
    // Robustness rule of the project: bad numbers never turn into NaN output.
    const { segments } = taperedNetwork();
    const one = run([segments[0]], { rangeNoiseM: 0.002 }).segments;
    expect(one[0].radiusM).toBeGreaterThan(0);
    segments[3] = { ...segments[3], radiusM: NaN, reliable: false, reliabilityReason: 'few_points' };
    const out = run(segments, { rangeNoiseM: 0.002 }).segments;
    expect(Number.isFinite(out[3].radiusM)).toBe(true);
    expect(out[3].radiusCorrection).toBe('taper_model');
    expect(out[3].radiusFitM).toBe(0);
    // applied again, the missing fit stays missing and the model value is not taken for a fit
    const again = run(out, { rangeNoiseM: 0.002 }).segments;
    expect(again[3].radiusFitM).toBe(0);
    expect(again[3].radiusM).toBeCloseTo(out[3].radiusM, 12);
    for (const s of out) {
      expect(Number.isNaN(s.radiusM)).toBe(false);
      expect(Number.isNaN(s.radiusFitM)).toBe(false);
    }
  });

  it('throws when the tree does not match the segments', () => {
    const { segments } = taperedNetwork();
    expect(() => correctRadii(segments.slice(0, 5), SegmentTree.fromNetwork(segments))).toThrow(/segments/);
  });
});

describe('fitRobustLine', () => {
  it('recovers an exact line and ignores a gross outlier', () => {
    // y = 2 − 0.5x exactly, one point off by +3: Tukey weights give it weight 0 (Huber 1981).
    const x = [0, 1, 2, 3, 4, 5, 6];
    const y = x.map((v) => 2 - 0.5 * v);
    y[3] += 3;
    const l = fitRobustLine(x, y, x.map(() => 1))!;
    expect(l.intercept).toBeCloseTo(2, 10);
    expect(l.slope).toBeCloseTo(-0.5, 10);
    expect(l.count).toBe(6);
  });

  it('holds the slope at zero when its sign is forbidden', () => {
    // Taper constraint: radius must not grow towards the tip.
    const x = [0, 1, 2, 3];
    const y = [1, 1.1, 1.2, 1.3];
    const l = fitRobustLine(x, y, [1, 1, 1, 1], -1)!;
    expect(l.slope).toBe(0);
    expect(l.intercept).toBeCloseTo(1.15, 10);
  });

  it('returns null with no points or zero weights', () => {
    expect(fitRobustLine([], [], [])).toBeNull();
    expect(fitRobustLine([1, 2], [1, 2], [0, 0])).toBeNull();
  });
});
