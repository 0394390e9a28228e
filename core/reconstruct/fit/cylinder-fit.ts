import type { Vec3 } from '../../types/network.js';
import { eigenSymmetric3 } from './eigen3.js';
import {
  fitCircleLmeds,
  fitCircleTaubin,
  fitCircleTaubinWeighted,
  medianAbsResidual,
  type Circle,
} from './circle-fit.js';
import { madScale, robustPsi, robustWeights, type RobustLoss } from './robust.js';

/**
 * Robust least-squares cylinder fit to a point subset.
 *
 * Model: distance of point p to the surface d = |(p − c) × a| − r (c a point on the axis,
 * a the unit axis direction, r the radius). Start: axis from PCA of the points (or given), circle
 * from Taubin's algebraic fit of the points projected on the plane normal to the axis — for the
 * robust losses the better (by median residual) of that and a least-median-of-squares circle,
 * re-fitted with biweight weights, so outliers cannot drag the start. Refine:
 * Levenberg–Marquardt (Marquardt 1963, J. SIAM 11:431) on 5 parameters with analytic
 * derivatives, inside iteratively reweighted least squares with Tukey's biweight or Huber's loss
 * and a MAD scale.
 *
 * Parameters are local: at each step the frame (e1, e2, a) is rebuilt around the current axis and
 * the step is (α, β) tilting the axis towards e1/e2, (s, t) moving the axis point along e1/e2,
 * and δr. At zero step, with x, y, z the point's coordinates in that frame and ρ = √(x² + y²):
 *   ∂d/∂α = −x z/ρ,  ∂d/∂β = −y z/ρ,  ∂d/∂s = −x/ρ,  ∂d/∂t = −y/ρ,  ∂d/∂r = −1
 * (differentiate d² = |q|² − (q·a)² with q = p − c; derivation in the README). The axis point is
 * kept at the foot of the perpendicular from the centroid, so z is centred and tilt and shift
 * are nearly uncorrelated.
 *
 * The radius standard error is the M-estimator sandwich covariance at the solution,
 * n/(n−5) · A⁻¹ B A⁻¹ with A = Σ ψ'(d_i) J_i J_iᵀ and B = Σ ψ(d_i)² J_i J_iᵀ (Huber 1981, Robust
 * Statistics, §7.6). For unit weights and equal-variance residuals it reduces to the Gauss–Newton
 * σ̂² (JᵀJ)⁻¹; unlike σ̂² (JᵀWJ)⁻¹ it does not understate the spread of a down-weighted fit.
 */
export interface CylinderFit {
  /** Point on the axis nearest to the inliers' centroid, m (input frame). */
  axisPoint: Vec3;
  /** Unit axis direction (same sense as `initialAxis` when given, else z component ≥ 0). */
  axisDir: Vec3;
  radiusM: number;
  radiusSeM: number;
  /** Root mean square of the inliers' point-to-surface distances, m. */
  rmseM: number;
  /**
   * Fraction of the `ARC_SECTORS` angular sectors around the axis that hold inliers (at least one,
   * and at least a tenth of an even share of them).
   */
  arcCoverage: number;
  pointCount: number;
  /** Points within 3 robust σ of the surface. */
  inlierCount: number;
  /** Robust scale of the residuals at the solution (1.4826 · median |d|), m. */
  scaleM: number;
  converged: boolean;
  iterations: number;
  /** Axis points at the smallest and largest projection of the inliers, m. */
  start: Vec3;
  end: Vec3;
  /** Length between `start` and `end`, m. */
  lengthM: number;
}

export interface CylinderFitOptions {
  /** Starting axis direction (need not be unit); default: the main PCA axis of the points. */
  initialAxis?: Vec3;
  /** Range noise of the scanner, m (1σ); floors the robust scale so exact data keep their weights. */
  rangeNoiseM?: number;
  /** Levenberg–Marquardt iterations over all reweighting rounds (default 60). */
  maxIterations?: number;
  /** Robust loss (default 'tukey'). */
  robust?: RobustLoss;
  /**
   * Prior weight per point, indexed like `x` (e.g. lower for weak edge returns). Multiplies the
   * robust weights; points with weight ≤ 0 (or NaN) are left out. Default: all 1.
   */
  weights?: ArrayLike<number>;
}

