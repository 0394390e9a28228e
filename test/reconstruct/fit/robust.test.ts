import { describe, expect, it } from 'vitest';
import {
  HUBER_K,
  MAD_TO_SIGMA,
  TUKEY_C,
  madScale,
  robustPsi,
  robustTerms,
  robustWeights,
  select,
} from '../../../core/reconstruct/fit/robust.js';
import { createRandom } from '../../../core/util/random.js';

describe('robustTerms', () => {
  it("gives Tukey's biweight ψ(d) = d(1 − (d/cσ)²)² and zero beyond c σ", () => {
    // Beaton & Tukey 1974 (Technometrics 16:147); c = 4.685 for 95 % normal efficiency (Holland & Welsch 1977).
    const o = new Float64Array(3);
    robustTerms('tukey', 2, 1, o);
    const b = 1 - (2 / TUKEY_C) ** 2;
    expect(o[0]).toBeCloseTo(b * b, 15);
    expect(o[1]).toBeCloseTo(2 * b * b, 15);
    // ψ' by central difference of ψ
    const h = 1e-6;
    const p = new Float64Array(3), m = new Float64Array(3);
    robustTerms('tukey', 2 + h, 1, p);
    robustTerms('tukey', 2 - h, 1, m);
    expect(o[2]).toBeCloseTo((p[1] - m[1]) / (2 * h), 8);
    robustTerms('tukey', 5, 1, o);
    expect(Array.from(o)).toEqual([0, 0, 0]);
  });

  it("gives Huber's ψ: identity inside k σ, ±k σ outside", () => {
    // Huber 1964 (Ann. Math. Stat. 35:73); k = 1.345 for 95 % normal efficiency.
    const o = new Float64Array(3);
    robustTerms('huber', 1, 1, o);
    expect(Array.from(o)).toEqual([1, 1, 1]);
    robustTerms('huber', -3, 1, o);
    expect(o[0]).toBeCloseTo(HUBER_K / 3, 15);
    expect(o[1]).toBeCloseTo(-HUBER_K, 15);
    expect(o[2]).toBe(0);
    robustTerms('none', 7, 1, o);
    expect(Array.from(o)).toEqual([1, 7, 1]);
  });
});

describe('robustWeights', () => {
  it('matches robustTerms point by point for every loss', () => {
    // The vectorised loop must equal the scalar definition.
    const d = Float64Array.from([-6, -2, -0.5, 0, 0.3, 1.4, 4.9]);
    const w = new Float64Array(d.length);
    const o = new Float64Array(3);
    for (const loss of ['tukey', 'huber', 'none'] as const) {
      robustWeights(loss, d, w, d.length, 1.1);
      d.forEach((di, i) => {
        robustTerms(loss, di, 1.1, o);
        expect(w[i]).toBeCloseTo(o[0], 15);
      });
    }
  });
});

describe('robustPsi', () => {
  it('matches robustTerms point by point for every loss', () => {
    const d = Float64Array.from([-6, -2, -0.5, 0, 0.3, 1.4, 4.9]);
    const psi = new Float64Array(d.length);
    const dpsi = new Float64Array(d.length);
    const o = new Float64Array(3);
    for (const loss of ['tukey', 'huber', 'none'] as const) {
      robustPsi(loss, d, d.length, 0.9, psi, dpsi);
      d.forEach((di, i) => {
        robustTerms(loss, di, 0.9, o);
        expect(psi[i]).toBeCloseTo(o[1], 15);
        expect(dpsi[i]).toBeCloseTo(o[2], 15);
      });
    }
  });
});

describe('madScale', () => {
  it('estimates σ of zero-centred normal residuals (1.4826 · median |d|)', () => {
    // 1/Φ⁻¹(3/4) = 1.4826 makes the MAD consistent for σ (Hampel 1974, JASA 69:383).
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / 0.6744897501960817, 4);
    const rnd = createRandom(2);
    const n = 20001;
    const d = new Float64Array(n);
    for (let i = 0; i < n; i++) d[i] = 0.003 * rnd.normal();
    // standard error of the MAD scale ≈ 1.17 σ/√n → 0.8 % here
    expect(Math.abs(madScale(d, n, new Float64Array(n)) / 0.003 - 1)).toBeLessThan(0.03);
  });

  it('ignores up to half the residuals being gross outliers', () => {
    // Breakdown point of the median is 50 %.
    const d = Float64Array.from([1, -1, 1, -1, 1, 1000, -1000, 1000, 1000]);
    expect(madScale(d, d.length, new Float64Array(d.length))).toBeCloseTo(MAD_TO_SIGMA, 12);
    expect(madScale(d, 0, new Float64Array(1))).toBe(0);
  });
});

describe('select', () => {
  it('returns the k-th smallest element, as sorting does, on seeded random arrays', () => {
    // Definition of order statistics; checked against Array.prototype.sort.
    const rnd = createRandom(8);
    for (let t = 0; t < 200; t++) {
      const n = 1 + rnd.int(60);
      const a = Float64Array.from({ length: n }, () => rnd.int(10) - 5 + rnd.next() * (t % 2));
      const sorted = Array.from(a).sort((x, y) => x - y);
      const k = rnd.int(n);
      expect(select(Float64Array.from(a), k)).toBe(sorted[k]);
    }
  });
});
