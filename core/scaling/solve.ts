/**
 * The area-preservation exponent of one furcation: the a with Σ (r_i / r_0)^a = 1
 * (a = 2 da Vinci's rule, a = 3 Murray's law, Murray 1926, PNAS 12:207).
 *
 * f(a) = Σ q_i^a − 1 with q_i = r_i / r_0 is strictly decreasing and convex in a when all q_i < 1,
 * with f(0) = N − 1 > 0 and f(∞) = −1, so there is exactly one root. f(1) = Σ q_i − 1, so the
 * root lies above 1 exactly when Σ r_i > r_0.
 */
export type FurcationStatus =
  /** root found in (1, exponent_max] */
  | 'solved'
  /** Σ r_i ≤ r_0: the root is ≤ 1 — children jointly no thicker than the parent */
  | 'children_thinner'
  /** max r_i ≥ r_0: no root — a child at least as thick as the parent */
  | 'child_thicker'
  /** root above exponent_max (a child nearly as thick as the parent) */
  | 'above_range'
  /** no reliable segment to take a parent or child radius from */
  | 'unreliable_segments'
  /** a child radius below min_radius_m */
  | 'below_min_radius';

export interface ExponentSolution {
  status: FurcationStatus;
  /** The root; for children_thinner the root in (0, 1]; NaN when there is none or it is above range. */
  exponent: number;
}

/**
 * Solve Σ (r_i / r_0)^a = 1 for a by a bracketed, safeguarded Newton iteration (Newton steps
 * from the left end never overshoot on a convex decreasing function; bisection if one would leave
 * the bracket). Converges to ~1e-14 relative.
 *
 * @param parentRadiusM r_0, m (> 0)
 * @param childRadiiM r_i, m (each > 0, at least two)
 * @param maxExponent upper end of the bracket
 */
export function solveExponent(parentRadiusM: number, childRadiiM: ArrayLike<number>, maxExponent = 50, hint = NaN): ExponentSolution {
  if (!(parentRadiusM > 0)) throw new RangeError(`parent radius must be > 0 m, got ${parentRadiusM}`);
  if (childRadiiM.length < 2) throw new RangeError(`a furcation needs at least 2 children, got ${childRadiiM.length}`);
  const lnq = new Float64Array(childRadiiM.length);
  for (let i = 0; i < lnq.length; i++) {
    if (!(childRadiiM[i] > 0)) throw new RangeError(`child radius must be > 0 m, got ${childRadiiM[i]}`);
    lnq[i] = Math.log(childRadiiM[i] / parentRadiusM);
  }
  return solveLogRatios(lnq, maxExponent, hint);
}

/**
 * The same on log ratios ln(r_i / r_0), without checks (the Monte Carlo inner loop).
 * @param hint a starting point near the expected root (e.g. the observed exponent), or NaN
 */
export function solveLogRatios(lnq: Float64Array, maxExponent: number, hint = NaN): ExponentSolution {
  let lnMax = -Infinity;
  let qSum = 0;
  for (let i = 0; i < lnq.length; i++) {
    if (lnq[i] > lnMax) lnMax = lnq[i];
    qSum += Math.exp(lnq[i]);
  }
  if (lnMax >= 0) return { status: 'child_thicker', exponent: NaN };
  if (qSum <= 1) return { status: 'children_thinner', exponent: rootOf(lnq, 0, 1, NaN) };
  if (sumPow(lnq, maxExponent) - 1 > 0) return { status: 'above_range', exponent: NaN };
  return { status: 'solved', exponent: rootOf(lnq, 1, maxExponent, hint) };
}

function sumPow(lnq: Float64Array, a: number): number {
  let s = 0;
  for (let i = 0; i < lnq.length; i++) s += Math.exp(a * lnq[i]);
  return s;
}

/** Root of Σ e^(a·ln q) − 1 in [lo, hi], given f(lo) ≥ 0 ≥ f(hi); starts at `hint` when it lies inside. */
function rootOf(lnq: Float64Array, lo: number, hi: number, hint: number): number {
  let a = lo;
  let b = hi;
  let x = hint > lo && hint < hi ? hint : lo;
  for (let iter = 0; iter < 200; iter++) {
    let f = -1;
    let df = 0;
    for (let i = 0; i < lnq.length; i++) {
      const p = Math.exp(x * lnq[i]);
      f += p;
      df += p * lnq[i];
    }
    if (f === 0) return x;
    if (f > 0) a = x;
    else b = x;
    let next = x - f / df;
    if (Math.abs(next - x) <= 1e-15 * Math.max(1, x)) return next;
    if (!(next > a && next < b)) next = 0.5 * (a + b);
    if (b - a <= 1e-15 * Math.max(1, x)) return next;
    x = next;
  }
  return x;
}

/**
 * Delta-method variance of the solved exponent from the radius standard errors (independent).
 * Implicit differentiation of F(a, r) = Σ (r_i/r_0)^a − 1 = 0: ∂a/∂r_i = −(a q_i^a / r_i)/F_a,
 * ∂a/∂r_0 = (a / r_0)/F_a with F_a = Σ q_i^a ln q_i (uses Σ q_i^a = 1 at the root).
 */
export function exponentVariance(
  exponent: number,
  parentRadiusM: number,
  parentSeM: number,
  childRadiiM: ArrayLike<number>,
  childSeM: ArrayLike<number>,
): number {
  const a = exponent;
  let fa = 0;
  for (let i = 0; i < childRadiiM.length; i++) {
    const q = childRadiiM[i] / parentRadiusM;
    fa += q ** a * Math.log(q);
  }
  let v = ((a / parentRadiusM / fa) * parentSeM) ** 2;
  for (let i = 0; i < childRadiiM.length; i++) {
    const q = childRadiiM[i] / parentRadiusM;
    v += ((a * q ** a) / childRadiiM[i] / fa * childSeM[i]) ** 2;
  }
  return v;
}
