import { describe, expect, it } from 'vitest';
import { pca, shapeFeatures } from '../../../core/reconstruct/fit/pca.js';
import { createRandom } from '../../../core/util/random.js';

describe('pca', () => {
  it('finds the direction of a line segment and its variance L²/12', () => {
    // Uniform distribution on [−L/2, L/2] has variance L²/12 (any statistics handbook).
    const n = 20001;
    const L = 2;
    const d = [1 / 3, 2 / 3, 2 / 3];
    const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const t = -L / 2 + (L * i) / (n - 1);
      x[i] = 10 + d[0] * t;
      y[i] = -4 + d[1] * t;
      z[i] = 7 + d[2] * t;
    }
    const r = pca(x, y, z, Int32Array.from({ length: n }, (_, i) => i))!;
    // discrete uniform grid variance: (L²/12)(n+1)/(n−1)
    expect(r.values[2]).toBeCloseTo(((L * L) / 12) * ((n + 1) / (n - 1)), 10);
    expect(r.values[0]).toBeLessThan(1e-20);
    expect(Math.abs(r.vectors[2][0] * d[0] + r.vectors[2][1] * d[1] + r.vectors[2][2] * d[2])).toBeCloseTo(1, 12);
    expect(r.centroid[0]).toBeCloseTo(10, 12);
  });

  it('keeps millimetre spread exact at projected-frame offsets of 5e6 m', () => {
    // Two-pass covariance avoids cancellation (Chan, Golub & LeVeque 1983, Am. Stat. 37:242).
    const rnd = createRandom(5);
    const n = 1000;
    const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
    const xs = new Float64Array(n), ys = new Float64Array(n), zs = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      xs[i] = 0.003 * rnd.normal();
      ys[i] = 0.001 * rnd.normal();
      zs[i] = 0.002 * rnd.normal();
      x[i] = 5e6 + xs[i];
      y[i] = 4e6 + ys[i];
      z[i] = 300 + zs[i];
    }
    const idx = Int32Array.from({ length: n }, (_, i) => i);
    const far = pca(x, y, z, idx)!;
    const near = pca(xs, ys, zs, idx)!;
    for (let k = 0; k < 3; k++) expect(Math.abs(far.values[k] - near.values[k]) / near.values[k]).toBeLessThan(1e-6);
  });

  it('uses only the listed indices and honours weights', () => {
    // Weighted mean definition: Σ w p / Σ w.
    const x = [0, 1, 2, 100], y = [0, 0, 0, 100], z = [0, 0, 0, 100];
    const r = pca(x, y, z, [0, 1, 2], [1, 1, 2, 1])!;
    expect(r.centroid[0]).toBeCloseTo((0 + 1 + 4) / 4, 14);
    expect(r.count).toBe(3);
  });

  it('returns null for no points or zero total weight', () => {
    // Degenerate input rule of the fit module: null, never NaN.
    expect(pca([1], [1], [1], [])).toBeNull();
    expect(pca([1, 2], [1, 2], [1, 2], [0, 1], [0, 0])).toBeNull();
  });
});

describe('shapeFeatures', () => {
  it('gives linearity 1 for a line, planarity 1 for a plane, scattering 1 for a sphere', () => {
    // Definitions of Demantké et al. 2011 (ISPRS Archives XXXVIII-5/W12); they sum to 1.
    const o = new Float64Array(3);
    shapeFeatures(0, 0, 1, o);
    expect(Array.from(o)).toEqual([1, 0, 0]);
    shapeFeatures(0, 1, 1, o);
    expect(Array.from(o)).toEqual([0, 1, 0]);
    shapeFeatures(1, 1, 1, o);
    expect(Array.from(o)).toEqual([0, 0, 1]);
    shapeFeatures(0.1, 0.3, 0.9, o);
    expect(o[0] + o[1] + o[2]).toBeCloseTo(1, 14);
  });

  it('returns zeros when the largest value is not > 0', () => {
    // Degenerate neighbourhood (one repeated point): no shape.
    const o = new Float64Array(3).fill(9);
    shapeFeatures(0, 0, 0, o);
    expect(Array.from(o)).toEqual([0, 0, 0]);
    shapeFeatures(NaN, NaN, NaN, o);
    expect(Array.from(o)).toEqual([0, 0, 0]);
  });
});
