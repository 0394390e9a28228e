import { describe, expect, it } from 'vitest';
import { trendTest } from '../../core/scaling/trend.js';
import { createRandom } from '../../core/util/random.js';

describe('trendTest', () => {
  it('gives ρ = 1 and the smallest attainable permutation p for a perfectly increasing relation', () => {
    // With 10 distinct values only 1 of 10! orderings reaches |ρ| = 1 again; p = 1/(P + 1) (Phipson & Smyth 2010).
    const x = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    const t = trendTest('order', x, x.map((v) => v * v), 999, createRandom(1));
    expect(t.spearman_rho).toBeCloseTo(1, 12);
    expect(t.p_value).toBeLessThanOrEqual(2 / 1000);
  });

  it('returns no correlation when the exponent is constant', () => {
    expect(trendTest('order', [1, 2, 3], [2, 2, 2], 99, createRandom(1)).spearman_rho).toBeNull();
  });
});
