/**
 * Small statistics helpers for the scaling stage. All ignore nothing: callers filter NaN first.
 */

/** Quantile of SORTED values, linear interpolation between order statistics (Hyndman & Fan 1996, type 7). */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  if (n === 1) return sorted[0];
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const w = h - lo;
  if (w === 0) return sorted[lo];
  return sorted[lo] + w * (sorted[hi] - sorted[lo]);
}

export function sortedCopy(values: ArrayLike<number>): Float64Array {
  return Float64Array.from(values).sort();
}

export function median(values: ArrayLike<number>): number {
  return quantileSorted(sortedCopy(values), 0.5);
}

/**
 * Median of the first n entries of a scratch buffer, REORDERING it (Hoare's selection, expected
 * O(n)); the bootstrap calls this millions of times, where sorting a copy was the main cost.
 */
export function medianInPlace(buf: Float64Array, n: number): number {
  if (n === 0) return NaN;
  const hi = select(buf, n, n >> 1);
  if (n % 2 === 1) return hi;
  // The lower middle is the largest value left of position n/2 after selection.
  let lo = -Infinity;
  for (let i = 0; i < n >> 1; i++) if (buf[i] > lo) lo = buf[i];
  return 0.5 * (lo + hi);
}

/** k-th smallest of buf[0..n) (0-based); leaves smaller values left of k, larger right. */
function select(buf: Float64Array, n: number, k: number): number {
  let left = 0;
  let right = n - 1;
  while (right > left) {
    const pivot = buf[(left + right) >> 1];
    let i = left;
    let j = right;
    while (i <= j) {
      while (buf[i] < pivot) i++;
      while (buf[j] > pivot) j--;
      if (i <= j) {
        const t = buf[i];
        buf[i] = buf[j];
        buf[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return buf[k];
  }
  return buf[k];
}

/** Median absolute deviation scaled by 1.4826 to estimate σ under normality (Hampel 1974; constant from memory: 1/Φ⁻¹(3/4)). */
export function madSigma(values: ArrayLike<number>): number {
  const m = median(values);
  const dev = Float64Array.from(values, (v) => Math.abs(v - m));
  return 1.4826 * median(dev);
}

/**
 * Huber M-estimate of location (Huber 1964, Ann. Math. Stat. 35:73), scale fixed at the MAD,
 * tuning constant 1.345 (95 % efficiency at the normal — from memory), by iteratively reweighted means.
 */
export function huberLocation(values: ArrayLike<number>, c = 1.345): number {
  const n = values.length;
  if (n === 0) return NaN;
  let mu = median(values);
  const s = madSigma(values);
  if (!(s > 0)) return mu;
  for (let iter = 0; iter < 100; iter++) {
    let sw = 0;
    let swx = 0;
    for (let i = 0; i < n; i++) {
      const u = Math.abs(values[i] - mu) / s;
      const w = u <= c ? 1 : c / u;
      sw += w;
      swx += w * values[i];
    }
    const next = swx / sw;
    if (Math.abs(next - mu) <= 1e-12 * Math.max(1, Math.abs(mu))) return next;
    mu = next;
  }
  return mu;
}

/** Ranks 1..n with ties given their average rank. */
export function ranks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const r = new Float64Array(n);
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && values[idx[j + 1]] === values[idx[i]]) j++;
    const avg = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) r[idx[k]] = avg;
    i = j + 1;
  }
  return r;
}

/** Pearson correlation; NaN when either variable is constant. */
export function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : NaN;
}

/** Spearman rank correlation (Pearson correlation of average ranks, Spearman 1904). */
export function spearman(x: ArrayLike<number>, y: ArrayLike<number>): number {
  return pearson(ranks(x), ranks(y));
}

/** Ordinary least squares y = intercept + slope·x; NaN slope when x is constant. */
export function olsLine(x: ArrayLike<number>, y: ArrayLike<number>): { slope: number; intercept: number; r2: number; n: number } {
  const n = x.length;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    sx += x[i];
    sy += y[i];
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxx > 0 ? sxy / sxx : NaN;
  const r2 = sxx > 0 && syy > 0 ? (sxy * sxy) / (sxx * syy) : NaN;
  return { slope, intercept: my - slope * mx, r2, n };
}

/** A finite number, or null (JSON has no NaN/Infinity). */
export function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** Percentile interval [(1−c)/2, (1+c)/2] of replicate values (NaN dropped); [null, null] when none. */
export function percentileInterval(replicates: ArrayLike<number>, confidence: number): [number | null, number | null] {
  const ok = Array.from(replicates).filter((v) => !Number.isNaN(v));
  if (ok.length === 0) return [null, null];
  const s = sortedCopy(ok);
  return [finiteOrNull(quantileSorted(s, (1 - confidence) / 2)), finiteOrNull(quantileSorted(s, (1 + confidence) / 2))];
}