/** Fewest points for which a 5-parameter fit is attempted. */
export const MIN_CYLINDER_POINTS = 6;
/** Number of angular sectors for arc coverage (each 22.5°). */
export const ARC_SECTORS = 16;
/** Inlier threshold in robust σ (common practice, no source). */
export const INLIER_SIGMAS = 3;

/** Reweighting rounds at most; IRLS shrinks the change ~5× per round on noisy data (measured). */
const REWEIGHT_ROUNDS = 12;
/** Accepted LM steps per reweighting round (the last round runs to convergence). */
const INNER_STEPS = 2;
/** An LM step smaller than this fraction of the noise σ ends a round. */
const STEP_TOL_SIGMA = 1e-4;
/** Random triples for the least-median start circle. */
const LMEDS_SAMPLES = 40;
/** Stop reweighting once a round moves the surface by less than this fraction of the noise σ. */
const MOVE_TOL_SIGMA = 1e-3;

/**
 * Fit a cylinder to the points `indices` of (x, y, z).
 *
 * @param x, y, z  coordinates, m (any frame; large offsets are handled)
 * @param indices  the points of the segment
 * @returns the fit, or null when there are fewer than 6 points, the points are collinear or
 *          coincident, or no finite fit exists; never a fit with NaN fields
 *
 * @example
 * const fit = fitCylinder(cloud.x, cloud.y, cloud.z, segmentPoints, { rangeNoiseM: 0.002 });
 * if (fit) console.log(fit.radiusM, fit.radiusSeM, fit.arcCoverage);
 */
export function fitCylinder(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  indices: ArrayLike<number>,
  options: CylinderFitOptions = {},
): CylinderFit | null {
  const prior = options.weights;
  if (prior) indices = positiveWeightIndices(indices, prior);
  const n = indices.length;
  if (!(n >= MIN_CYLINDER_POINTS)) return null;
  const loss: RobustLoss = options.robust ?? 'tukey';
  const maxIt = Math.max(1, options.maxIterations ?? 60);
  const noiseFloor = options.rangeNoiseM !== undefined && options.rangeNoiseM > 0 ? 0.5 * options.rangeNoiseM : 0;

  // Local copy relative to the centroid: precision for projected frames, and contiguous memory.
  let ox = 0;
  let oy = 0;
  let oz = 0;
  for (let k = 0; k < n; k++) {
    const i = indices[k];
    ox += x[i];
    oy += y[i];
    oz += z[i];
  }
  ox /= n;
  oy /= n;
  oz /= n;
  if (!Number.isFinite(ox + oy + oz)) return null;
  const ws = workspace(n);
  // Coordinates are only known to a few ulps of their magnitude; no σ below that.
  ws.roundingFloor = 8 * Number.EPSILON * Math.max(Math.abs(ox), Math.abs(oy), Math.abs(oz));
  const px = ws.px;
  const py = ws.py;
  const pz = ws.pz;
  ws.hasPrior = prior !== undefined;
  if (prior) for (let k = 0; k < n; k++) ws.pw[k] = prior[indices[k]];
  let cxx = 0, cxy = 0, cxz = 0, cyy = 0, cyz = 0, czz = 0;
  for (let k = 0; k < n; k++) {
    const i = indices[k];
    const a = x[i] - ox;
    const b = y[i] - oy;
    const c = z[i] - oz;
    px[k] = a;
    py[k] = b;
    pz[k] = c;
    cxx += a * a;
    cxy += a * b;
    cxz += a * c;
    cyy += b * b;
    cyz += b * c;
    czz += c * c;
  }
  const e = ws.eig;
  eigenSymmetric3(cxx / n, cxy / n, cxz / n, cyy / n, cyz / n, czz / n, e);
  const l1 = e[1];
  const l2 = e[2];
  // Collinear or coincident points: no cross-section to fit.
  if (!(l2 > 0) || !(l1 > 1e-12 * l2)) return null;

  const candidates: Vec3[] = [];
  if (options.initialAxis) {
    const a = options.initialAxis;
    const len = Math.hypot(a[0], a[1], a[2]);
    if (!(len > 0)) return null;
    candidates.push([a[0] / len, a[1] / len, a[2] / len]);
  } else {
    candidates.push([e[9], e[10], e[11]]);
    // A stub shorter than it is wide: its spread along the axis can be the smallest, not the
    // largest. Then try the other principal directions too.
    if (l2 < 1.5 * l1) {
      candidates.push([e[3], e[4], e[5]]);
      candidates.push([e[6], e[7], e[8]]);
    }
  }

  // Refine only from the candidate whose start circle fits best (wrong axes give ellipses, whose
  // circle residuals are large); fall back to the others if that refinement fails.
  const starts: Start[] = [];
  for (const axis of candidates) {
    const st = startCircle(ws, axis, loss, noiseFloor, candidates.length > 1);
    if (st) starts.push(st);
  }
  starts.sort((p, q) => p.medianAbsM - q.medianAbsM);
  let best: LocalFit | null = null;
  for (const st of starts) {
    best = refine(ws, st, loss, maxIt, noiseFloor);
    if (best) break;
  }
  if (!best) return null;
  return finish(ws, best, [ox, oy, oz], options.initialAxis, loss);
}

