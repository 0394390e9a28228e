import { describe, expect, it } from 'vitest';
import { huberLocation, madSigma, medianInPlace, olsLine, quantileSorted, ranks, spearman } from '../../core/scaling/stats.js';

// Reference values computed with numpy 2.4 / scipy 1.17 on this machine (np.percentile default,
// scipy.stats.median_abs_deviation(scale='normal'), scipy.stats.spearmanr, scipy.stats.linregress).
describe('quantileSorted', () => {
  it('interpolates like numpy.percentile (Hyndman & Fan type 7)', () => {
    const s = [1, 1, 2, 3, 4, 5, 6, 9];
    expect(quantileSorted(s, 0.25)).toBeCloseTo(1.75, 12);
    expect(quantileSorted(s, 0.5)).toBeCloseTo(3.5, 12);
    expect(quantileSorted(s, 0.9)).toBeCloseTo(6.9, 12);
  });
});

describe('madSigma', () => {
  it('matches scipy median_abs_deviation with normal scaling', () => {
    expect(madSigma([3, 1, 4, 1, 5, 9, 2, 6])).toBeCloseTo(2.965204437011204, 3);
  });
});

describe('huberLocation', () => {
  it('stays near the bulk of the data when one value is wild (robustness, Huber 1964)', () => {
    const v = [2.0, 2.1, 1.9, 2.05, 1.95, 2.02, 50];
    const mean = v.reduce((a, b) => a + b, 0) / v.length;
    expect(Math.abs(huberLocation(v) - 2)).toBeLessThan(0.1);
    expect(mean).toBeGreaterThan(8);
  });

  it('equals the mean of symmetric data', () => {
    expect(huberLocation([1, 2, 3, 4, 5])).toBeCloseTo(3, 12);
  });
});

describe('ranks', () => {
  it('gives tied values their average rank', () => {
    expect(Array.from(ranks([10, 20, 20, 5]))).toEqual([2, 3.5, 3.5, 1]);
  });
});

describe('spearman', () => {
  it('matches scipy.stats.spearmanr with ties', () => {
    const x = [1, 2, 2, 3, 4, 5, 5, 5, 6, 7];
    const y = [2.1, 1.9, 2.5, 2.4, 2.2, 2.8, 3.0, 2.6, 2.9, 3.3];
    expect(spearman(x, y)).toBeCloseTo(0.880104160502229, 12);
  });
});

describe('olsLine', () => {
  it('matches scipy.stats.linregress on a log–log example', () => {
    const f = olsLine([1, 2, 4, 8, 16].map(Math.log), [0.1, 0.13, 0.2, 0.26, 0.41].map(Math.log));
    expect(f.slope).toBeCloseTo(0.5071247819461442, 12);
    expect(f.intercept).toBeCloseTo(-2.3412073458371125, 12);
    expect(f.r2).toBeCloseTo(0.9958112042423366 ** 2, 12);
  });
});

describe('medianInPlace', () => {
  it('agrees with the sorted-copy median on seeded random buffers of odd and even length', () => {
    // Definition of the sample median (middle order statistic, mean of the two middle ones).
    let seed = 7;
    const next = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (const n of [1, 2, 3, 10, 11, 100, 101]) {
      const values = Array.from({ length: n }, () => Math.floor(next() * 20));
      const sorted = [...values].sort((x, y) => x - y);
      const expected = n % 2 ? sorted[(n - 1) / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
      expect(medianInPlace(Float64Array.from([...values, 99, 99]), n)).toBe(expected);
    }
  });
});
