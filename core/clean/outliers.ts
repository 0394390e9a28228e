import { createKnnScratch, knn, type KdTree } from '../graph/kdtree.js';

/**
 * Statistical outlier removal: the mean distance of each point to its k nearest neighbours is
 * compared with the distribution over all points; points beyond mean + ratio × std are outliers
 * (Rusu et al. 2008, Robotics and Autonomous Systems 56:927, "statistical outlier removal").
 * @returns per point 1 = outlier, and the median distance to the nearest neighbour (m)
 */
export function statisticalOutliers(
  tree: KdTree,
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  k: number,
  stdRatio: number,
): { outlier: Uint8Array; medianSpacingM: number } {
  const n = x.length;
  const nearest = new Float64Array(n);
  const meanDist = new Float64Array(n);
  const scratch = createKnnScratch(k + 1);
  let sum = 0;
  let sum2 = 0;
  for (let i = 0; i < n; i++) {
    const found = knn(tree, x[i], y[i], z[i], scratch);
    let s = 0;
    let c = 0;
    for (let f = 0; f < found; f++) {
      if (scratch.idx[f] === i) continue;
      const d = Math.sqrt(scratch.d2[f]);
      if (c === 0) nearest[i] = d;
      s += d;
      c++;
    }
    const m = c > 0 ? s / c : Infinity;
    meanDist[i] = m;
    if (m < Infinity) {
      sum += m;
      sum2 += m * m;
    }
  }
  const mean = sum / n;
  const std = Math.sqrt(Math.max(0, sum2 / n - mean * mean));
  const limit = mean + stdRatio * std;
  const out = new Uint8Array(n);
  for (let i = 0; i < n; i++) if (!(meanDist[i] <= limit)) out[i] = 1;
  nearest.sort();
  return { outlier: out, medianSpacingM: n > 0 ? nearest[n >> 1] : 0 };
}
