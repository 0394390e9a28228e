import type { Network } from '../types/network.js';
import { annotateNetwork, lengthOf } from '../topology/annotate.js';

/** One row of the by-order table (centrifugal branching order, trunk 0). */
export interface OrderRow {
  order: number;
  segments: number;
  branches: number;
  lengthM: number;
  volumeM3: number;
  /** Length-weighted mean radius, m. */
  meanRadiusM: number;
  maxRadiusM: number;
  /** Share of segments flagged reliable, 0–1. */
  reliableShare: number;
}

/**
 * Per-segment path quantities and profiles the report plots, all from the network geometry.
 * Arrays are indexed like `network.segments`.
 */
export interface NetworkProfiles {
  /** Path length from the stem base to the segment's midpoint, m. */
  distanceFromBaseM: Float64Array;
  /**
   * Distance from the apex, m: the longest path from the segment's midpoint down to the end of a tip
   * it supplies (the distance used for conduit widening).
   */
  distanceFromApexM: Float64Array;
  /** Segment indices of the longest base-to-tip path, base first. */
  longestPath: number[];
  /** Segment indices of the trunk (branch order 0), base first, following the main continuation. */
  stemPath: number[];
  byOrder: OrderRow[];
}

/** Compute the report's profiles; iterative throughout (no recursion over segments). */
export function networkProfiles(network: Network): NetworkProfiles {
  const ann = annotateNetwork(network);
  const segs = network.segments;
  const n = segs.length;
  const { tree } = ann;
  const distanceFromBaseM = new Float64Array(n);
  const distanceFromApexM = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const half = lengthOf(segs[i]) / 2;
    distanceFromBaseM[i] = ann.pathLengthFromBaseM[i] - half;
    distanceFromApexM[i] = ann.distanceFromApexM[i] - half;
  }

  // Longest path: from the root, always step to the child with the longest way to an apex.
  const longestPath: number[] = [];
  for (let i = tree.root; i >= 0; ) {
    longestPath.push(i);
    let next = -1;
    for (const c of tree.children[i]) if (next < 0 || ann.distanceFromApexM[c] > ann.distanceFromApexM[next]) next = c;
    i = next;
  }
  const stemPath: number[] = [];
  for (let i = tree.root; i >= 0; i = ann.mainChild[i]) {
    if (segs[i].branchOrder !== segs[tree.root].branchOrder) break;
    stemPath.push(i);
  }

  const rows = new Map<number, { segments: number; branches: Set<number>; l: number; v: number; rl: number; rmax: number; ok: number }>();
  for (const s of segs) {
    let r = rows.get(s.branchOrder);
    if (!r) rows.set(s.branchOrder, (r = { segments: 0, branches: new Set(), l: 0, v: 0, rl: 0, rmax: 0, ok: 0 }));
    const l = lengthOf(s);
    r.segments++;
    r.branches.add(s.branchId);
    r.l += l;
    r.v += Math.PI * s.radiusM * s.radiusM * l;
    r.rl += s.radiusM * l;
    r.rmax = Math.max(r.rmax, s.radiusM);
    if (s.reliable) r.ok++;
  }
  const byOrder = [...rows.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([order, r]) => ({
      order,
      segments: r.segments,
      branches: r.branches.size,
      lengthM: r.l,
      volumeM3: r.v,
      meanRadiusM: r.l > 0 ? r.rl / r.l : 0,
      maxRadiusM: r.rmax,
      reliableShare: r.ok / r.segments,
    }));
  return { distanceFromBaseM, distanceFromApexM, longestPath, stemPath, byOrder };
}
