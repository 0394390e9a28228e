import { createRandom, type Random } from '../util/random.js';
import { fitTaperRate, type FurcationRecord, type FurcationSet } from './furcation-set.js';
import { exponentVariance, solveExponent, solveLogRatios, type FurcationStatus } from './solve.js';
import { finiteOrNull, huberLocation, madSigma, median, medianInPlace, percentileInterval } from './stats.js';

/** One furcation with its combined radii and solved exponent. */
export interface EvaluatedFurcation {
  record: FurcationRecord;
  parentRadiusM: number;
  parentSeM: number;
  childRadiiM: number[];
  childSeM: number[];
  status: FurcationStatus;
  /** Solved exponent (also for children_thinner, where it is ≤ 1); NaN when none. */
  exponent: number;
  /** Delta-method variance of the exponent from the radius SEs; NaN when not solved. */
  exponentVariance: number;
}

/**
 * Radius of a group of samples: the median (for two samples, their mean) of radius·e^(rate·u),
 * where u is each sample's fractional distance from the joint and rate the taper adjustment
 * (+k for a parent window, −k for a child window; 0 = none).
 */
export function combineRadius(samples: number[], radii: ArrayLike<number>, u?: number[], rate = 0): number {
  const m = samples.length;
  const adjust = rate !== 0 && u !== undefined;
  if (m === 1) return radii[samples[0]] * (adjust ? Math.exp(rate * u[0]) : 1);
  if (m === 2) {
    return 0.5 * (radii[samples[0]] * (adjust ? Math.exp(rate * u[0]) : 1) + radii[samples[1]] * (adjust ? Math.exp(rate * u[1]) : 1));
  }
  return median(samples.map((s, k) => radii[s] * (adjust ? Math.exp(rate * u[k]) : 1)));
}

/** SE of a group radius, taken as the SE of the mean of the samples (exact for m ≤ 2; an approximation for the median). */
export function combineSe(samples: number[], se: ArrayLike<number>, u?: number[], rate = 0): number {
  let v = 0;
  samples.forEach((s, k) => {
    const e = se[s] * (rate !== 0 && u ? Math.exp(rate * u[k]) : 1);
    v += e * e;
  });
  return Math.sqrt(v) / samples.length;
}

/**
 * Combine radii and solve every furcation; classify exclusions.
 * @param minRadiusM furcations with a child radius below this are `below_min_radius`
 */
export function evaluateFurcations(set: FurcationSet, minRadiusM: number, maxExponent: number): EvaluatedFurcation[] {
  return set.furcations.map((record): EvaluatedFurcation => {
    if (record.preExclusion) {
      return { record, parentRadiusM: NaN, parentSeM: NaN, childRadiiM: [], childSeM: [], status: record.preExclusion, exponent: NaN, exponentVariance: NaN };
    }
    const k = set.taper?.rate ?? 0;
    const parentRadiusM = combineRadius(record.parentSamples, set.sampleRadiusM, record.parentU, k);
    const parentSeM = combineSe(record.parentSamples, set.sampleSeM, record.parentU, k);
    const childRadiiM = record.childSamples.map((s, c) => combineRadius(s, set.sampleRadiusM, record.childU[c], -k));
    const childSeM = record.childSamples.map((s, c) => combineSe(s, set.sampleSeM, record.childU[c], -k));
    const base = { record, parentRadiusM, parentSeM, childRadiiM, childSeM };
    if (childRadiiM.some((r) => !(r >= minRadiusM))) {
      return { ...base, status: 'below_min_radius', exponent: NaN, exponentVariance: NaN };
    }
    const sol = solveExponent(parentRadiusM, childRadiiM, maxExponent);
    const variance = sol.status === 'solved' ? exponentVariance(sol.exponent, parentRadiusM, parentSeM, childRadiiM, childSeM) : NaN;
    return { ...base, status: sol.status, exponent: sol.exponent, exponentVariance: variance };
  });
}

