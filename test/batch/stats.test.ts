import { describe, expect, it } from 'vitest';
import {
  bootstrapMeanDifference,
  incompleteBeta,
  linearFit,
  logGamma,
  mean,
  percentileInterval,
  permutationTest,
  quantileSorted,
  sampleSd,
  studentTCdf,
  studentTQuantile,
  tInterval,
} from '../../core/batch/stats.js';

// Anscombe (1973) "Graphs in statistical analysis", Am. Stat. 27:17–21, data set I. Published fit:
// y = 3.00 + 0.500 x, r² = 0.67; standard errors 0.118 (slope) and 1.125 (intercept) as widely
// reproduced (values to 4 digits from memory, agreeing with scipy.stats.linregress run beside this
// test: slope 0.500091, intercept 3.000091, se 0.117906 / 1.124747).
const ANSCOMBE_X = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
const ANSCOMBE_Y = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];

describe('mean', () => {
  it('averages the values and gives NaN for an empty list', () => {
    expect(mean([1, 2, 3, 4])).toBe(2.5);
    expect(mean([])).toBeNaN();
  });
});

describe('sampleSd', () => {
  it('uses the n − 1 denominator (sd of 2,4,4,4,5,5,7,9 is √(32/7), a textbook example)', () => {
    expect(sampleSd([2, 4, 4, 4, 5, 5, 7, 9])).toBeCloseTo(Math.sqrt(32 / 7), 14);
    expect(sampleSd([1])).toBeNaN();
  });
});

describe('logGamma', () => {
  it('matches Γ(5) = 24 and Γ(1/2) = √π (analytic)', () => {
    expect(logGamma(5)).toBeCloseTo(Math.log(24), 12);
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12);
    expect(logGamma(0.1)).toBeCloseTo(Math.log(9.513507698668732), 10); // Γ(0.1), from memory (Abramowitz & Stegun table 6.1 range)
  });
});

describe('incompleteBeta', () => {
  it('equals the closed forms I_x(a,1) = x^a and I_x(1,b) = 1 − (1 − x)^b (analytic)', () => {
    for (const x of [0.05, 0.3, 0.7, 0.95]) {
      expect(incompleteBeta(x, 3.5, 1)).toBeCloseTo(Math.pow(x, 3.5), 12);
      expect(incompleteBeta(x, 1, 2.5)).toBeCloseTo(1 - Math.pow(1 - x, 2.5), 12);
    }
  });
  it('is one half at x = 1/2 for a = b (symmetry)', () => {
    expect(incompleteBeta(0.5, 7, 7)).toBeCloseTo(0.5, 12);
  });
});

describe('studentTCdf', () => {
  it('equals the Cauchy CDF 1/2 + atan(t)/π for one degree of freedom (analytic)', () => {
    for (const t of [-3, -0.5, 0.2, 1, 4]) expect(studentTCdf(t, 1)).toBeCloseTo(0.5 + Math.atan(t) / Math.PI, 12);
  });
});

describe('studentTQuantile', () => {
  it('reproduces the two-sided 95 % critical values of the t table (NIST/SEMATECH e-Handbook §1.3.6.7.2)', () => {
    const table: [number, number][] = [
      [1, 12.706],
      [2, 4.303],
      [5, 2.571],
      [9, 2.262],
      [10, 2.228],
      [30, 2.042],
      [100, 1.984],
    ];
    for (const [df, t] of table) expect(studentTQuantile(0.975, df)).toBeCloseTo(t, 3);
  });
  it('is antisymmetric around p = 1/2', () => {
    expect(studentTQuantile(0.05, 7)).toBeCloseTo(-studentTQuantile(0.95, 7), 10);
    expect(studentTQuantile(0.95, 10)).toBeCloseTo(1.812, 3); // one-sided 95 %, same NIST table
  });
});