interface LocalFit {
  a: Vec3;
  c: Vec3;
  r: number;
  scale: number;
  inliers: number;
  converged: boolean;
  iterations: number;
}

class Workspace {
  readonly n: number;
  readonly px: Float64Array;
  readonly py: Float64Array;
  readonly pz: Float64Array;
  readonly u: Float64Array;
  readonly v: Float64Array;
  readonly d: Float64Array;
  readonly w: Float64Array;
  readonly scratch: Float64Array;
  readonly j0: Float64Array;
  readonly j1: Float64Array;
  readonly j2: Float64Array;
  readonly j3: Float64Array;
  readonly psi: Float64Array;
  readonly dpsi: Float64Array;
  readonly eig = new Float64Array(12);
  readonly h = new Float64Array(25);
  readonly m = new Float64Array(25);
  readonly g = new Float64Array(5);
  readonly step = new Float64Array(5);
  readonly pw: Float64Array;
  hasPrior = false;
  roundingFloor = 0;
  constructor(n: number, buf: Float64Array) {
    this.n = n;
    this.px = buf.subarray(0, n);
    this.py = buf.subarray(n, 2 * n);
    this.pz = buf.subarray(2 * n, 3 * n);
    this.u = buf.subarray(3 * n, 4 * n);
    this.v = buf.subarray(4 * n, 5 * n);
    this.d = buf.subarray(5 * n, 6 * n);
    this.w = buf.subarray(6 * n, 7 * n);
    this.scratch = buf.subarray(7 * n, 8 * n);
    this.j0 = buf.subarray(8 * n, 9 * n);
    this.j1 = buf.subarray(9 * n, 10 * n);
    this.j2 = buf.subarray(10 * n, 11 * n);
    this.j3 = buf.subarray(11 * n, 12 * n);
    this.psi = buf.subarray(12 * n, 13 * n);
    this.dpsi = buf.subarray(13 * n, 14 * n);
    this.pw = buf.subarray(14 * n, 15 * n);
  }
}

/**
 * One buffer reused across fits, so a fit allocates only a few small objects (the pipeline runs
 * tens of thousands of fits). Safe because a fit runs to completion synchronously.
 */
const WORK_ARRAYS = 15;
let sharedBuffer = new Float64Array(WORK_ARRAYS * 1024);
function workspace(n: number): Workspace {
  if (sharedBuffer.length < WORK_ARRAYS * n) {
    sharedBuffer = new Float64Array(WORK_ARRAYS * Math.max(n, (2 * sharedBuffer.length) / WORK_ARRAYS));
  }
  return new Workspace(n, sharedBuffer);
}

/** Unit vectors e1, e2 completing a to an orthonormal basis (a must be unit). */
function frame(a: Vec3): [Vec3, Vec3] {
  // Pick the coordinate axis least aligned with a, as in the eigen solver.
  let e1: Vec3;
  if (Math.abs(a[0]) > Math.abs(a[1])) {
    const inv = 1 / Math.hypot(a[0], a[2]);
    e1 = [-a[2] * inv, 0, a[0] * inv];
  } else {
    const inv = 1 / Math.hypot(a[1], a[2]);
    e1 = [0, a[2] * inv, -a[1] * inv];
  }
  const e2: Vec3 = [a[1] * e1[2] - a[2] * e1[1], a[2] * e1[0] - a[0] * e1[2], a[0] * e1[1] - a[1] * e1[0]];
  return [e1, e2];
}

