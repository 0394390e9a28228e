import type { Network, Segment } from '../types/network.js';
import { SegmentTree } from './node-tree.js';

/**
 * A network whose segments carry branchId, branchOrder and strahlerOrder, plus per-segment
 * arrays (index = position in `segments`, same as in `tree`).
 */
export interface AnnotatedNetwork extends Network {
  /** Tree over the NEW segments (same indices as the arrays below). */
  tree: SegmentTree;
  /** Path length along the network from the stem base to the END of the segment, m. */
  pathLengthFromBaseM: Float64Array;
  /**
   * Longest path from the START of the segment down to the end of a tip it supplies, m
   * (a tip segment's value is its own length).
   */
  distanceFromApexM: Float64Array;
  /** Number of tip segments in the subtree of the segment (a tip supplies itself: 1). */
  tipsSupplied: Int32Array;
  /** Total segment length of the subtree, the segment itself included, m. */
  lengthSuppliedM: Float64Array;
  /** Index of the main continuation child, -1 for tips. */
  mainChild: Int32Array;
}

/** A furcation: a segment with two or more children. Indices are positions in `segments`. */
export interface Furcation {
  parentIndex: number;
  childIndices: number[];
}

/** Segment length used for all path sums: `lengthM` when it is a positive number, else the end-to-end distance. */
export function lengthOf(s: Segment): number {
  if (s.lengthM > 0) return s.lengthM;
  return Math.hypot(s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]);
}

/**
 * Annotate a network with branches, centrifugal orders (trunk 0), Strahler orders (tips 1) and
 * path quantities. Returns a new network; the input is not modified.
 *
 * Branch rule: a single child continues its parent's branch. At a furcation the main
 * continuation is the child with the largest radius; ties go to the child supplying the most
 * length, then to the first in input order. The main child keeps the parent's branch id and order;
 * every other child starts a new branch with order + 1. Branch ids are numbered 0, 1, 2 … in
 * pre-order (trunk 0).
 *
 * Strahler order (Strahler 1957, Trans. AGU 38:913): tips 1; a segment whose highest child order k
 * occurs in two or more children gets k + 1, otherwise k. Single-child chains keep the order.
 *
 * @param network segments with parent links (ids unique, one root, no cycles)
 * @throws XylemapError from SegmentTree on broken topology
 */
export function annotateNetwork(network: Network): AnnotatedNetwork {
  const source = SegmentTree.fromNetwork(network);
  const n = source.size;
  const segs = source.segments;
  const children = source.children;

  const length = new Float64Array(n);
  for (let i = 0; i < n; i++) length[i] = lengthOf(segs[i]);

  const lengthSuppliedM = source.sum((i) => length[i]);
  const tipsF = source.sum((i) => (children[i].length === 0 ? 1 : 0));
  const tipsSupplied = Int32Array.from(tipsF);

  const distanceFromApexM = new Float64Array(n);
  const strahler = new Int32Array(n);
  const mainChild = new Int32Array(n).fill(-1);
  source.eachAfter((i) => {
    const kids = children[i];
    let longest = 0;
    let kMax = 0;
    let kCount = 0;
    let best = -1;
    for (const c of kids) {
      if (distanceFromApexM[c] > longest) longest = distanceFromApexM[c];
      if (strahler[c] > kMax) {
        kMax = strahler[c];
        kCount = 1;
      } else if (strahler[c] === kMax) kCount++;
      if (best < 0 || isBetterContinuation(c, best, segs, lengthSuppliedM)) best = c;
    }
    distanceFromApexM[i] = length[i] + longest;
    strahler[i] = kids.length === 0 ? 1 : kCount >= 2 ? kMax + 1 : kMax;
    mainChild[i] = best;
  });

  const branchId = new Int32Array(n);
  const branchOrder = new Int32Array(n);
  const pathLengthFromBaseM = new Float64Array(n);
  let nextBranch = 1;
  source.eachBefore((i) => {
    const p = source.parent[i];
    if (p < 0) {
      branchId[i] = 0;
      branchOrder[i] = 0;
      pathLengthFromBaseM[i] = length[i];
      return;
    }
    pathLengthFromBaseM[i] = pathLengthFromBaseM[p] + length[i];
    if (mainChild[p] === i) {
      branchId[i] = branchId[p];
      branchOrder[i] = branchOrder[p];
    } else {
      branchId[i] = nextBranch++;
      branchOrder[i] = branchOrder[p] + 1;
    }
  });

  const segments: Segment[] = segs.map((s, i) => ({
    ...s,
    start: [...s.start],
    end: [...s.end],
    branchId: branchId[i],
    branchOrder: branchOrder[i],
    strahlerOrder: strahler[i],
    ...(s.extra ? { extra: { ...s.extra } } : {}),
  }));
  const tree = SegmentTree.fromNetwork(segments);
  return {
    segments,
    ...(network.crsWkt !== undefined ? { crsWkt: network.crsWkt } : {}),
    tree,
    pathLengthFromBaseM,
    distanceFromApexM,
    tipsSupplied,
    lengthSuppliedM,
    mainChild,
  };
}

/** True when child `a` is a better main continuation than child `b` (radius, then supplied length; ties keep `b`). */
function isBetterContinuation(a: number, b: number, segs: Segment[], supplied: Float64Array): boolean {
  if (segs[a].radiusM !== segs[b].radiusM) return segs[a].radiusM > segs[b].radiusM;
  return supplied[a] > supplied[b];
}

/**
 * All furcations (segments with ≥ 2 children), in pre-order, children in input order.
 * @param tree a SegmentTree (e.g. `annotateNetwork(net).tree`)
 */
export function furcations(tree: SegmentTree): Furcation[] {
  const out: Furcation[] = [];
  tree.eachBefore((i) => {
    if (tree.children[i].length >= 2) out.push({ parentIndex: i, childIndices: [...tree.children[i]] });
  });
  return out;
}
