import { createRandom } from '../../util/random.js';
import { select } from './robust.js';

/**
 * Circle fits in a plane, for the cross-section of a branch projected along its axis.
 *
 * Algebraic fits (Taubin 1991, IEEE PAMI 13:1115; Pratt 1987, SIGGRAPH 21:145) have no
 * iterations to diverge and, unlike the simple Kåsa fit, do not shrink the radius on a partial
 * arc; they are solved here by Newton's method on the characteristic polynomial of the moment
 * matrix as described by Chernov (2010, Circular and Linear Regression, CRC, §5.8 and §5.10,
 * from memory). The geometric refine then minimises Σ w (|p − c| − r)² by Levenberg–Marquardt.
 */
export interface Circle {
  cu: number;
  cv: number;
  radius: number;
}

/**
 * Taubin's algebraic circle fit.
 *
 * @param u, v  coordinates in the plane, m (only the first `n` are used)
 * @param n     number of points (default u.length)
 * @returns the circle, or null with fewer than 3 points, collinear points or non-finite input
 */
export function fitCircleTaubin(u: ArrayLike<number>, v: ArrayLike<number>, n?: number): Circle | null {
  return algebraicCircle(u, v, undefined, n ?? u.length, false);
}

/**
 * Pratt's algebraic circle fit (same calling convention as `fitCircleTaubin`). Slightly more
 * robust than Taubin on very short arcs, slightly more biased on full circles.
 */
export function fitCirclePratt(u: ArrayLike<number>, v: ArrayLike<number>, n?: number): Circle | null {
  return algebraicCircle(u, v, undefined, n ?? u.length, true);
}

/**
 * Weighted Taubin fit: each point's moment contribution is scaled by `w[i]` ≥ 0 — used to
 * re-fit the starting circle with robust weights when outliers spoil the first one.
 */
export function fitCircleTaubinWeighted(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  w: ArrayLike<number>,
  n?: number,
): Circle | null {
  return algebraicCircle(u, v, w, n ?? u.length, false);
}

function algebraicCircle(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  w: ArrayLike<number> | undefined,
  n: number,
  pratt: boolean,
): Circle | null {
  if (!(n >= 3)) return null;
  let sw = 0;
  let mu = 0;
  let mv = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    mu += wi * u[i];
    mv += wi * v[i];
  }
  if (!(sw > 0)) return null;
  mu /= sw;
  mv /= sw;
  let muu = 0;
  let mvv = 0;
  let muv = 0;
  let muz = 0;
  let mvz = 0;
  let mzz = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    const a = u[i] - mu;
    const b = v[i] - mv;
    const zz = a * a + b * b;
    muu += wi * a * a;
    mvv += wi * b * b;
    muv += wi * a * b;
    muz += wi * a * zz;
    mvz += wi * b * zz;
    mzz += wi * zz * zz;
  }
  muu /= sw;
  mvv /= sw;
  muv /= sw;
  muz /= sw;
  mvz /= sw;
  mzz /= sw;
  const mz = muu + mvv;
  if (!(mz > 0)) return null; // all points coincide (or NaN)
  // Work in units of the spread so the polynomial coefficients are O(1).
  const s2 = mz;
  const s = Math.sqrt(s2);
  const Muu = muu / s2;
  const Mvv = mvv / s2;
  const Muv = muv / s2;
  const Muz = muz / (s2 * s);
  const Mvz = mvz / (s2 * s);
  const Mzz = mzz / (s2 * s2);
  const Mz = 1;
  const covUV = Muu * Mvv - Muv * Muv;
  // Collinear points: the second moment matrix is singular.
  if (!(covUV > 1e-14)) return null;
  if (pratt) return prattNewton(Muu, Mvv, Muv, Muz, Mvz, Mzz, mu, mv, s);
  const varZ = Mzz - Mz * Mz;
  // Taubin's characteristic polynomial P(x) = a0 + a1 x + a2 x² + a3 x³.
  const a3 = 4 * Mz;
  const a2 = -3 * Mz * Mz - Mzz;
  const a1 = varZ * Mz + 4 * covUV * Mz - Muz * Muz - Mvz * Mvz;
  const a0 = Muz * (Muz * Mvv - Mvz * Muv) + Mvz * (Mvz * Muu - Muz * Muv) - varZ * covUV;
  // Newton from x = 0 towards the smallest positive root; stop when |P| stops decreasing.
  let x = 0;
  let y = a0;
  const a22 = 2 * a2;
  const a33 = 3 * a3;
  for (let it = 0; it < 99; it++) {
    const dy = a1 + x * (a22 + a33 * x);
    const xNew = x - y / dy;
    if (xNew === x || !Number.isFinite(xNew)) break;
    const yNew = a0 + xNew * (a1 + xNew * (a2 + xNew * a3));
    if (Math.abs(yNew) >= Math.abs(y)) break;
    x = xNew;
    y = yNew;
  }
  const det = x * x - x * Mz + covUV;
  if (!(Math.abs(det) > 1e-300)) return null;
  const cu = (Muz * (Mvv - x) - Mvz * Muv) / det / 2;
  const cv = (Mvz * (Muu - x) - Muz * Muv) / det / 2;
  const r = Math.sqrt(cu * cu + cv * cv + Mz);
  const out = { cu: mu + cu * s, cv: mv + cv * s, radius: r * s };
  return Number.isFinite(out.cu) && Number.isFinite(out.cv) && Number.isFinite(out.radius) ? out : null;
}