export interface ExponentIntervals {
  /** Median of the solved exponents. */
  estimate: number;
  ci: [number | null, number | null];
  /** Huber M-estimate over the same furcations. */
  huber: number;
  /** Pooled least-squares exponent and its interval (null interval when not asked for). */
  pooled: number;
  pooledCi: [number | null, number | null];
  /** Share s of the between-furcation deviations kept in the bootstrap part (the rest is radius error), 0–1. */
  spreadShrink: number;
  /** Median delta-method SD of a single furcation's exponent from radius errors. */
  measurementSd: number;
  /** MAD-based SD of the solved exponents across furcations. */
  observedSd: number;
}

/**
 * Median and pooled exponents over solved furcations, with intervals that combine the spread over
 * furcations (bootstrap) and each radius' own standard error (Monte Carlo), counting the radius
 * error once.
 *
 * Each replicate b is  θ̂ + s·(θ*_boot − θ̂) + (θ*_mc − θ̂):
 * - θ*_boot: the estimator on furcations resampled with replacement (observed radii) — Efron &
 *   Tibshirani 1993;
 * - θ*_mc: the estimator on ALL used furcations with radii drawn as r + SE·N(0,1), each sample
 *   (segment) drawn once, so furcations that share a segment stay correlated as in the data; the
 *   within-internode taper is refitted on the draw; a furcation the draw makes unsolvable counts
 *   as censored (median) or drops out (pooled), as it would in the estimate;
 * - s = sqrt(max(0, S² − V)/S²), S the robust (MAD) SD of the solved exponents and V the median
 *   delta-method variance of one exponent: the observed spread already contains the radius error,
 *   so without s it would be counted twice (measured: ~99.5 % coverage at 95 % nominal when radius
 *   error dominates). With all SE = 0 this is the plain bootstrap.
 * The basic bootstrap interval of the replicates is reported (see intervalOf).
 *
 * @param withPooled also compute the pooled estimate's interval (costs one pooled fit per replicate)
 * @param groupings labels (0..count−1) per used furcation, e.g. its branching order: a median and
 *   interval per label, resampled within the label, sharing the Monte Carlo draws
 * @param mcDraws Monte Carlo draws of the radius errors, cycled over the replicates
 */