/** Residuals d_i = ρ_i − r into ws.d; returns nothing. */
function residuals(ws: Workspace, a: Vec3, c: Vec3, r: number): void {
  const { px, py, pz, d, n } = ws;
  for (let i = 0; i < n; i++) {
    const qx = px[i] - c[0];
    const qy = py[i] - c[1];
    const qz = pz[i] - c[2];
    const t = qx * a[0] + qy * a[1] + qz * a[2];
    const rho2 = qx * qx + qy * qy + qz * qz - t * t;
    d[i] = Math.sqrt(rho2 > 0 ? rho2 : 0) - r;
  }
}

function weightedCost(ws: Workspace, a: Vec3, c: Vec3, r: number): number {
  const { px, py, pz, w, n } = ws;
  let cost = 0;
  for (let i = 0; i < n; i++) {
    const wi = w[i];
    if (wi === 0) continue;
    const qx = px[i] - c[0];
    const qy = py[i] - c[1];
    const qz = pz[i] - c[2];
    const t = qx * a[0] + qy * a[1] + qz * a[2];
    const rho2 = qx * qx + qy * qy + qz * qz - t * t;
    const di = Math.sqrt(rho2 > 0 ? rho2 : 0) - r;
    cost += wi * di * di;
  }
  return cost;
}

/** Move c along a to the foot of the perpendicular from the local origin (the centroid). */
function footOfOrigin(c: Vec3, a: Vec3): Vec3 {
  const t = c[0] * a[0] + c[1] * a[1] + c[2] * a[2];
  return [c[0] - t * a[0], c[1] - t * a[1], c[2] - t * a[2]];
}

function setWeights(ws: Workspace, loss: RobustLoss, sigma: number): void {
  robustWeights(loss, ws.d, ws.w, ws.n, sigma);
  applyPrior(ws, ws.w);
}

/** Multiply per-point values by the prior weights, if any. */
function applyPrior(ws: Workspace, a: Float64Array): void {
  if (!ws.hasPrior) return;
  const { pw, n } = ws;
  for (let i = 0; i < n; i++) a[i] *= pw[i];
}

/** The entries of `indices` whose weight is > 0. */
function positiveWeightIndices(indices: ArrayLike<number>, weights: ArrayLike<number>): Int32Array {
  let m = 0;
  for (let k = 0; k < indices.length; k++) if (weights[indices[k]] > 0) m++;
  const out = new Int32Array(m);
  m = 0;
  for (let k = 0; k < indices.length; k++) if (weights[indices[k]] > 0) out[m++] = indices[k];
  return out;
}

/**
 * JᵀWJ (upper triangle, row-major 5×5) into ws.h and JᵀWd into ws.g at the current parameters.
 * Scalar accumulators in one loop: passing doubles to a non-inlined helper per point boxed them
 * and spent ~20 % of the fit in garbage collection (measured with --cpu-prof).
 */
function normalEquations(ws: Workspace, a: Vec3, c: Vec3, r: number, e1: Vec3, e2: Vec3): void {
  const { px, py, pz, w, n, h, g } = ws;
  const c0 = c[0], c1 = c[1], c2 = c[2];
  const a0 = a[0], a1 = a[1], a2 = a[2];
  const u0 = e1[0], u1 = e1[1], u2 = e1[2];
  const v0 = e2[0], v1 = e2[1], v2 = e2[2];
  let h00 = 0, h01 = 0, h02 = 0, h03 = 0, h04 = 0;
  let h11 = 0, h12 = 0, h13 = 0, h14 = 0;
  let h22 = 0, h23 = 0, h24 = 0;
  let h33 = 0, h34 = 0, h44 = 0;
  let g0 = 0, g1 = 0, g2 = 0, g3 = 0, g4 = 0;
  for (let i = 0; i < n; i++) {
    const wi = w[i];
    if (wi === 0) continue;
    const qx = px[i] - c0;
    const qy = py[i] - c1;
    const qz = pz[i] - c2;
    const lx = qx * u0 + qy * u1 + qz * u2;
    const ly = qx * v0 + qy * v1 + qz * v2;
    const lz = qx * a0 + qy * a1 + qz * a2;
    const rho = Math.sqrt(lx * lx + ly * ly);
    if (!(rho > 0)) continue;
    const j2 = -lx / rho;
    const j3 = -ly / rho;
    const j0 = j2 * lz;
    const j1 = j3 * lz;
    const di = rho - r;
    const w0 = wi * j0, w1 = wi * j1, w2 = wi * j2, w3 = wi * j3;
    h00 += w0 * j0; h01 += w0 * j1; h02 += w0 * j2; h03 += w0 * j3; h04 -= w0;
    h11 += w1 * j1; h12 += w1 * j2; h13 += w1 * j3; h14 -= w1;
    h22 += w2 * j2; h23 += w2 * j3; h24 -= w2;
    h33 += w3 * j3; h34 -= w3;
    h44 += wi;
    g0 += w0 * di; g1 += w1 * di; g2 += w2 * di; g3 += w3 * di; g4 -= wi * di;
  }
  h[0] = h00; h[1] = h01; h[2] = h02; h[3] = h03; h[4] = h04;
  h[6] = h11; h[7] = h12; h[8] = h13; h[9] = h14;
  h[12] = h22; h[13] = h23; h[14] = h24;
  h[18] = h33; h[19] = h34; h[24] = h44;
  g[0] = g0; g[1] = g1; g[2] = g2; g[3] = g3; g[4] = g4;
}

