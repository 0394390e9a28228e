/**
 * Sparse symmetric positive-definite solves for Kirchhoff networks: compressed sparse rows, an
 * incomplete Cholesky IC(0) or Jacobi preconditioner, and preconditioned conjugate gradients.
 * IC(0) keeps only the non-zero pattern of A; on a tree whose unknowns are numbered children before
 * parents it has no fill-in and is therefore the exact Cholesky factor (CG then stops after one step),
 * while on networks with loops it remains a good preconditioner.
 */
export interface CsrMatrix {
  n: number;
  /** rowPtr[i]..rowPtr[i+1] index the entries of row i; columns ascending, no duplicates. */
  rowPtr: Int32Array;
  col: Int32Array;
  val: Float64Array;
}

/**
 * Build a CSR matrix from coordinate triplets; duplicate (row, col) entries are summed.
 * @param n matrix size
 */
export function csrFromTriplets(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>, vals: ArrayLike<number>): CsrMatrix {
  const m = rows.length;
  const counts = new Int32Array(n + 1);
  for (let k = 0; k < m; k++) counts[rows[k] + 1]++;
  for (let i = 0; i < n; i++) counts[i + 1] += counts[i];
  const fill = counts.slice(0, n);
  const tmpCol = new Int32Array(m);
  const tmpVal = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const p = fill[rows[k]]++;
    tmpCol[p] = cols[k];
    tmpVal[p] = vals[k];
  }
  // Sort each row by column and merge duplicates.
  const rowPtr = new Int32Array(n + 1);
  const col = new Int32Array(m);
  const val = new Float64Array(m);
  let out = 0;
  const idx: number[] = [];
  for (let i = 0; i < n; i++) {
    rowPtr[i] = out;
    idx.length = 0;
    for (let p = counts[i]; p < counts[i + 1]; p++) idx.push(p);
    idx.sort((a, b) => tmpCol[a] - tmpCol[b]);
    for (const p of idx) {
      if (out > rowPtr[i] && col[out - 1] === tmpCol[p]) val[out - 1] += tmpVal[p];
      else {
        col[out] = tmpCol[p];
        val[out] = tmpVal[p];
        out++;
      }
    }
  }
  rowPtr[n] = out;
  return { n, rowPtr, col: col.slice(0, out), val: val.slice(0, out) };
}

/** y = A x */
export function csrMultiply(a: CsrMatrix, x: ArrayLike<number>, y: Float64Array): void {
  for (let i = 0; i < a.n; i++) {
    let s = 0;
    for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) s += a.val[p] * x[a.col[p]];
    y[i] = s;
  }
}

export interface LowerFactor {
  rowPtr: Int32Array;
  col: Int32Array;
  val: Float64Array;
  /** Position of the diagonal entry of each row (the last one of the row). */
  diag: Int32Array;
  /** For each entry of L, its position in A's value array. */
  source: Int32Array;
}

/**
 * The IC(0) pattern of A: its lower triangle. Compute once per pattern, then refill the values
 * with `factorInto` for every new set of values.
 * @returns null when a row lacks its diagonal
 */
export function lowerPattern(a: CsrMatrix): LowerFactor | null {
  const n = a.n;
  const rowPtr = new Int32Array(n + 1);
  let nnz = 0;
  for (let i = 0; i < n; i++) {
    rowPtr[i] = nnz;
    for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) if (a.col[p] <= i) nnz++;
  }
  rowPtr[n] = nnz;
  const col = new Int32Array(nnz);
  const source = new Int32Array(nnz);
  const diag = new Int32Array(n);
  for (let i = 0, q = 0; i < n; i++) {
    let hasDiag = false;
    for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) {
      if (a.col[p] > i) break;
      col[q] = a.col[p];
      source[q] = p;
      if (a.col[p] === i) hasDiag = true;
      q++;
    }
    if (!hasDiag) return null;
    diag[i] = q - 1;
  }
  return { rowPtr, col, val: new Float64Array(nnz), diag, source };
}

/**
 * Fill an IC(0) factor with the values of A (same pattern as when `lowerPattern` made it).
 * @returns false when a pivot is not > 0 (then use Jacobi)
 */
export function factorInto(aVal: Float64Array, f: LowerFactor): boolean {
  const { rowPtr, col, val, diag, source } = f;
  const n = diag.length;
  for (let q = 0; q < val.length; q++) val[q] = aVal[source[q]];
  for (let i = 0; i < n; i++) {
    const start = rowPtr[i];
    const di = diag[i];
    for (let p = start; p < di; p++) {
      const k = col[p];
      let s = val[p];
      // s -= Σ_{j<k} L[i][j] L[k][j], merging the two sorted rows.
      let pi = start;
      let pk = rowPtr[k];
      const endK = diag[k];
      while (pi < p && pk < endK) {
        const ci = col[pi];
        const ck = col[pk];
        if (ci === ck) s -= val[pi++] * val[pk++];
        else if (ci < ck) pi++;
        else pk++;
      }
      val[p] = s / val[diag[k]];
    }
    let d = val[di];
    for (let p = start; p < di; p++) d -= val[p] * val[p];
    if (!(d > 0)) return false;
    val[di] = Math.sqrt(d);
  }
  return true;
}

