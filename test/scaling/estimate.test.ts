import { describe, expect, it } from 'vitest';
import { annotateNetwork } from '../../core/topology/annotate.js';
import { analyseScaling } from '../../core/scaling/analyse.js';
import { combineRadius, evaluateFurcations, exponentIntervals, medianValue, pooledExponent } from '../../core/scaling/estimate.js';
import { collectFurcations } from '../../core/scaling/furcation-set.js';
import { scalingOptions } from '../../core/scaling/options.js';
import { exactExponentNetwork, withRadiusNoise } from '../../core/scaling/synthetic.js';
import { createRandom } from '../../core/util/random.js';

const opts = scalingOptions.resolve({ min_radius_m: 0.001 });

function prepared(network: ReturnType<typeof exactExponentNetwork>) {
  const set = collectFurcations(annotateNetwork(network), opts);
  const used = evaluateFurcations(set, opts.min_radius_m, opts.exponent_max).filter((f) => f.status === 'solved');
  return { set, used };
}

describe('combineRadius', () => {
  it('takes the median of the window, the mean for two, and carries radii to the joint by e^(rate·u)', () => {
    const radii = [0.1, 0.3, 0.2, 0.9];
    expect(combineRadius([0, 1, 2], radii)).toBe(0.2);
    expect(combineRadius([0, 2], radii)).toBeCloseTo(0.15, 15);
    expect(combineRadius([3], radii, [0.5], Math.log(0.25))).toBeCloseTo(0.45, 15);
  });
});

describe('pooledExponent', () => {
  it('returns the common root when every furcation has the same exact exponent', () => {
    // Σ q^a = 1 at every furcation → each residual is 0 at a, the least-squares minimum.
    for (const a of [1.7, 2.2, 3.1]) {
      const ratios = [0.5, 0.7, 0.9].map((w) => Float64Array.from([w, 1 - w], (s) => Math.log(s) / a));
      expect(Math.abs(pooledExponent(ratios, 50, 2) - a)).toBeLessThan(1e-9);
    }
  });

  it('returns the root itself for a single furcation', () => {
    const q = Float64Array.from([0.8, 0.6], Math.log);
    const a = pooledExponent([q], 50, 2);
    expect(0.8 ** a + 0.6 ** a).toBeCloseTo(1, 12);
  });
});

describe('exponentIntervals', () => {
  it('gives a zero-width interval at the exact exponent when radii carry no error', () => {
    const { set, used } = prepared(exactExponentNetwork({ exponent: 2.4, depth: 4, leaderShare: 0.65 }));
    const r = exponentIntervals(set, used, 200, 0.95, 50, createRandom(1));
    expect(Math.abs(r.estimate - 2.4)).toBeLessThan(1e-9);
    expect(Math.abs(r.ci[0]! - 2.4)).toBeLessThan(1e-9);
    expect(Math.abs(r.ci[1]! - 2.4)).toBeLessThan(1e-9);
  });

  it('is repeatable: the same seed gives the same interval', () => {
    const { set, used } = prepared(withRadiusNoise(exactExponentNetwork({ exponent: 2.4, depth: 4 }), 0.05, 3));
    const a = exponentIntervals(set, used, 200, 0.95, 50, createRandom(9));
    const b = exponentIntervals(set, used, 200, 0.95, 50, createRandom(9));
    expect(a).toEqual(b);
  });

  it('covers the true exponent in 90–98 % of 200 seeded noisy repetitions (5 % radius noise, SE = noise)', () => {
    // Statistical check of the nominal 95 % level; the band 90–98 % is the acceptance rule of
    // issue 5 (200 repetitions: binomial SD of the coverage ≈ 1.5 %). Fixed seeds, so repeatable.
    const truth = 2.5;
    const net = exactExponentNetwork({ exponent: truth, depth: 5, leaderShare: 0.6, baseRadiusM: 0.3 });
    let median = 0;
    let pooled = 0;
    const reps = 200;
    for (let rep = 0; rep < reps; rep++) {
      const { set, used } = prepared(withRadiusNoise(net, 0.05, 1000 + rep));
      const r = exponentIntervals(set, used, 200, 0.95, 50, createRandom(rep));
      if (r.ci[0]! <= truth && truth <= r.ci[1]!) median++;
      if (r.pooledCi[0]! <= truth && truth <= r.pooledCi[1]!) pooled++;
    }
    expect(median / reps).toBeGreaterThanOrEqual(0.9);
    expect(median / reps).toBeLessThanOrEqual(0.98);
    expect(pooled / reps).toBeGreaterThanOrEqual(0.9);
    expect(pooled / reps).toBeLessThanOrEqual(0.98);
  });
});

describe('medianValue', () => {
  it('keeps a root ≤ 1 as it is and censors a furcation without a root at +∞', () => {
    // Σ q^a is decreasing in a; with q_max ≥ 1 it never falls to 1, so the exponent is "infinite".
    const net = exactExponentNetwork({ exponent: 2, depth: 1, segmentsPerInternode: 1 });
    net.segments[1].radiusM = net.segments[0].radiusM * 1.1;
    const thick = analyseScaling(net, { bootstrap_replicates: 100, permutations: 99, min_radius_m: 0.001 }).furcationRows[0];
    expect(thick.status).toBe('child_thicker');
    net.segments[1].radiusM = net.segments[2].radiusM = net.segments[0].radiusM * 0.4;
    const { summary, furcationRows } = analyseScaling(net, { bootstrap_replicates: 100, permutations: 99, min_radius_m: 0.001 });
    expect(furcationRows[0].status).toBe('children_thinner');
    // 2·0.4^a = 1 → a = ln 2 / ln 2.5 (closed form)
    expect(summary.exponent.estimate!).toBeCloseTo(Math.log(2) / Math.log(2.5), 12);
    expect(medianValue({ status: 'child_thicker', exponent: NaN } as Parameters<typeof medianValue>[0])).toBe(Infinity);
  });
});
