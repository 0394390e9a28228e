import { describe, expect, it } from 'vitest';
import { exponentVariance, solveExponent } from '../../core/scaling/solve.js';
import { createRandom } from '../../core/util/random.js';

const sumPow = (r0: number, ri: number[], a: number) => ri.reduce((s, r) => s + (r / r0) ** a, 0);

describe('solveExponent', () => {
  it('recovers da Vinci\'s a = 2 for two children of radius r0/√2 (area preserved: 2·(1/2) = 1)', () => {
    // da Vinci's rule as stated by Eloy 2011, PRL 107:258101: Σ r_i² = r_0².
    const s = solveExponent(0.2, [0.2 / Math.SQRT2, 0.2 / Math.SQRT2]);
    expect(s.status).toBe('solved');
    expect(s.exponent).toBeCloseTo(2, 12);
  });

  it('recovers Murray\'s a = 3 for two children of radius r0·2^(-1/3)', () => {
    // Murray 1926, PNAS 12:207: r_0³ = r_1³ + r_2³.
    const r = 0.1 * 2 ** (-1 / 3);
    expect(solveExponent(0.1, [r, r]).exponent).toBeCloseTo(3, 12);
  });

  it('recovers exact exponents for asymmetric and three-way furcations to 1e-12', () => {
    for (const a of [1.2, 1.8, 2.5, 3.3, 7]) {
      for (const shares of [[0.7, 0.3], [0.5, 0.3, 0.2], [0.9, 0.05, 0.05]]) {
        const r0 = 0.37;
        const s = solveExponent(r0, shares.map((w) => r0 * w ** (1 / a)));
        expect(s.status).toBe('solved');
        expect(Math.abs(s.exponent - a)).toBeLessThan(1e-12 * a);
      }
    }
  });

  it('classifies children jointly thinner than the parent and still returns their root ≤ 1', () => {
    const s = solveExponent(1, [0.4, 0.5]);
    expect(s.status).toBe('children_thinner');
    expect(s.exponent).toBeLessThanOrEqual(1);
    expect(sumPow(1, [0.4, 0.5], s.exponent)).toBeCloseTo(1, 12);
  });

  it('classifies a child at least as thick as the parent as having no solution', () => {
    const s = solveExponent(0.1, [0.1, 0.05]);
    expect(s.status).toBe('child_thicker');
    expect(Number.isNaN(s.exponent)).toBe(true);
  });

  it('flags roots above the bracket and finds them when the bracket is widened', () => {
    // 2·0.99^a = 1 → a = ln 2 / −ln 0.99 ≈ 68.97 (closed form)
    expect(solveExponent(1, [0.99, 0.99]).status).toBe('above_range');
    expect(solveExponent(1, [0.99, 0.99], 100).exponent).toBeCloseTo(Math.log(2) / -Math.log(0.99), 9);
  });

  it('rejects non-positive or NaN radii and single children', () => {
    expect(() => solveExponent(0, [0.1, 0.1])).toThrow(/must be > 0/);
    expect(() => solveExponent(1, [NaN, 0.1])).toThrow(/must be > 0/);
    expect(() => solveExponent(1, [0.5])).toThrow(/at least 2/);
  });
});

describe('exponentVariance', () => {
  it('matches the Monte Carlo variance of the solved exponent for small radius errors', () => {
    // Delta method (first-order propagation) against simulation; the two agree when errors are small.
    const r0 = 0.1;
    const ri = [0.08, 0.06];
    const a = solveExponent(r0, ri).exponent;
    const se = 0.001;
    const predicted = exponentVariance(a, r0, se, ri, [se, se]);
    const rng = createRandom(11);
    let s = 0;
    let s2 = 0;
    const n = 20000;
    for (let k = 0; k < n; k++) {
      const v = solveExponent(r0 + se * rng.normal(), [ri[0] + se * rng.normal(), ri[1] + se * rng.normal()]).exponent;
      s += v;
      s2 += v * v;
    }
    const empirical = s2 / n - (s / n) ** 2;
    expect(Math.abs(empirical / predicted - 1)).toBeLessThan(0.05);
  });
});
