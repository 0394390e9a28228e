/**
 * Robust M-estimation pieces for iteratively reweighted least squares.
 *
 * Tuning constants give 95 % efficiency at the normal distribution: Tukey biweight c = 4.685,
 * Huber k = 1.345 (Holland & Welsch 1977, Commun. Stat. A6:813). The scale is the median
 * absolute residual × 1.4826, which equals σ for normal residuals centred on zero
 * (Hampel 1974, JASA 69:383 — residuals of a fitted surface are centred on zero, so the median
 * of |d| is used without subtracting a median).
 */
export type RobustLoss = 'tukey' | 'huber' | 'none';

export const TUKEY_C = 4.685;
export const HUBER_K = 1.345;
/** 1 / Φ⁻¹(3/4): makes the median absolute deviation a consistent estimate of σ. */
export const MAD_TO_SIGMA = 1.4826;

/**
 * IRLS weight w = ψ(d)/d, ψ and ψ' = dψ/dd for residual d at scale σ.
 * Writes [w, ψ, ψ'] into out[0..2].
 */
export function robustTerms(loss: RobustLoss, d: number, sigma: number, out: Float64Array): void {
  if (loss === 'tukey') {
    const t = d / (TUKEY_C * sigma);
    const t2 = t * t;
    if (t2 >= 1) {
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
      return;
    }
    const b = 1 - t2;
    out[0] = b * b;
    out[1] = d * b * b;
    out[2] = b * (1 - 5 * t2);
    return;
  }
  if (loss === 'huber') {
    const k = HUBER_K * sigma;
    const a = Math.abs(d);
    if (a <= k) {
      out[0] = 1;
      out[1] = d;
      out[2] = 1;
    } else {
      out[0] = k / a;
      out[1] = d > 0 ? k : -k;
      out[2] = 0;
    }
    return;
  }
  out[0] = 1;
  out[1] = d;
  out[2] = 1;
}

/** IRLS weights w[i] = ψ(d[i])/d[i] for the first n residuals, in one loop (no per-point calls). */
export function robustWeights(loss: RobustLoss, d: ArrayLike<number>, w: Float64Array, n: number, sigma: number): void {
  if (loss === 'tukey') {
    const inv = 1 / (TUKEY_C * sigma);
    for (let i = 0; i < n; i++) {
      const t = d[i] * inv;
      const b = 1 - t * t;
      w[i] = b > 0 ? b * b : 0;
    }
  } else if (loss === 'huber') {
    const k = HUBER_K * sigma;
    for (let i = 0; i < n; i++) {
      const a = Math.abs(d[i]);
      w[i] = a <= k ? 1 : k / a;
    }
  } else {
    for (let i = 0; i < n; i++) w[i] = 1;
  }
}

/** ψ(d[i]) into psi[i] and ψ'(d[i]) into dpsi[i] for the first n residuals. */
export function robustPsi(
  loss: RobustLoss,
  d: ArrayLike<number>,
  n: number,
  sigma: number,
  psi: Float64Array,
  dpsi: Float64Array,
): void {
  if (loss === 'tukey') {
    const inv = 1 / (TUKEY_C * sigma);
    for (let i = 0; i < n; i++) {
      const t = d[i] * inv;
      const t2 = t * t;
      if (t2 >= 1) {
        psi[i] = 0;
        dpsi[i] = 0;
      } else {
        const b = 1 - t2;
        psi[i] = d[i] * b * b;
        dpsi[i] = b * (1 - 5 * t2);
      }
    }
  } else if (loss === 'huber') {
    const k = HUBER_K * sigma;
    for (let i = 0; i < n; i++) {
      const di = d[i];
      if (Math.abs(di) <= k) {
        psi[i] = di;
        dpsi[i] = 1;
      } else {
        psi[i] = di > 0 ? k : -k;
        dpsi[i] = 0;
      }
    }
  } else {
    for (let i = 0; i < n; i++) {
      psi[i] = d[i];
      dpsi[i] = 1;
    }
  }
}

/**
 * MAD-based scale of residuals: 1.4826 · median |d|. Uses (and reorders) `scratch`, which must
 * hold at least `n` numbers.
 */
export function madScale(d: ArrayLike<number>, n: number, scratch: Float64Array): number {
  if (n <= 0) return 0;
  for (let i = 0; i < n; i++) scratch[i] = Math.abs(d[i]);
  const view = scratch.subarray(0, n);
  const mid = n >> 1;
  const m = n % 2 === 1 ? select(view, mid) : 0.5 * (select(view, mid - 1) + select(view, mid));
  return MAD_TO_SIGMA * m;
}

/** k-th smallest element (0-based) by quickselect; reorders `a`. */
export function select(a: Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    // median of three pivot keeps sorted input linear
    const mid = (lo + hi) >> 1;
    const x = a[lo];
    const y = a[mid];
    const z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}
