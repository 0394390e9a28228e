import { describe, expect, it } from 'vitest';
import { eigenSymmetric3 } from '../../../core/reconstruct/fit/eigen3.js';
import { createRandom } from '../../../core/util/random.js';

type M3 = number[][];

function mat(a00: number, a01: number, a02: number, a11: number, a12: number, a22: number): M3 {
  return [
    [a00, a01, a02],
    [a01, a11, a12],
    [a02, a12, a22],
  ];
}

function norm(a: M3): number {
  return Math.sqrt(a.flat().reduce((s, v) => s + v * v, 0));
}

/** max |A v_k − λ_k v_k| over k, and max |V^T V − I|; the defining properties of an eigenbasis. */
function residuals(a: M3, out: Float64Array): { eig: number; orth: number } {
  let eig = 0;
  let orth = 0;
  for (let k = 0; k < 3; k++) {
    const v = [out[3 + 3 * k], out[4 + 3 * k], out[5 + 3 * k]];
    for (let i = 0; i < 3; i++) {
      const av = a[i][0] * v[0] + a[i][1] * v[1] + a[i][2] * v[2];
      eig = Math.max(eig, Math.abs(av - out[k] * v[i]));
    }
    for (let j = 0; j < 3; j++) {
      const w = [out[3 + 3 * j], out[4 + 3 * j], out[5 + 3 * j]];
      const d = v[0] * w[0] + v[1] * w[1] + v[2] * w[2];
      orth = Math.max(orth, Math.abs(d - (j === k ? 1 : 0)));
    }
  }
  return { eig, orth };
}

/** Q D Qᵀ for a random rotation Q (from a random unit quaternion) and given eigenvalues. */
function withSpectrum(d: [number, number, number], rnd: ReturnType<typeof createRandom>): M3 {
  let qw = rnd.normal(), qx = rnd.normal(), qy = rnd.normal(), qz = rnd.normal();
  const l = Math.hypot(qw, qx, qy, qz);
  qw /= l; qx /= l; qy /= l; qz /= l;
  const q = [
    [1 - 2 * (qy * qy + qz * qz), 2 * (qx * qy - qz * qw), 2 * (qx * qz + qy * qw)],
    [2 * (qx * qy + qz * qw), 1 - 2 * (qx * qx + qz * qz), 2 * (qy * qz - qx * qw)],
    [2 * (qx * qz - qy * qw), 2 * (qy * qz + qx * qw), 1 - 2 * (qx * qx + qy * qy)],
  ];
  const a: M3 = [[0, 0, 0], [0, 0, 0], [0, 0, 0]];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) a[i][j] += q[i][k] * d[k] * q[j][k];
  // symmetrise exactly
  for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) a[j][i] = a[i][j];
  return a;
}

function solve(a: M3, out: Float64Array): void {
  eigenSymmetric3(a[0][0], a[0][1], a[0][2], a[1][1], a[1][2], a[2][2], out);
}

