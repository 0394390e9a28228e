/**
 * Power law K = c·DBH^d fitted by least squares on logarithms: ln K = ln c + d·ln DBH. The
 * intervals are the t-intervals of the log-log coefficients; c's interval is exp of ln c's.
 * (Log-log least squares is the usual allometric fit, e.g. Niklas 1994, Plant Allometry, ch. 2.)
 */
import { linearFit, type LinearFit } from './stats.js';

export interface PowerLawFit {
  /** Trees used (positive, finite DBH and conductance). */
  n: number;
  c: number;
  d: number;
  cCi95: [number, number];
  dCi95: [number, number];
  /** Residual sd of ln K (dimensionless). */
  logResidualSd: number;
  rSquared: number;
  /** DBH range of the trees the fit is based on, m. */
  dbhMinM: number;
  dbhMaxM: number;
}

/**
 * Fit K = c·DBH^d. Pairs with a non-positive or non-finite value are left out (a logarithm needs > 0).
 * @param dbhM stem diameters, m
 * @param conductance tree conductances, kg s⁻¹ MPa⁻¹
 * @param confidence interval level, e.g. 0.95
 * @returns the fit, or undefined when fewer than 3 usable trees or all DBH equal
 */
export function fitPowerLaw(
  dbhM: readonly number[],
  conductance: readonly number[],
  confidence: number,
): PowerLawFit | undefined {
  const lx: number[] = [];
  const ly: number[] = [];
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < dbhM.length; i++) {
    const d = dbhM[i];
    const k = conductance[i];
    if (!(d > 0 && k > 0 && Number.isFinite(d) && Number.isFinite(k))) continue;
    lx.push(Math.log(d));
    ly.push(Math.log(k));
    lo = Math.min(lo, d);
    hi = Math.max(hi, d);
  }
  if (lx.length < 3 || !(hi > lo)) return undefined;
  const f: LinearFit = linearFit(lx, ly, confidence);
  return {
    n: f.n,
    c: Math.exp(f.intercept),
    d: f.slope,
    cCi95: [Math.exp(f.interceptCi[0]), Math.exp(f.interceptCi[1])],
    dCi95: f.slopeCi,
    logResidualSd: f.residualSd,
    rSquared: f.rSquared,
    dbhMinM: lo,
    dbhMaxM: hi,
  };
}

/** K = c·DBH^d for one stem, kg s⁻¹ MPa⁻¹. */
export function predictConductance(fit: Pick<PowerLawFit, 'c' | 'd'>, dbhM: number): number {
  return fit.c * Math.pow(dbhM, fit.d);
}
