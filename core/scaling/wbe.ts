import type { Random } from '../util/random.js';
import type { EvaluatedFurcation } from './estimate.js';
import { finiteOrNull, percentileInterval } from './stats.js';

/**
 * West–Brown–Enquist quantities (West, Brown & Enquist 1997, Science 276:122; 1999, Nature
 * 400:664): branching ratio n, radius scaling ratio β = r_child/r_parent, length scaling ratio
 * γ = l_child/l_parent (internode lengths), the exponents they imply (β = n^(-1/a) → a = −ln n/ln β;
 * γ = n^(-1/b) → b = −ln n/ln γ) and the metabolic scaling exponent θ = −ln n / ln(β² γ).
 * A symmetric network with β = n^(-1/2), γ = n^(-1/3) gives θ = 3/4.
 *
 * Averages: n is the mean number of children per furcation; β and γ are geometric means over all
 * children (ratios are averaged on the log scale so that a child half and a child double the
 * parent's size cancel).
 */
export interface WbeRatios {
  n_furcations: number;
  branching_ratio_n: number | null;
  radius_ratio_beta: number | null;
  length_ratio_gamma: number | null;
  exponent_from_beta: number | null;
  length_exponent_from_gamma: number | null;
  theta: number | null;
}

export function wbeRatios(furcations: EvaluatedFurcation[]): WbeRatios {
  const parts = furcations.map(wbeParts);
  return ratiosFromSums(sumParts(parts, parts.map((_, k) => k)));
}

/** Per furcation: children, Σ ln β, #β, Σ ln γ, #γ. */
type Parts = [number, number, number, number, number];

function wbeParts(f: EvaluatedFurcation): Parts {
  const p: Parts = [f.childRadiiM.length, 0, 0, 0, 0];
  for (let i = 0; i < f.childRadiiM.length; i++) {
    p[1] += Math.log(f.childRadiiM[i] / f.parentRadiusM);
    p[2]++;
    const lc = f.record.childLengthsM[i];
    const lp = f.record.parentLengthM;
    if (lc > 0 && lp > 0) {
      p[3] += Math.log(lc / lp);
      p[4]++;
    }
  }
  return p;
}

function sumParts(parts: Parts[], pick: ArrayLike<number>): { nF: number; sums: Parts } {
  const sums: Parts = [0, 0, 0, 0, 0];
  for (let k = 0; k < pick.length; k++) {
    const p = parts[pick[k]];
    for (let j = 0; j < 5; j++) sums[j] += p[j];
  }
  return { nF: pick.length, sums };
}

function ratiosFromSums({ nF, sums }: { nF: number; sums: Parts }): WbeRatios {
  const n = nF > 0 ? sums[0] / nF : NaN;
  const beta = sums[2] > 0 ? Math.exp(sums[1] / sums[2]) : NaN;
  const gamma = sums[4] > 0 ? Math.exp(sums[3] / sums[4]) : NaN;
  const ln = Math.log(n);
  return {
    n_furcations: nF,
    branching_ratio_n: finiteOrNull(n),
    radius_ratio_beta: finiteOrNull(beta),
    length_ratio_gamma: finiteOrNull(gamma),
    exponent_from_beta: finiteOrNull(-ln / Math.log(beta)),
    length_exponent_from_gamma: finiteOrNull(-ln / Math.log(gamma)),
    theta: finiteOrNull(-ln / Math.log(beta * beta * gamma)),
  };
}

/** Pooled ratios plus a bootstrap interval for θ and the β-implied exponent (resampling furcations). */
export function wbeWithInterval(
  furcations: EvaluatedFurcation[],
  replicates: number,
  confidence: number,
  rng: Random,
): WbeRatios & { theta_ci95: [number | null, number | null]; exponent_from_beta_ci95: [number | null, number | null] } {
  const parts = furcations.map(wbeParts);
  const point = ratiosFromSums(sumParts(parts, parts.map((_, k) => k)));
  const n = furcations.length;
  const theta = new Float64Array(replicates).fill(NaN);
  const aBeta = new Float64Array(replicates).fill(NaN);
  if (n > 0) {
    const pick = new Int32Array(n);
    for (let b = 0; b < replicates; b++) {
      for (let k = 0; k < n; k++) pick[k] = rng.int(n);
      const r = ratiosFromSums(sumParts(parts, pick));
      theta[b] = r.theta ?? NaN;
      aBeta[b] = r.exponent_from_beta ?? NaN;
    }
  }
  return { ...point, theta_ci95: percentileInterval(theta, confidence), exponent_from_beta_ci95: percentileInterval(aBeta, confidence) };
}