export function exponentIntervals(
  set: FurcationSet,
  used: EvaluatedFurcation[],
  replicates: number,
  confidence: number,
  maxExponent: number,
  rng: Random,
  withPooled = true,
  groupings: { labels: Int32Array; count: number }[] = [],
  mcDraws = 200,
): ExponentIntervals & { groups: GroupInterval[][] } {
  const n = used.length;
  const a = Float64Array.from(used, medianValue);
  // Spread, Huber and the pooled fit use the furcations solved in range only.
  const solvedIdx = used.map((f, k) => (f.status === 'solved' ? k : -1)).filter((k) => k >= 0);
  const nS = solvedIdx.length;
  const aS = Float64Array.from(solvedIdx, (k) => a[k]);
  const ratios = solvedIdx.map((k) => Float64Array.from(used[k].childRadiiM, (r) => Math.log(r / used[k].parentRadiusM)));
  const estimate = n > 0 ? median(a) : NaN;
  const huber = nS > 0 ? huberLocation(aS) : NaN;
  const pooled = pooledExponent(ratios, maxExponent, Number.isFinite(estimate) ? estimate : 2);
  const variance = Float64Array.from(used, (f) => f.exponentVariance);
  const main = spreadParts(a, variance);
  const groups = groupings.map((g) => groupParts(g.labels, g.count, a, variance));
  if (n === 0) {
    return { estimate, ci: [null, null], huber, pooled, pooledCi: [null, null], spreadShrink: NaN, measurementSd: NaN, observedSd: NaN, groups: groups.map((g) => g.map(() => ({ estimate: NaN, ci: [null, null] }))) };
  }
  const shrink = main.shrink;
  const anyError = used.some((f) => hasError(f, set));
  const samples = uniqueSamples(used, set.taper);
  const drawn = new Float64Array(set.sampleRadiusM);
  const reps = new Float64Array(replicates);
  const pooledReps = new Float64Array(withPooled ? replicates : 0);
  const groupReps = groups.map((g) => g.map(() => new Float64Array(replicates)));
  const picked = new Float64Array(n);
  const pickedRatios: Float64Array[] = new Array(nS);
  const mcValues = new Float64Array(n);
  const vStar = new Float64Array(n);
  const mcRatios: Float64Array[] = [];
  const withShrink = (m: number, s: number, k: number): number =>
    Number.isFinite(a[k]) && Number.isFinite(vStar[k]) ? m + s * (a[k] - m) + (vStar[k] - a[k]) : vStar[k];
  // Monte Carlo draws of the radius error: M of them, paired with the bootstrap replicates in turn
  // (replicate b adds draw b mod M). The two parts are independent, so cycling M ≪ B draws keeps the
  // sum's distribution while the costly part (re-solving every furcation) runs M times, not B.
  const M = anyError ? Math.min(replicates, mcDraws) : 0;
  const mcMain = new Float64Array(M);
  const mcPooled = new Float64Array(M);
  const mcGroups = groups.map((g) => g.map(() => new Float64Array(M)));
  for (let d = 0; d < M; d++) {
    drawRadii(set, samples, drawn, rng);
    const rate = set.taper ? fitTaperRate(set.taper.internodes, drawn) : 0;
    mcRatios.length = 0;
    for (let k = 0; k < n; k++) {
      const sol = solveDrawn(used[k].record, drawn, rate, maxExponent, a[k]);
      vStar[k] = sol.value;
      // Denoised value plus a fresh error: the median is not linear, so adding the error to the
      // already-noisy a_k would overstate its spread (~15 % wider SD, measured).
      mcValues[k] = withShrink(estimate, shrink, k);
      if (withPooled && sol.solved && used[k].status === 'solved') mcRatios.push(sol.ratios);
    }
    mcMain[d] = medianInPlace(mcValues, n) - estimate;
    mcPooled[d] = withPooled && mcRatios.length > 0 ? pooledExponent(mcRatios, maxExponent, pooled, 1e-10) - pooled : NaN;
    groups.forEach((g, gi) => {
      g.forEach((part, li) => {
        let m = 0;
        for (const k of part.members) mcValues[m++] = withShrink(part.estimate, part.shrink, k);
        mcGroups[gi][li][d] = m > 0 ? medianInPlace(mcValues, m) - part.estimate : NaN;
      });
    });
  }
  for (let b = 0; b < replicates; b++) {
    const d = M > 0 ? b % M : -1;
    for (let k = 0; k < n; k++) picked[k] = a[rng.int(n)];
    reps[b] = estimate + shrink * (medianInPlace(picked, n) - estimate) + (d >= 0 ? mcMain[d] : 0);
    if (withPooled) {
      let pooledRep = NaN;
      if (nS > 0) {
        for (let k = 0; k < nS; k++) pickedRatios[k] = ratios[rng.int(nS)];
        pooledRep = pooled + shrink * (pooledExponent(pickedRatios, maxExponent, pooled, 1e-10) - pooled);
      }
      pooledReps[b] = pooledRep + (d >= 0 ? mcPooled[d] : 0);
    }
    // Groups (e.g. by order) resample within the group and share the Monte Carlo draws.
    groups.forEach((g, gi) => {
      g.forEach((part, li) => {
        const members = part.members;
        const ng = members.length;
        for (let k = 0; k < ng; k++) picked[k] = a[members[rng.int(ng)]];
        const r = part.estimate + part.shrink * (medianInPlace(picked, ng) - part.estimate);
        groupReps[gi][li][b] = r + (d >= 0 ? mcGroups[gi][li][d] : 0);
      });
    });
  }
  return {
    estimate,
    ci: intervalOf(reps, estimate, confidence),
    huber,
    pooled,
    pooledCi: withPooled ? intervalOf(pooledReps, pooled, confidence) : [null, null],
    spreadShrink: shrink,
    measurementSd: Math.sqrt(main.measurementVar),
    observedSd: main.observedSd,
    groups: groups.map((g, gi) => g.map((part, li) => ({ estimate: part.estimate, ci: intervalOf(groupReps[gi][li], part.estimate, confidence) }))),
  };
}