describe('eigenSymmetric3', () => {
  const out = new Float64Array(12);

  it('satisfies A·V = V·D and VᵀV = I to 1e-10 relative on 2000 seeded random symmetric matrices', () => {
    // Defining properties of the symmetric eigen decomposition (Golub & Van Loan, Matrix Computations, §8.1).
    const rnd = createRandom(42);
    let worstEig = 0;
    let worstOrth = 0;
    for (let t = 0; t < 2000; t++) {
      const a = mat(rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal());
      solve(a, out);
      const r = residuals(a, out);
      worstEig = Math.max(worstEig, r.eig / norm(a));
      worstOrth = Math.max(worstOrth, r.orth);
      expect(out[0]).toBeLessThanOrEqual(out[1]);
      expect(out[1]).toBeLessThanOrEqual(out[2]);
    }
    expect(worstEig).toBeLessThan(1e-10);
    expect(worstOrth).toBeLessThan(1e-10);
  });

  it('recovers a prescribed spectrum, including equal and nearly equal eigenvalues', () => {
    // A = Q D Qᵀ has eigenvalues D exactly (spectral theorem); cases where the cubic's roots coincide.
    const rnd = createRandom(7);
    const spectra: [number, number, number][] = [
      [1, 2, 3],
      [2, 2, 5],
      [-1, 4, 4],
      [3, 3, 3 + 1e-9],
      [1, 1 + 1e-12, 7],
      [0, 0, 1],
      [1e-8, 1, 1],
      [-5, 0, 5],
    ];
    for (const d of spectra) {
      for (let t = 0; t < 50; t++) {
        const a = withSpectrum(d, rnd);
        solve(a, out);
        const scale = Math.max(...d.map(Math.abs));
        for (let k = 0; k < 3; k++) expect(Math.abs(out[k] - d[k])).toBeLessThan(1e-12 * scale + 1e-15);
        const r = residuals(a, out);
        expect(r.eig / scale).toBeLessThan(1e-10);
        expect(r.orth).toBeLessThan(1e-10);
      }
    }
  });

  it('returns the sorted diagonal and coordinate axes for a diagonal matrix', () => {
    // Trivial case: a diagonal matrix's eigenvectors are the coordinate axes.
    eigenSymmetric3(5, 0, 0, -2, 0, 1, out);
    expect(Array.from(out.subarray(0, 3))).toEqual([-2, 1, 5]);
    expect(Math.abs(out[4])).toBe(1); // λ=-2 ↔ y axis
    expect(Math.abs(out[8])).toBe(1); // λ=1 ↔ z axis
    expect(Math.abs(out[9])).toBe(1); // λ=5 ↔ x axis
  });

  it('handles a multiple of the identity and the zero matrix with an orthonormal basis', () => {
    // λI has the triple eigenvalue λ and every basis is an eigenbasis.
    for (const s of [0, 2.5, -1e-200, 1e200]) {
      eigenSymmetric3(s, 0, 0, s, 0, s, out);
      expect(Array.from(out.subarray(0, 3))).toEqual([s, s, s]);
      expect(residuals(mat(s, 0, 0, s, 0, s), out).orth).toBeLessThan(1e-15);
    }
  });

  it('keeps 1e-10 relative accuracy for entries near 1e-150 and 1e150', () => {
    // Scaling invariance: eig(cA) = c·eig(A); the solver must neither underflow nor overflow.
    const rnd = createRandom(3);
    for (const c of [1e-150, 1e150]) {
      const a0 = mat(rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal());
      const ref = new Float64Array(12);
      solve(a0, ref);
      solve(a0.map((row) => row.map((v) => v * c)), out);
      for (let k = 0; k < 3; k++) expect(Math.abs(out[k] / c - ref[k])).toBeLessThan(1e-10 * norm(a0));
    }
  });

  it('gives a right-handed basis (v0 × v1 = v2)', () => {
    // Convention documented in eigen3.ts, needed by callers that build frames from it.
    const rnd = createRandom(11);
    for (let t = 0; t < 200; t++) {
      solve(mat(rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal(), rnd.normal()), out);
      const cx = out[4] * out[8] - out[5] * out[7];
      const cy = out[5] * out[6] - out[3] * out[8];
      const cz = out[3] * out[7] - out[4] * out[6];
      expect(Math.abs(cx - out[9]) + Math.abs(cy - out[10]) + Math.abs(cz - out[11])).toBeLessThan(1e-10);
    }
  });

  it('writes NaN for non-finite input instead of throwing', () => {
    // Robustness rule of the project: never crash on bad numbers; callers check the result.
    eigenSymmetric3(NaN, 0, 0, 1, 0, 1, out);
    expect(Number.isNaN(out[0])).toBe(true);
    eigenSymmetric3(Infinity, 0, 0, 1, 0, 1, out);
    expect(Number.isNaN(out[2])).toBe(true);
  });
});