/**
 * Incomplete Cholesky IC(0): L with the pattern of the lower triangle of A, L Lᵀ ≈ A.
 * @returns the factor, or null when a pivot is not > 0 (then use Jacobi)
 */
export function incompleteCholesky(a: CsrMatrix): LowerFactor | null {
  const f = lowerPattern(a);
  return f && factorInto(a.val, f) ? f : null;
}

/** z = (L Lᵀ)⁻¹ r */
function applyCholesky(f: LowerFactor, r: Float64Array, z: Float64Array): void {
  const n = r.length;
  for (let i = 0; i < n; i++) {
    let s = r[i];
    for (let p = f.rowPtr[i]; p < f.diag[i]; p++) s -= f.val[p] * z[f.col[p]];
    z[i] = s / f.val[f.diag[i]];
  }
  for (let i = n - 1; i >= 0; i--) {
    const zi = (z[i] /= f.val[f.diag[i]]);
    for (let p = f.rowPtr[i]; p < f.diag[i]; p++) z[f.col[p]] -= f.val[p] * zi;
  }
}

export type Preconditioner = 'ic0' | 'jacobi';

export interface SolveResult {
  x: Float64Array;
  iterations: number;
  /** ‖b − A x‖₂ / ‖b‖₂ at the end. */
  relativeResidual: number;
  preconditioner: Preconditioner;
}

/**
 * Preconditioned conjugate gradients for A x = b, A symmetric positive definite.
 * @param options.tolerance stop when ‖r‖ ≤ tolerance ‖b‖ (default 1e-14)
 * @param options.preconditioner 'ic0' (default; falls back to 'jacobi' on a non-positive pivot)
 * @param options.factor a `lowerPattern` of A to refill (saves the pattern work in repeated solves)
 */
export function solveSpd(
  a: CsrMatrix,
  b: Float64Array,
  options: { tolerance?: number; maxIterations?: number; preconditioner?: Preconditioner; initial?: Float64Array; factor?: LowerFactor | null } = {},
): SolveResult {
  const n = a.n;
  const tol = options.tolerance ?? 1e-14;
  const maxIter = options.maxIterations ?? Math.max(100, 10 * n);
  let kind: Preconditioner = options.preconditioner ?? 'ic0';
  let factor: LowerFactor | null = null;
  if (kind === 'ic0') {
    if (options.factor === undefined) factor = incompleteCholesky(a);
    else if (options.factor && factorInto(a.val, options.factor)) factor = options.factor;
  }
  if (!factor) kind = 'jacobi';
  const invDiag = new Float64Array(n);
  if (!factor) {
    for (let i = 0; i < n; i++) {
      let d = 0;
      for (let p = a.rowPtr[i]; p < a.rowPtr[i + 1]; p++) if (a.col[p] === i) d = a.val[p];
      invDiag[i] = d > 0 ? 1 / d : 1;
    }
  }
  const precondition = (r: Float64Array, z: Float64Array): void => {
    if (factor) applyCholesky(factor, r, z);
    else for (let i = 0; i < n; i++) z[i] = r[i] * invDiag[i];
  };
  const x = options.initial ? Float64Array.from(options.initial) : new Float64Array(n);
  const r = Float64Array.from(b);
  if (options.initial) {
    const ax = new Float64Array(n);
    csrMultiply(a, x, ax);
    for (let i = 0; i < n; i++) r[i] -= ax[i];
  }
  const bNorm = norm(b);
  if (bNorm === 0) return { x: new Float64Array(n), iterations: 0, relativeResidual: 0, preconditioner: kind };
  const z = new Float64Array(n);
  const p = new Float64Array(n);
  const ap = new Float64Array(n);
  precondition(r, z);
  p.set(z);
  let rz = dot(r, z);
  let iterations = 0;
  let rel = norm(r) / bNorm;
  while (rel > tol && iterations < maxIter) {
    csrMultiply(a, p, ap);
    const pap = dot(p, ap);
    if (!(pap > 0)) break;
    const alpha = rz / pap;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      r[i] -= alpha * ap[i];
    }
    iterations++;
    rel = norm(r) / bNorm;
    if (rel <= tol) break;
    precondition(r, z);
    const rzNew = dot(r, z);
    const beta = rzNew / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
  }
  return { x, iterations, relativeResidual: rel, preconditioner: kind };
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function norm(a: Float64Array): number {
  return Math.sqrt(dot(a, a));
}