/**
 * Basic bootstrap interval [2θ̂ − q_hi, 2θ̂ − q_lo] (Davison & Hinkley 1997, §5.2): the replicates
 * re-apply the estimator to data carrying one more dose of radius error, so their offset from θ̂
 * mirrors θ̂'s offset from the truth — including the bias the error causes in a nonlinear estimator,
 * which the percentile interval would move the wrong way (measured on scan-lab truth + 5 % radius
 * noise: coverage 0.80 vs 0.60 for the median, 0.85 vs 0.00 for the pooled estimate). With SE = 0
 * both intervals are standard bootstrap intervals.
 */
function intervalOf(reps: Float64Array, estimate: number, confidence: number): [number | null, number | null] {
  const [lo, hi] = percentileInterval(reps, confidence);
  const flip = (q: number | null): number | null => (q === null ? null : finiteOrNull(2 * estimate - q));
  return [flip(hi), flip(lo)];
}

/**
 * The value a furcation contributes to the median: its root when solved (also a root ≤ 1 for
 * children_thinner), +∞ when the root lies above the range or does not exist (a child at least as
 * thick as the parent: Σ q^a > 1 for every a). Censoring these at +∞ instead of dropping them keeps
 * the median unbiased when noise pushes a nearly-as-thick leader over its parent (measured: with
 * leaders at 0.94 r_0 and 5 % radius noise, dropping them biased a by −0.07 with 0 % coverage).
 */
export function medianValue(f: EvaluatedFurcation): number {
  if (f.status === 'solved' || f.status === 'children_thinner') return f.exponent;
  if (f.status === 'child_thicker' || f.status === 'above_range') return Infinity;
  return NaN;
}

/** Median and interval of one group of furcations (e.g. one branching order). */
export interface GroupInterval {
  estimate: number;
  ci: [number | null, number | null];
}

/** Robust spread S, median measurement variance V and the shrink factor s = sqrt(max(0, S² − V)/S²). */
function spreadParts(a: Float64Array, variance: Float64Array): { observedSd: number; measurementVar: number; shrink: number } {
  const fin = a.filter((v) => Number.isFinite(v));
  if (fin.length === 0) return { observedSd: NaN, measurementVar: NaN, shrink: a.length > 0 ? 0 : NaN };
  // MAD is robust, so a few roots ≤ 1 among the finite values do not inflate it.
  const observedSd = madSigma(fin);
  const finite = Array.from(variance).filter((v) => Number.isFinite(v));
  const measurementVar = finite.length > 0 ? median(finite) : 0;
  const s2 = observedSd * observedSd;
  const shrink = s2 > 0 ? Math.sqrt(Math.max(0, s2 - measurementVar) / s2) : measurementVar > 0 ? 0 : 1;
  return { observedSd, measurementVar, shrink };
}

/** Per label 0..count−1: member indices, median and shrink factor. */
function groupParts(labels: Int32Array, count: number, a: Float64Array, variance: Float64Array): { members: number[]; estimate: number; shrink: number }[] {
  const members: number[][] = Array.from({ length: count }, () => []);
  labels.forEach((l, k) => members[l].push(k));
  return members.map((m) => {
    const ga = Float64Array.from(m, (k) => a[k]);
    const gv = Float64Array.from(m, (k) => variance[k]);
    return { members: m, estimate: m.length > 0 ? median(ga) : NaN, shrink: spreadParts(ga, gv).shrink };
  });
}

