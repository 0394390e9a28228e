/**
 * Small statistics for stand-level comparisons: Student t quantiles, t-intervals, ordinary least
 * squares with coefficient intervals, a seeded permutation test and a seeded bootstrap.
 * Numbers are plain arrays; every randomized result takes a seed and is repeatable.
 */
import { createRandom } from '../util/random.js';

/** Arithmetic mean; NaN for an empty list. */
export function mean(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  let s = 0;
  for (const v of values) s += v;
  return s / values.length;
}

/** Sample standard deviation (n − 1 denominator); NaN for fewer than two values. */
export function sampleSd(values: readonly number[]): number {
  const n = values.length;
  if (n < 2) return NaN;
  const m = mean(values);
  let ss = 0;
  for (const v of values) ss += (v - m) * (v - m);
  return Math.sqrt(ss / (n - 1));
}

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7, 9 coefficients; ~15 significant digits). */
export function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  const z = x - 1;
  let a = c[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * Regularized incomplete beta I_x(a, b), by the continued fraction evaluated with the modified
 * Lentz method (Press et al., Numerical Recipes, 3rd ed., §6.4).
 */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (!(x >= 0 && x <= 1)) return NaN;
  if (x === 0 || x === 1) return x;
  const lnFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  // The fraction converges fast for x < (a + 1) / (a + b + 2); use the symmetry otherwise.
  if (x > (a + 1) / (a + b + 2)) return 1 - incompleteBeta(1 - x, b, a);
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let f = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let num = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + num * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + num / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    f *= d * c;
    num = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + num * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + num / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const step = d * c;
    f *= step;
    if (Math.abs(step - 1) < 1e-15) break;
  }
  return (Math.exp(lnFront) * f) / a;
}

/** Student t cumulative distribution P(T ≤ t) with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  if (!(df > 0)) return NaN;
  const tail = 0.5 * incompleteBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/**
 * Student t quantile: the t with P(T ≤ t) = p, by bisection on the CDF (to 1e-12 in t).
 * @param p probability in (0, 1)
 * @param df degrees of freedom (> 0)
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1) || !(df > 0)) return NaN;
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, df);
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, df) < p) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, hi); i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

export interface MeanInterval {
  n: number;
  mean: number;
  sd: number;
  /** Two-sided t-interval of the mean: mean ± t(1 − α/2, n − 1)·sd/√n; NaNs for n < 2. */
  ci: [number, number];
}

/** Mean, sample sd and the Student t-interval of the mean at the given confidence (e.g. 0.95). */
export function tInterval(values: readonly number[], confidence: number): MeanInterval {
  const n = values.length;
  const m = mean(values);
  const sd = sampleSd(values);
  if (n < 2) return { n, mean: m, sd, ci: [NaN, NaN] };
  const half = (studentTQuantile(1 - (1 - confidence) / 2, n - 1) * sd) / Math.sqrt(n);
  return { n, mean: m, sd, ci: [m - half, m + half] };
}

export interface LinearFit {
  n: number;
  intercept: number;
  slope: number;
  interceptSe: number;
  slopeSe: number;
  /** Residual standard deviation (n − 2 denominator). */
  residualSd: number;
  rSquared: number;
  /** Two-sided t-intervals of the coefficients with n − 2 degrees of freedom. */
  interceptCi: [number, number];
  slopeCi: [number, number];
  xMean: number;
  sxx: number;
}

/**
 * Ordinary least squares y = intercept + slope·x with standard errors and t-intervals
 * (e.g. Draper & Smith, Applied Regression Analysis, ch. 1). Needs n ≥ 3 and x not all equal for
 * intervals; returns NaN fields otherwise.
 */