function prattNewton(
  Muu: number,
  Mvv: number,
  Muv: number,
  Muz: number,
  Mvz: number,
  Mzz: number,
  mu: number,
  mv: number,
  s: number,
): Circle | null {
  const Mz = Muu + Mvv;
  const covUV = Muu * Mvv - Muv * Muv;
  const a2 = 4 * covUV - 3 * Mz * Mz - Mzz;
  const a1 = Mzz * Mz + 4 * covUV * Mz - Muz * Muz - Mvz * Mvz - Mz * Mz * Mz;
  const a0 = Muz * Muz * Mvv + Mvz * Mvz * Muu - Mzz * covUV - 2 * Muz * Mvz * Muv + Mz * Mz * covUV;
  const a22 = 2 * a2;
  let x = 0;
  let y = 1e20;
  for (let it = 0; it < 99; it++) {
    const yOld = y;
    y = a0 + x * (a1 + x * (a2 + 4 * x * x));
    if (Math.abs(y) > Math.abs(yOld)) break;
    const dy = a1 + x * (a22 + 16 * x * x);
    const xNew = x - y / dy;
    if (!Number.isFinite(xNew)) break;
    if (Math.abs(xNew - x) <= 1e-15 * Math.max(1, Math.abs(xNew))) {
      x = xNew;
      break;
    }
    x = xNew;
  }
  const det = x * x - x * Mz + covUV;
  if (!(Math.abs(det) > 1e-300)) return null;
  const cu = (Muz * (Mvv - x) - Mvz * Muv) / det / 2;
  const cv = (Mvz * (Muu - x) - Muz * Muv) / det / 2;
  const r2 = cu * cu + cv * cv + Mz + 2 * x;
  if (!(r2 > 0)) return null;
  const out = { cu: mu + cu * s, cv: mv + cv * s, radius: Math.sqrt(r2) * s };
  return Number.isFinite(out.cu) && Number.isFinite(out.cv) && Number.isFinite(out.radius) ? out : null;
}

/**
 * Geometric refine of a circle: Levenberg–Marquardt on d_i = |p_i − c| − r with optional
 * weights. Returns the refined circle (or the start if it cannot improve it).
 *
 * @param start  starting circle, e.g. from `fitCircleTaubin`
 * @param maxIterations  LM iterations (default 50)
 */
export function refineCircleGeometric(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  start: Circle,
  options: { n?: number; weights?: ArrayLike<number>; maxIterations?: number } = {},
): Circle {
  const n = options.n ?? u.length;
  const w = options.weights;
  const maxIt = options.maxIterations ?? 50;
  let cu = start.cu;
  let cv = start.cv;
  let r = start.radius;
  let lambda = 1e-3;
  let cost = circleCost(u, v, w, n, cu, cv, r);
  for (let it = 0; it < maxIt; it++) {
    // Normal equations JᵀWJ δ = −JᵀW d with J rows (−(u−cu)/ρ, −(v−cv)/ρ, −1).
    let h00 = 0, h01 = 0, h02 = 0, h11 = 0, h12 = 0, h22 = 0;
    let g0 = 0, g1 = 0, g2 = 0;
    for (let i = 0; i < n; i++) {
      const wi = w ? w[i] : 1;
      if (wi === 0) continue;
      const du = u[i] - cu;
      const dv = v[i] - cv;
      const rho = Math.sqrt(du * du + dv * dv);
      if (!(rho > 0)) continue;
      const j0 = -du / rho;
      const j1 = -dv / rho;
      const d = rho - r;
      h00 += wi * j0 * j0;
      h01 += wi * j0 * j1;
      h02 -= wi * j0;
      h11 += wi * j1 * j1;
      h12 -= wi * j1;
      h22 += wi;
      g0 += wi * j0 * d;
      g1 += wi * j1 * d;
      g2 -= wi * d;
    }
    let improved = false;
    for (let tries = 0; tries < 10; tries++) {
      const a00 = h00 * (1 + lambda);
      const a11 = h11 * (1 + lambda);
      const a22 = h22 * (1 + lambda);
      const step = solve3(a00, h01, h02, a11, h12, a22, -g0, -g1, -g2);
      if (!step) {
        lambda *= 10;
        continue;
      }
      const nu = cu + step[0];
      const nv = cv + step[1];
      const nr = r + step[2];
      const c = circleCost(u, v, w, n, nu, nv, nr);
      if (c <= cost) {
        const small = Math.abs(step[0]) + Math.abs(step[1]) + Math.abs(step[2]) <= 1e-12 * (Math.abs(r) + 1e-300);
        cu = nu;
        cv = nv;
        r = nr;
        cost = c;
        lambda = Math.max(lambda / 10, 1e-12);
        improved = !small;
        break;
      }
      lambda *= 10;
    }
    if (!improved) break;
  }
  return { cu, cv, radius: Math.abs(r) };
}