function robustSigma(ws: Workspace, floor: number, r: number): number {
  const s = madScale(ws.d, ws.n, ws.scratch);
  // Exact synthetic data give s ≈ 1e-17; keep weights meaningful with a tiny relative floor.
  return Math.max(s, floor, ws.roundingFloor, 1e-9 * Math.max(Math.abs(r), 1e-3));
}

interface Start {
  axis: Vec3;
  circle: Circle;
  /** Median |ρ − r| of the start circle in the plane normal to the axis, m. */
  medianAbsM: number;
}

/** Start circle for one candidate axis: Taubin, or (robust losses) the better of Taubin and LMedS. */
function startCircle(ws: Workspace, axis: Vec3, loss: RobustLoss, floor: number, needMedian: boolean): Start | null {
  const { px, py, pz, u, v, n } = ws;
  const [e1, e2] = frame(axis);
  for (let i = 0; i < n; i++) {
    u[i] = px[i] * e1[0] + py[i] * e1[1] + pz[i] * e1[2];
    v[i] = px[i] * e2[0] + py[i] * e2[1] + pz[i] * e2[2];
  }
  let circle: Circle | null = ws.hasPrior ? fitCircleTaubinWeighted(u, v, ws.pw, n) : fitCircleTaubin(u, v, n);
  if (!circle) return null;
  if (loss === 'none') {
    return { axis, circle, medianAbsM: needMedian ? medianAbsResidual(u, v, n, circle, ws.scratch) : 0 };
  }
  // Outliers (leaves, mixed pixels, a neighbouring branch) can drag an algebraic fit far off
  // on a partial arc; a least-median start cannot be dragged by fewer than half the points.
  let med = medianAbsResidual(u, v, n, circle, ws.scratch);
  const lmeds = fitCircleLmeds(u, v, n, LMEDS_SAMPLES, ws.scratch);
  if (lmeds && lmeds.medianAbsM < med) {
    circle = lmeds.circle;
    med = lmeds.medianAbsM;
  }
  // Then re-fit it with biweight weights so the start uses all good points.
  const { d, w } = ws;
  for (let round = 0; round < 3; round++) {
    const cu = circle.cu;
    const cv = circle.cv;
    const cr = circle.radius;
    for (let i = 0; i < n; i++) {
      const du = u[i] - cu;
      const dv = v[i] - cv;
      d[i] = Math.sqrt(du * du + dv * dv) - cr;
    }
    const sigma = robustSigma(ws, floor, cr);
    robustWeights('tukey', d, w, n, sigma);
    applyPrior(ws, w);
    const next = fitCircleTaubinWeighted(u, v, w, n);
    if (!next) break;
    const nextMed = medianAbsResidual(u, v, n, next, ws.scratch);
    if (nextMed > med) break;
    circle = next;
    med = nextMed;
  }
  return { axis, circle, medianAbsM: med };
}

