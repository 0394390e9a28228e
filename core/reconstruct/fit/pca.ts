import type { Vec3 } from '../../types/network.js';
import { eigenSymmetric3 } from './eigen3.js';

/** Principal axes of a point subset. */
export interface PcaResult {
  /** Weighted mean of the points, m. */
  centroid: Vec3;
  /** Eigenvalues of the (weighted, population) covariance, ascending, m². */
  values: Vec3;
  /** Unit eigenvectors matching `values`; vectors[2] is the direction of largest spread. */
  vectors: [Vec3, Vec3, Vec3];
  /** Number of points used. */
  count: number;
}

const scratch = new Float64Array(12);

/**
 * Weighted covariance and its eigen decomposition for the points `indices` of (x, y, z).
 *
 * Two passes (mean, then centred sums) so that coordinates far from the origin — a file in a
 * projected frame with values ~10⁶ m — do not lose the millimetre-scale spread to cancellation.
 *
 * @param x, y, z  coordinates, m
 * @param indices  which points to use
 * @param weights  optional non-negative weight per point, indexed like `x` (not like `indices`)
 * @returns null when there are no points or the total weight is not > 0
 */
export function pca(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  indices: ArrayLike<number>,
  weights?: ArrayLike<number>,
): PcaResult | null {
  const n = indices.length;
  if (n === 0) return null;
  let sw = 0;
  let mx = 0;
  let my = 0;
  let mz = 0;
  for (let k = 0; k < n; k++) {
    const i = indices[k];
    const w = weights ? weights[i] : 1;
    sw += w;
    mx += w * x[i];
    my += w * y[i];
    mz += w * z[i];
  }
  if (!(sw > 0)) return null;
  mx /= sw;
  my /= sw;
  mz /= sw;
  let cxx = 0;
  let cxy = 0;
  let cxz = 0;
  let cyy = 0;
  let cyz = 0;
  let czz = 0;
  for (let k = 0; k < n; k++) {
    const i = indices[k];
    const w = weights ? weights[i] : 1;
    const dx = x[i] - mx;
    const dy = y[i] - my;
    const dz = z[i] - mz;
    cxx += w * dx * dx;
    cxy += w * dx * dy;
    cxz += w * dx * dz;
    cyy += w * dy * dy;
    cyz += w * dy * dz;
    czz += w * dz * dz;
  }
  const e = scratch;
  eigenSymmetric3(cxx / sw, cxy / sw, cxz / sw, cyy / sw, cyz / sw, czz / sw, e);
  return {
    centroid: [mx, my, mz],
    values: [Math.max(0, e[0]), Math.max(0, e[1]), Math.max(0, e[2])],
    vectors: [
      [e[3], e[4], e[5]],
      [e[6], e[7], e[8]],
      [e[9], e[10], e[11]],
    ],
    count: n,
  };
}

/**
 * Per-neighbourhood shape features from three ascending values s0 ≤ s1 ≤ s2: linearity
 * (s2−s1)/s2, planarity (s1−s0)/s2, scattering s0/s2 — in [0, 1], summing to 1.
 * Demantké et al. 2011 (ISPRS Archives XXXVIII-5/W12) define them on the standard deviations
 * s = √λ; others use the eigenvalues λ themselves. Pass whichever the caller's rule names.
 * Writes [linearity, planarity, scattering] into out[offset..offset+2]; zeros when λ2 is not > 0.
 */
export function shapeFeatures(l0: number, l1: number, l2: number, out: Float64Array, offset = 0): void {
  if (!(l2 > 0)) {
    out[offset] = 0;
    out[offset + 1] = 0;
    out[offset + 2] = 0;
    return;
  }
  const a = Math.max(0, l0);
  const b = Math.max(a, l1);
  out[offset] = (l2 - b) / l2;
  out[offset + 1] = (b - a) / l2;
  out[offset + 2] = a / l2;
}
