import { describe, expect, it } from 'vitest';
import { createRandom } from '../../core/util/random.js';
import { csrFromTriplets, csrMultiply, incompleteCholesky, solveSpd } from '../../core/hydraulics/sparse.js';

function triplets() {
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  return { rows, cols, vals, add: (r: number, c: number, v: number) => (rows.push(r), cols.push(c), vals.push(v)) };
}

/** A random sparse SPD matrix: a weighted graph Laplacian plus a positive diagonal (strictly diagonally dominant). */
function randomSpd(n: number, seed: number) {
  const rnd = createRandom(seed);
  const t = triplets();
  for (let i = 0; i < n; i++) {
    t.add(i, i, 0.1 + rnd.next());
    for (let k = 0; k < 3; k++) {
      const j = rnd.int(n);
      if (j === i) continue;
      const w = rnd.uniform(0.01, 10);
      t.add(i, j, -w);
      t.add(j, i, -w);
      t.add(i, i, w);
      t.add(j, j, w);
    }
  }
  return csrFromTriplets(n, t.rows, t.cols, t.vals);
}

describe('csrFromTriplets', () => {
  it('sums duplicate entries and sorts columns', () => {
    const a = csrFromTriplets(2, [0, 0, 1, 0], [1, 0, 1, 1], [2, 5, 7, 3]);
    expect(Array.from(a.col)).toEqual([0, 1, 1]);
    expect(Array.from(a.val)).toEqual([5, 5, 7]);
  });
});

describe('csrMultiply', () => {
  it('multiplies like the dense matrix', () => {
    const a = csrFromTriplets(2, [0, 0, 1, 1], [0, 1, 0, 1], [2, -1, -1, 3]);
    const y = new Float64Array(2);
    csrMultiply(a, [1, 2], y);
    expect(Array.from(y)).toEqual([0, 5]);
  });
});

describe('incompleteCholesky', () => {
  it('is the exact Cholesky factor of a tridiagonal (path-graph) matrix', () => {
    // A path graph is a tree: numbered in order, elimination creates no fill-in (George & Liu 1981,
    // Computer Solution of Large Sparse Positive Definite Systems), so IC(0) = Cholesky.
    const n = 6;
    const t = triplets();
    for (let i = 0; i < n; i++) {
      t.add(i, i, 2.5);
      if (i > 0) {
        t.add(i, i - 1, -1);
        t.add(i - 1, i, -1);
      }
    }
    const a = csrFromTriplets(n, t.rows, t.cols, t.vals);
    const f = incompleteCholesky(a)!;
    // Check L Lᵀ = A entry by entry.
    const dense = (i: number, j: number): number => {
      let s = 0;
      for (let p = f.rowPtr[i]; p < f.rowPtr[i + 1]; p++)
        for (let q = f.rowPtr[j]; q < f.rowPtr[j + 1]; q++) if (f.col[p] === f.col[q]) s += f.val[p] * f.val[q];
      return s;
    };
    for (let i = 0; i < n; i++) {
      expect(dense(i, i)).toBeCloseTo(2.5, 12);
      if (i > 0) expect(dense(i, i - 1)).toBeCloseTo(-1, 12);
    }
  });
});

describe('solveSpd', () => {
  it.each(['ic0', 'jacobi'] as const)('solves a random sparse SPD system to 1e-10 with the %s preconditioner', (pre) => {
    // Property: A x = b for a known x (seeded random matrix, 300 unknowns).
    const a = randomSpd(300, 7);
    const rnd = createRandom(11);
    const xTrue = Float64Array.from({ length: 300 }, () => rnd.uniform(-1, 1));
    const b = new Float64Array(300);
    csrMultiply(a, xTrue, b);
    const { x } = solveSpd(a, b, { preconditioner: pre, tolerance: 1e-14 });
    let err = 0;
    for (let i = 0; i < 300; i++) err = Math.max(err, Math.abs(x[i] - xTrue[i]));
    expect(err).toBeLessThan(1e-10);
  });

  it('returns zero for a zero right-hand side', () => {
    const a = randomSpd(10, 3);
    expect(Array.from(solveSpd(a, new Float64Array(10)).x)).toEqual(new Array(10).fill(0));
  });
});