/** Robust Levenberg–Marquardt refinement of a cylinder from a start axis and circle. */
function refine(ws: Workspace, start: Start, loss: RobustLoss, maxIt: number, floor: number): LocalFit | null {
  const { px, py, pz, n } = ws;
  let a: Vec3 = start.axis;
  let [e1, e2] = frame(a);
  const circle = start.circle;
  let c: Vec3 = [
    circle.cu * e1[0] + circle.cv * e2[0],
    circle.cu * e1[1] + circle.cv * e2[1],
    circle.cu * e1[2] + circle.cv * e2[2],
  ];
  let r = circle.radius;
  if (!Number.isFinite(r) || !(r > 0)) return null;

  const { h, m, g, step, w, d } = ws;
  let iterations = 0;
  let converged = false;
  let sigma = 0;
  let lambda = 1e-3;
  for (let round = 0; round < REWEIGHT_ROUNDS && iterations < maxIt; round++) {
    residuals(ws, a, c, r);
    sigma = robustSigma(ws, floor, r);
    // Start with Huber, which is convex, before the redescending biweight.
    const roundLoss: RobustLoss = loss === 'tukey' && round === 0 ? 'huber' : loss;
    setWeights(ws, roundLoss, sigma);
    let cost = weightedCost(ws, a, c, r);
    let roundConverged = false;
    let moved = 0;
    let steps = 0;
    const stepTol = Math.max(1e-10 * Math.max(Math.abs(r), 1e-3), STEP_TOL_SIGMA * sigma);
    while (iterations < maxIt) {
      // Weights go stale as the surface moves: reweight after a few steps rather than
      // converging each round's weighted problem exactly (IRLS, Holland & Welsch 1977).
      if (loss !== 'none' && steps >= INNER_STEPS && round < REWEIGHT_ROUNDS - 1) break;
      iterations++;
      [e1, e2] = frame(a);
      normalEquations(ws, a, c, r, e1, e2);
      let accepted = false;
      for (let tries = 0; tries < 12; tries++) {
        for (let k = 0; k < 25; k++) m[k] = h[k];
        for (let k = 0; k < 5; k++) m[k * 6] = h[k * 6] * (1 + lambda) + 1e-30;
        for (let k = 0; k < 5; k++) step[k] = -g[k];
        if (!cholSolve5(m, step)) {
          lambda *= 10;
          continue;
        }
        const na0 = a[0] + step[0] * e1[0] + step[1] * e2[0];
        const na1 = a[1] + step[0] * e1[1] + step[1] * e2[1];
        const na2 = a[2] + step[0] * e1[2] + step[1] * e2[2];
        const nl = Math.hypot(na0, na1, na2);
        const na: Vec3 = [na0 / nl, na1 / nl, na2 / nl];
        const nc = footOfOrigin(
          [
            c[0] + step[2] * e1[0] + step[3] * e2[0],
            c[1] + step[2] * e1[1] + step[3] * e2[1],
            c[2] + step[2] * e1[2] + step[3] * e2[2],
          ],
          na,
        );
        const nr = r + step[4];
        const nCost = weightedCost(ws, na, nc, nr);
        if (Number.isFinite(nCost) && nCost <= cost) {
          const size =
            (Math.abs(step[0]) + Math.abs(step[1])) * Math.max(r, 1e-3) +
            Math.abs(step[2]) +
            Math.abs(step[3]) +
            Math.abs(step[4]);
          moved += size;
          a = na;
          c = nc;
          r = nr;
          const small = size <= stepTol || cost - nCost <= 1e-12 * cost;
          cost = nCost;
          lambda = Math.max(lambda * 0.1, 1e-12);
          accepted = true;
          steps++;
          if (small) roundConverged = true;
          break;
        }
        lambda *= 10;
      }
      if (!accepted) roundConverged = true; // no descent direction left: at a minimum
      if (roundConverged) break;
    }
    if (r < 0) r = -r; // safety only: LM never accepts a step through zero radius on real data
    if (!roundConverged && iterations >= maxIt) break; // iteration budget spent
    // Fixed weights (no loss) need one round; otherwise stop once reweighting no longer moves it.
    // With few points the biweight can flip a point in and out between rounds; the last round then
    // holds its weights and runs LM to convergence, a stationary point of that weighted problem.
    if (
      loss === 'none' ||
      (round > 0 && moved <= Math.max(1e-8 * Math.max(r, 1e-3), MOVE_TOL_SIGMA * sigma)) ||
      (round === REWEIGHT_ROUNDS - 1 && roundConverged)
    ) {
      converged = true;
      break;
    }
  }
  if (!Number.isFinite(r) || !(r > 0) || !Number.isFinite(a[0] + a[1] + a[2] + c[0] + c[1] + c[2])) return null;
  residuals(ws, a, c, r);
  sigma = robustSigma(ws, floor, r);
  let inliers = 0;
  for (let i = 0; i < n; i++) if (Math.abs(d[i]) <= INLIER_SIGMAS * sigma) inliers++;
  return { a, c, r, scale: sigma, inliers, converged, iterations };
}

