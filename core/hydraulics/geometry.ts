import { XylemapError } from '../util/errors.js';
import { lengthOf } from '../topology/annotate.js';
import type { SegmentTree } from '../topology/node-tree.js';

/** Per-segment path quantities the hydraulic rules need, indexed like `tree.segments`. */
export interface PathGeometry {
  lengthM: Float64Array;
  /** Path length from the segment midpoint to the farthest tip it supplies, m (the L of conduit widening). */
  distanceFromApexM: Float64Array;
  /** Path length from the stem base to the segment end, m. */
  pathLengthToEndM: Float64Array;
  /** Number of tips the segment supplies (itself if a tip). */
  tipsSupplied: Float64Array;
}

/**
 * Path lengths along the network. The distance from the apex is taken to the farthest tip above
 * the segment (the leader of its subtree), measured from the segment midpoint so tips get L > 0
 * (topology's `distanceFromApexM` is measured from the segment start instead).
 * @throws XylemapError when a segment has neither a length_m > 0 nor distinct end points
 */
export function pathGeometry(tree: SegmentTree): PathGeometry {
  const n = tree.size;
  const lengthM = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = tree.segments[i];
    // Same length rule as the topology stage: length_m, or the end-to-end distance when it is not > 0.
    const len = lengthOf(s);
    if (!(len > 0)) {
      throw new XylemapError(`segment ${s.segmentId}: length_m must be > 0 m, got ${len}`, {
        stage: 'hydraulics',
        hint: 'remove or merge zero-length segments before the hydraulics stage',
      });
    }
    lengthM[i] = len;
  }
  // Distance from the segment END to its farthest tip, children first.
  const endToApex = new Float64Array(n);
  tree.eachAfter((i) => {
    let best = 0;
    for (const c of tree.children[i]) best = Math.max(best, endToApex[c] + lengthM[c]);
    endToApex[i] = best;
  });
  const distanceFromApexM = new Float64Array(n);
  for (let i = 0; i < n; i++) distanceFromApexM[i] = endToApex[i] + lengthM[i] / 2;
  const pathLengthToEndM = new Float64Array(n);
  tree.eachBefore((i) => {
    const p = tree.parent[i];
    pathLengthToEndM[i] = (p >= 0 ? pathLengthToEndM[p] : 0) + lengthM[i];
  });
  const tipsSupplied = tree.sum((i) => (tree.isTip(i) ? 1 : 0));
  return { lengthM, distanceFromApexM, pathLengthToEndM, tipsSupplied };
}
