import { createKnnScratch, knn, type KdTree } from '../graph/kdtree.js';
import { eigenSymmetric3 } from '../reconstruct/fit/eigen3.js';
import { shapeFeatures } from '../reconstruct/fit/pca.js';

/**
 * Eigenvalue shape features of every point's k-neighbourhood: linearity, planarity, scattering
 * (Demantké et al. 2011, ISPRS Archives XXXVIII-5/W12, on the square roots of the covariance
 * eigenvalues). Stems and branches are linear at the scale of a few centimetres; leaves are
 * planar or scattered.
 * @returns Float32Array of 3 × count: [linearity, planarity, scattering] per point
 */
export function shapeFeaturesOf(tree: KdTree, x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, k: number): Float32Array {
  const n = x.length;
  const out = new Float32Array(3 * n);
  const scratch = createKnnScratch(k);
  const e = new Float64Array(12);
  const f = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    const found = knn(tree, x[i], y[i], z[i], scratch);
    if (found < 3) continue;
    let mx = 0, my = 0, mz = 0;
    for (let a = 0; a < found; a++) {
      const j = scratch.idx[a];
      mx += x[j];
      my += y[j];
      mz += z[j];
    }
    mx /= found;
    my /= found;
    mz /= found;
    let xx = 0, xy = 0, xz = 0, yy = 0, yz = 0, zz = 0;
    for (let a = 0; a < found; a++) {
      const j = scratch.idx[a];
      const dx = x[j] - mx, dy = y[j] - my, dz = z[j] - mz;
      xx += dx * dx;
      xy += dx * dy;
      xz += dx * dz;
      yy += dy * dy;
      yz += dy * dz;
      zz += dz * dz;
    }
    eigenSymmetric3(xx, xy, xz, yy, yz, zz, e);
    shapeFeatures(Math.sqrt(Math.max(0, e[0])), Math.sqrt(Math.max(0, e[1])), Math.sqrt(Math.max(0, e[2])), f);
    out[3 * i] = f[0];
    out[3 * i + 1] = f[1];
    out[3 * i + 2] = f[2];
  }
  return out;
}

/**
 * Leaf mask from shape features: low linearity and a scattered (not a clean surface) neighbourhood.
 * Thresholds are options (common practice, no source for the defaults).
 * @returns 1 = leaf
 */
export function leafMask(features: Float32Array, linearityMax: number, scatteringMin: number): Uint8Array {
  const n = features.length / 3;
  const out = new Uint8Array(n);
  for (let i = 0; i < n; i++) if (features[3 * i] < linearityMax && features[3 * i + 2] >= scatteringMin) out[i] = 1;
  return out;
}