export function linearFit(x: readonly number[], y: readonly number[], confidence: number): LinearFit {
  const n = x.length;
  const xMean = mean(x);
  const yMean = mean(y);
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - xMean;
    const dy = y[i] - yMean;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = n >= 2 && sxx > 0 ? sxy / sxx : NaN;
  const intercept = yMean - slope * xMean;
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - intercept - slope * x[i];
    sse += r * r;
  }
  const residualSd = n > 2 ? Math.sqrt(sse / (n - 2)) : NaN;
  const slopeSe = residualSd / Math.sqrt(sxx);
  const interceptSe = residualSd * Math.sqrt(1 / n + (xMean * xMean) / sxx);
  const t = n > 2 ? studentTQuantile(1 - (1 - confidence) / 2, n - 2) : NaN;
  return {
    n,
    intercept,
    slope,
    interceptSe,
    slopeSe,
    residualSd,
    rSquared: syy > 0 ? 1 - sse / syy : NaN,
    interceptCi: [intercept - t * interceptSe, intercept + t * interceptSe],
    slopeCi: [slope - t * slopeSe, slope + t * slopeSe],
    xMean,
    sxx,
  };
}

/**
 * Two-sided permutation test for a difference of means between groups a and b: the share of
 * random relabellings whose |mean difference| is at least the observed one, counted as
 * (1 + hits) / (1 + replicates) so that p is never 0 (Phipson & Smyth 2010, Stat. Appl. Genet.
 * Mol. Biol. 9:39).
 */
export function permutationTest(a: readonly number[], b: readonly number[], replicates: number, seed: number): number {
  const na = a.length;
  const pooled = [...a, ...b];
  const n = pooled.length;
  if (na === 0 || na === n) return NaN;
  const total = pooled.reduce((s, v) => s + v, 0);
  const observed = Math.abs(mean(a) - mean(b));
  // Relative tolerance so that relabellings giving the same difference up to rounding count as hits.
  const tol = 1e-12 * Math.max(1, Math.abs(observed));
  const rng = createRandom(seed);
  const work = pooled.slice();
  let hits = 0;
  for (let r = 0; r < replicates; r++) {
    // Partial Fisher–Yates: the first na entries are a uniform random subset.
    let sumA = 0;
    for (let i = 0; i < na; i++) {
      const j = i + rng.int(n - i);
      const tmp = work[i];
      work[i] = work[j];
      work[j] = tmp;
      sumA += work[i];
    }
    const d = Math.abs(sumA / na - (total - sumA) / (n - na));
    if (d >= observed - tol) hits++;
  }
  return (1 + hits) / (1 + replicates);
}

/**
 * Percentile bootstrap interval of mean(a) − mean(b), resampling each group with replacement
 * (Efron & Tibshirani 1993, An Introduction to the Bootstrap, ch. 13).
 */
export function bootstrapMeanDifference(
  a: readonly number[],
  b: readonly number[],
  replicates: number,
  confidence: number,
  seed: number,
): [number, number] {
  if (a.length === 0 || b.length === 0) return [NaN, NaN];
  const rng = createRandom(seed);
  const diffs = new Float64Array(replicates);
  for (let r = 0; r < replicates; r++) {
    let sa = 0;
    for (let i = 0; i < a.length; i++) sa += a[rng.int(a.length)];
    let sb = 0;
    for (let i = 0; i < b.length; i++) sb += b[rng.int(b.length)];
    diffs[r] = sa / a.length - sb / b.length;
  }
  return percentileInterval(diffs, confidence);
}

/** Percentile interval [q(α/2), q(1 − α/2)] of the sample (sorted copy, linear interpolation). */
export function percentileInterval(values: ArrayLike<number>, confidence: number): [number, number] {
  const sorted = Float64Array.from(values).filter((v) => Number.isFinite(v)).sort();
  if (sorted.length === 0) return [NaN, NaN];
  const alpha = 1 - confidence;
  return [quantileSorted(sorted, alpha / 2), quantileSorted(sorted, 1 - alpha / 2)];
}

/** Quantile of sorted data, linear interpolation between order statistics (Hyndman & Fan type 7). */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}