/** Σ w J Jᵀ (upper triangle, row-major 5×5) for rows J = (j0, j1, j2, j3, −1). */
function weightedGram(
  j0: Float64Array,
  j1: Float64Array,
  j2: Float64Array,
  j3: Float64Array,
  w: Float64Array,
  n: number,
  out: Float64Array,
): void {
  let h00 = 0, h01 = 0, h02 = 0, h03 = 0, h04 = 0;
  let h11 = 0, h12 = 0, h13 = 0, h14 = 0;
  let h22 = 0, h23 = 0, h24 = 0;
  let h33 = 0, h34 = 0, h44 = 0;
  for (let i = 0; i < n; i++) {
    const wi = w[i];
    if (wi === 0) continue;
    const a = j0[i], b = j1[i], c = j2[i], d = j3[i];
    const w0 = wi * a, w1 = wi * b, w2 = wi * c, w3 = wi * d;
    h00 += w0 * a; h01 += w0 * b; h02 += w0 * c; h03 += w0 * d; h04 -= w0;
    h11 += w1 * b; h12 += w1 * c; h13 += w1 * d; h14 -= w1;
    h22 += w2 * c; h23 += w2 * d; h24 -= w2;
    h33 += w3 * d; h34 -= w3;
    h44 += wi;
  }
  out[0] = h00; out[1] = h01; out[2] = h02; out[3] = h03; out[4] = h04;
  out[6] = h11; out[7] = h12; out[8] = h13; out[9] = h14;
  out[12] = h22; out[13] = h23; out[14] = h24;
  out[18] = h33; out[19] = h34; out[24] = h44;
}

/**
 * Solve M x = b in place (b ← x) for symmetric positive definite 5×5 M given by its upper
 * triangle (row-major). Cholesky M = L Lᵀ, L stored in the lower triangle of M. False if not PD.
 */
export function cholSolve5(mat: Float64Array, b: Float64Array): boolean {
  const N = 5;
  for (let j = 0; j < N; j++) {
    let s = mat[j * N + j];
    for (let k = 0; k < j; k++) s -= mat[j * N + k] * mat[j * N + k];
    if (!(s > 0)) return false;
    const ljj = Math.sqrt(s);
    mat[j * N + j] = ljj;
    for (let i = j + 1; i < N; i++) {
      let t = mat[j * N + i]; // upper triangle holds M[j][i] = M[i][j]
      for (let k = 0; k < j; k++) t -= mat[i * N + k] * mat[j * N + k];
      mat[i * N + j] = t / ljj;
    }
  }
  for (let i = 0; i < N; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= mat[i * N + k] * b[k];
    b[i] = s / mat[i * N + i];
  }
  for (let i = N - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < N; k++) s -= mat[k * N + i] * b[k];
    b[i] = s / mat[i * N + i];
  }
  return true;
}

