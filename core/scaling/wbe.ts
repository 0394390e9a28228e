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
  let children = 0;
  let logBeta = 0;
  let nBeta = 0;
  let logGamma = 0;
  let nGamma = 0;
  for (const f of furcations) {
    children += f.childRadiiM.length;
    for (let i = 0; i < f.childRadiiM.length; i++) {
      logBeta += Math.log(f.childRadiiM[i] / f.parentRadiusM);
      nBeta++;
      const lc = f.record.childLengthsM[i];
      const lp = f.record.parentLengthM;
      if (lc > 0 && lp > 0) {
        logGamma += Math.log(lc / lp);
        nGamma++;
      }
    }
  }
  const nF = furcations.length;
  const n = nF > 0 ? children / nF : NaN;
  const beta = nBeta > 0 ? Math.exp(logBeta / nBeta) : NaN;
  const gamma = nGamma > 0 ? Math.exp(logGamma / nGamma) : NaN;
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
  const point = wbeRatios(furcations);
  const n = furcations.length;
  const theta = new Float64Array(replicates).fill(NaN);
  const aBeta = new Float64Array(replicates).fill(NaN);
  if (n > 0) {
    const pick: EvaluatedFurcation[] = new Array(n);
    for (let b = 0; b < replicates; b++) {
      for (let k = 0; k < n; k++) pick[k] = furcations[rng.int(n)];
      const r = wbeRatios(pick);
      theta[b] = r.theta ?? NaN;
      aBeta[b] = r.exponent_from_beta ?? NaN;
    }
  }
  return { ...point, theta_ci95: percentileInterval(theta, confidence), exponent_from_beta_ci95: percentileInterval(aBeta, confidence) };
}