function hasError(f: EvaluatedFurcation, set: FurcationSet): boolean {
  const r = f.record;
  return r.parentSamples.some((s) => set.sampleSeM[s] > 0) || r.childSamples.some((c) => c.some((s) => set.sampleSeM[s] > 0));
}

/** Samples a Monte Carlo draw must perturb: the windows of the used furcations and, with a taper adjustment, every internode sample. */
function uniqueSamples(used: EvaluatedFurcation[], taper?: FurcationSet['taper']): Int32Array {
  const set = new Set<number>();
  for (const t of taper?.internodes ?? []) for (const s of t.samples) set.add(s);
  for (const f of used) {
    for (const s of f.record.parentSamples) set.add(s);
    for (const c of f.record.childSamples) for (const s of c) set.add(s);
  }
  return Int32Array.from(set);
}

/** Radii drawn as r + SE·N(0, 1), kept positive (a draw ≤ 0 is clipped to 1e-6 r). */
function drawRadii(set: FurcationSet, samples: Int32Array, out: Float64Array, rng: Random): void {
  for (let k = 0; k < samples.length; k++) {
    const s = samples[k];
    const r = set.sampleRadiusM[s] + set.sampleSeM[s] * rng.normal();
    out[s] = r > 0 ? r : 1e-6 * set.sampleRadiusM[s];
  }
}

/** Median value (as medianValue), solved flag and log child/parent ratios of a furcation with drawn radii. */
function solveDrawn(
  record: FurcationRecord,
  radii: Float64Array,
  rate: number,
  maxExponent: number,
  hint: number,
): { value: number; solved: boolean; ratios: Float64Array } {
  const lnr0 = Math.log(combineRadius(record.parentSamples, radii, record.parentU, rate));
  const lnq = new Float64Array(record.childSamples.length);
  for (let c = 0; c < lnq.length; c++) lnq[c] = Math.log(combineRadius(record.childSamples[c], radii, record.childU[c], -rate)) - lnr0;
  const sol = solveLogRatios(lnq, maxExponent, hint);
  const value = sol.status === 'solved' || sol.status === 'children_thinner' ? sol.exponent : Infinity;
  return { value, solved: sol.status === 'solved', ratios: lnq };
}

/**
 * Pooled least-squares exponent: the a minimising Σ_f (Σ_i (r_fi / r_f0)^a − 1)², found as the
 * root of the derivative by safeguarded Newton on [1, maxExponent] (every used furcation has its
 * own root in that range, so the derivative changes sign there).
 * @param logRatios per furcation ln(r_fi / r_f0) of each child
 * @param start starting point (e.g. the median estimate)
 * @param tolerance relative step at which to stop (1e-10 is ample inside a bootstrap)
 */
export function pooledExponent(logRatios: Float64Array[], maxExponent: number, start: number, tolerance = 1e-14): number {
  if (logRatios.length === 0) return NaN;
  let lo = 1;
  let hi = maxExponent;
  let x = start > lo && start < hi ? start : 2;
  for (let iter = 0; iter < 100; iter++) {
    let g = 0;
    let h = 0;
    for (let f = 0; f < logRatios.length; f++) {
      const l = logRatios[f];
      let s = -1;
      let s1 = 0;
      let s2 = 0;
      for (let i = 0; i < l.length; i++) {
        const p = Math.exp(x * l[i]);
        s += p;
        s1 += p * l[i];
        s2 += p * l[i] * l[i];
      }
      g += s * s1;
      h += s1 * s1 + s * s2;
    }
    if (g === 0) return x;
    if (g < 0) lo = x;
    else hi = x;
    let next = h > 0 ? x - g / h : NaN;
    if (Math.abs(next - x) <= tolerance * x) return next;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= tolerance * x) return next;
    x = next;
  }
  return x;
}

/** An independent, repeatable random stream per analysis part, derived from the user's seed. */
export function streamRandom(seed: number, stream: number): Random {
  return createRandom((seed + Math.imul(stream + 1, 0x9e3779b9)) >>> 0);
}