describe('tInterval', () => {
  it('is mean ± t(0.975, n−1)·sd/√n with the table value for n = 10 (t = 2.262, NIST table)', () => {
    const v = [2.1, 2.5, 1.9, 2.8, 2.2, 2.4, 2.0, 2.6, 2.3, 2.7];
    const r = tInterval(v, 0.95);
    const half = (2.262 * sampleSd(v)) / Math.sqrt(10);
    expect(r.ci[0]).toBeCloseTo(mean(v) - half, 3);
    expect(r.ci[1]).toBeCloseTo(mean(v) + half, 3);
  });
  it('gives no interval for a single value', () => {
    expect(tInterval([2], 0.95).ci[0]).toBeNaN();
  });
});

describe('linearFit', () => {
  it('reproduces Anscombe data set I (intercept 3.0001, slope 0.5001, SEs 1.1247 / 0.1179, r² 0.6665)', () => {
    const f = linearFit(ANSCOMBE_X, ANSCOMBE_Y, 0.95);
    expect(f.intercept).toBeCloseTo(3.0001, 4);
    expect(f.slope).toBeCloseTo(0.5001, 4);
    expect(f.interceptSe).toBeCloseTo(1.1247, 4);
    expect(f.slopeSe).toBeCloseTo(0.1179, 4);
    expect(f.rSquared).toBeCloseTo(0.6665, 4);
    // 95 % interval of the slope with 9 df: 0.5001 ± 2.262·0.1179 (NIST t table)
    expect(f.slopeCi[0]).toBeCloseTo(0.5001 - 2.262 * 0.1179, 3);
  });
  it('recovers an exact line with zero residual (analytic)', () => {
    const x = [0, 1, 2, 3, 4];
    const f = linearFit(x, x.map((v) => -1.5 + 0.25 * v), 0.95);
    expect(f.intercept).toBeCloseTo(-1.5, 14);
    expect(f.slope).toBeCloseTo(0.25, 14);
    expect(f.residualSd).toBeCloseTo(0, 12);
  });
});

describe('permutationTest', () => {
  it('approaches the exact permutation p-value 2/20 = 0.1 for {1,2,3} vs {4,5,6} (enumeration of C(6,3) = 20 splits)', () => {
    const p = permutationTest([1, 2, 3], [4, 5, 6], 20000, 7);
    // binomial sd of the estimate √(0.1·0.9/20000) ≈ 0.0021; 4 sd tolerance
    expect(Math.abs(p - 0.1)).toBeLessThan(0.0085);
  });
  it('gives p near 1 when the groups are the same values and repeats exactly with the same seed', () => {
    expect(permutationTest([1, 2, 3], [1, 2, 3], 999, 3)).toBe(1);
    const a = [2.1, 2.4, 2.2, 2.6];
    const b = [2.9, 2.5, 3.1];
    expect(permutationTest(a, b, 999, 11)).toBe(permutationTest(a, b, 999, 11));
  });
});

describe('bootstrapMeanDifference', () => {
  it('collapses to the exact difference when each group is constant', () => {
    const [lo, hi] = bootstrapMeanDifference([2, 2, 2], [2.5, 2.5], 500, 0.95, 1);
    expect(lo).toBeCloseTo(-0.5, 14);
    expect(hi).toBeCloseTo(-0.5, 14);
  });
  it('brackets the observed difference of two spread-out groups', () => {
    const a = [2.0, 2.2, 2.4, 2.6, 2.8];
    const b = [2.9, 3.1, 3.3, 3.5];
    const [lo, hi] = bootstrapMeanDifference(a, b, 2000, 0.95, 5);
    const d = mean(a) - mean(b);
    expect(lo).toBeLessThan(d);
    expect(hi).toBeGreaterThan(d);
  });
});

describe('percentileInterval', () => {
  it('takes the 2.5 % and 97.5 % type-7 quantiles (Hyndman & Fan 1996) of 0…100', () => {
    const v = Array.from({ length: 101 }, (_, i) => 100 - i);
    const [lo, hi] = percentileInterval(v, 0.95);
    expect(lo).toBeCloseTo(2.5, 12);
    expect(hi).toBeCloseTo(97.5, 12);
  });
});

describe('quantileSorted', () => {
  it('interpolates linearly between order statistics (R type 7: median of 1,2,3,4 is 2.5)', () => {
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileSorted([1, 2, 3, 4], 1)).toBe(4);
  });
});