function circleCost(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  w: ArrayLike<number> | undefined,
  n: number,
  cu: number,
  cv: number,
  r: number,
): number {
  let c = 0;
  for (let i = 0; i < n; i++) {
    const du = u[i] - cu;
    const dv = v[i] - cv;
    const d = Math.sqrt(du * du + dv * dv) - r;
    c += (w ? w[i] : 1) * d * d;
  }
  return c;
}

/** Solve a symmetric 3×3 system by Cramer's rule; null when singular. */
function solve3(
  a00: number,
  a01: number,
  a02: number,
  a11: number,
  a12: number,
  a22: number,
  b0: number,
  b1: number,
  b2: number,
): [number, number, number] | null {
  const c00 = a11 * a22 - a12 * a12;
  const c01 = a02 * a12 - a01 * a22;
  const c02 = a01 * a12 - a02 * a11;
  const det = a00 * c00 + a01 * c01 + a02 * c02;
  if (!(Math.abs(det) > 0) || !Number.isFinite(det)) return null;
  const c11 = a00 * a22 - a02 * a02;
  const c12 = a01 * a02 - a00 * a12;
  const c22 = a00 * a11 - a01 * a01;
  return [
    (c00 * b0 + c01 * b1 + c02 * b2) / det,
    (c01 * b0 + c11 * b1 + c12 * b2) / det,
    (c02 * b0 + c12 * b1 + c22 * b2) / det,
  ];
}

/**
 * Least-median-of-squares circle (Rousseeuw 1984, JASA 79:871): among circles through random
 * triples of points, the one with the smallest median |ρ − r|. Breaks down only beyond 50 %
 * outliers, where algebraic fits break down at the first gross outlier; used as the start when
 * outliers are expected. Triples are drawn from a fixed seed, so the result is repeatable.
 *
 * @param samples  number of triples tried (default 40: with 30 % outliers the chance that no
 *                 triple is all inliers is (1 − 0.7³)⁴⁰ ≈ 5e-8)
 * @param scratch  optional work array of length ≥ n
 * @returns the best circle and its median |ρ − r|, or null if no triple gives a circle
 */
export function fitCircleLmeds(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  n: number = u.length,
  samples = 40,
  scratch: Float64Array = new Float64Array(n),
): { circle: Circle; medianAbsM: number } | null {
  if (!(n >= 3)) return null;
  const rnd = createRandom(0x5eed + n);
  // Score candidates on an evenly strided subset: the median of 128 residuals ranks circles as
  // well as the median of all, at a fraction of the cost for 1000-point segments.
  const m = Math.min(n, LMEDS_EVAL_POINTS);
  const su = new Float64Array(m);
  const sv = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const i = Math.floor((k * n) / m);
    su[k] = u[i];
    sv[k] = v[i];
  }
  let best: Circle | null = null;
  let bestMed = Infinity;
  for (let s = 0; s < samples; s++) {
    const i = rnd.int(n);
    let j = rnd.int(n - 1);
    if (j >= i) j++;
    let k = rnd.int(n - 2);
    if (k >= Math.min(i, j)) k++;
    if (k >= Math.max(i, j)) k++;
    const c = circleThrough(u[i], v[i], u[j], v[j], u[k], v[k]);
    if (!c) continue;
    const med = medianAbsResidual(su, sv, m, c, scratch);
    if (med < bestMed) {
      bestMed = med;
      best = c;
    }
  }
  if (!best) return null;
  return { circle: best, medianAbsM: m === n ? bestMed : medianAbsResidual(u, v, n, best, scratch) };
}

/** Points on which LMedS candidates are ranked. */
const LMEDS_EVAL_POINTS = 128;

/** Median |ρ − r| of the first n points for circle c; scratch length ≥ n. */
export function medianAbsResidual(
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  n: number,
  c: Circle,
  scratch: Float64Array,
): number {
  const cu = c.cu;
  const cv = c.cv;
  const r = c.radius;
  for (let i = 0; i < n; i++) {
    const du = u[i] - cu;
    const dv = v[i] - cv;
    scratch[i] = Math.abs(Math.sqrt(du * du + dv * dv) - r);
  }
  return select(scratch.subarray(0, n), n >> 1);
}

/** Circle through three points; null when they are (nearly) collinear. */
function circleThrough(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): Circle | null {
  const bxr = bx - ax;
  const byr = by - ay;
  const cxr = cx - ax;
  const cyr = cy - ay;
  const d = 2 * (bxr * cyr - byr * cxr);
  const scale = (bxr * bxr + byr * byr) * (cxr * cxr + cyr * cyr);
  if (!(d * d > 1e-12 * scale)) return null;
  const b2 = bxr * bxr + byr * byr;
  const c2 = cxr * cxr + cyr * cyr;
  const ux = (cyr * b2 - byr * c2) / d;
  const uy = (bxr * c2 - cxr * b2) / d;
  const r = Math.hypot(ux, uy);
  return Number.isFinite(r) ? { cu: ax + ux, cv: ay + uy, radius: r } : null;
}