/** Final statistics in the input frame. */
function finish(
  ws: Workspace,
  f: LocalFit,
  origin: Vec3,
  initialAxis: Vec3 | undefined,
  loss: RobustLoss,
): CylinderFit | null {
  const { px, py, pz, d, n } = ws;
  let a = f.a;
  // Orientation: along the given axis, or upwards.
  const ref = initialAxis ?? [0, 0, 1];
  if (a[0] * ref[0] + a[1] * ref[1] + a[2] * ref[2] < 0) a = [-a[0], -a[1], -a[2]];
  const c = f.c;
  const r = f.r;
  residuals(ws, a, c, r);
  const sigma = f.scale;
  const limit = INLIER_SIGMAS * sigma;
  const [e1, e2] = frame(a);
  const sectorCount = new Int32Array(ARC_SECTORS);
  let inliers = 0;
  let sse = 0;
  let sx = 0, sy = 0, sz = 0;
  let tMin = Infinity;
  let tMax = -Infinity;
  // Per-point Jacobian rows and ψ, ψ' for the sandwich covariance, accumulated afterwards in
  // loops without per-point calls.
  const { j0, j1, j2, j3, psi, dpsi } = ws;
  robustPsi(loss, d, n, sigma, psi, dpsi);
  applyPrior(ws, psi);
  applyPrior(ws, dpsi);
  const c0 = c[0], c1 = c[1], c2 = c[2];
  for (let i = 0; i < n; i++) {
    const qx = px[i] - c0;
    const qy = py[i] - c1;
    const qz = pz[i] - c2;
    const lx = qx * e1[0] + qy * e1[1] + qz * e1[2];
    const ly = qx * e2[0] + qy * e2[1] + qz * e2[2];
    const lz = qx * a[0] + qy * a[1] + qz * a[2];
    const rho = Math.sqrt(lx * lx + ly * ly);
    const di = d[i];
    if (Math.abs(di) <= limit) {
      inliers++;
      sse += di * di;
      sx += px[i];
      sy += py[i];
      sz += pz[i];
      if (lz < tMin) tMin = lz;
      if (lz > tMax) tMax = lz;
      let ang = Math.atan2(ly, lx);
      if (ang < 0) ang += 2 * Math.PI;
      let s = Math.floor((ang / (2 * Math.PI)) * ARC_SECTORS);
      if (s >= ARC_SECTORS) s = ARC_SECTORS - 1;
      sectorCount[s]++;
    }
    if (!(rho > 0)) {
      psi[i] = 0;
      dpsi[i] = 0;
      j0[i] = j1[i] = j2[i] = j3[i] = 0;
      continue;
    }
    const cx = lx / rho;
    const cy = ly / rho;
    j0[i] = -cx * lz;
    j1[i] = -cy * lz;
    j2[i] = -cx;
    j3[i] = -cy;
  }
  let used = 0;
  for (let i = 0; i < n; i++) {
    if (psi[i] !== 0 || dpsi[i] !== 0) used++;
    psi[i] *= psi[i]; // ψ² is the weight of B
  }
  const A = new Float64Array(25);
  const B = new Float64Array(25);
  weightedGram(j0, j1, j2, j3, dpsi, n, A);
  weightedGram(j0, j1, j2, j3, psi, n, B);
  if (inliers === 0) return null;
  let covered = 0;
  // A sector counts when it holds a tenth of its even share of inliers (at least one), so a few
  // stray points near the surface do not fake coverage (common practice, no source).
  const minPerSector = Math.max(1, Math.round((0.1 * inliers) / ARC_SECTORS));
  for (let s = 0; s < ARC_SECTORS; s++) if (sectorCount[s] >= minPerSector) covered++;
  const radiusSe = sandwichRadiusSe(A, B, used);
  // Axis point nearest the inliers' centroid.
  const mx = sx / inliers;
  const my = sy / inliers;
  const mz = sz / inliers;
  const tm = (mx - c[0]) * a[0] + (my - c[1]) * a[1] + (mz - c[2]) * a[2];
  const ap: Vec3 = [origin[0] + c[0] + tm * a[0], origin[1] + c[1] + tm * a[1], origin[2] + c[2] + tm * a[2]];
  const start: Vec3 = [origin[0] + c[0] + tMin * a[0], origin[1] + c[1] + tMin * a[1], origin[2] + c[2] + tMin * a[2]];
  const end: Vec3 = [origin[0] + c[0] + tMax * a[0], origin[1] + c[1] + tMax * a[1], origin[2] + c[2] + tMax * a[2]];
  const out: CylinderFit = {
    axisPoint: ap,
    axisDir: [a[0], a[1], a[2]],
    radiusM: r,
    radiusSeM: radiusSe,
    rmseM: Math.sqrt(sse / inliers),
    arcCoverage: covered / ARC_SECTORS,
    pointCount: n,
    inlierCount: inliers,
    scaleM: sigma,
    converged: f.converged,
    iterations: f.iterations,
    start,
    end,
    lengthM: tMax - tMin,
  };
  return out;
}

/**
 * √ of the radius entry of n/(n−5) · A⁻¹ B A⁻¹. Returns +∞ when A is singular (radius
 * undetermined), which reliability rules treat as unusable, never NaN.
 */
function sandwichRadiusSe(A: Float64Array, B: Float64Array, used: number): number {
  if (used <= 5) return Infinity;
  // A⁻¹ e_r: solve A x = e_4, then var = xᵀ B x (A symmetric).
  const m = new Float64Array(A);
  const x = new Float64Array([0, 0, 0, 0, 1]);
  if (!cholSolve5(m, x)) return Infinity;
  let q = 0;
  for (let i = 0; i < 5; i++) {
    for (let j = 0; j < 5; j++) {
      const bij = i <= j ? B[i * 5 + j] : B[j * 5 + i];
      q += x[i] * bij * x[j];
    }
  }
  const v = (q * used) / (used - 5);
  return v >= 0 && Number.isFinite(v) ? Math.sqrt(v) : Infinity;
}
