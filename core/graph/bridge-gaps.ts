import { connectedComponents } from './components.js';
import { extendShortestPaths, type ShortestPaths } from './dijkstra.js';
import { createKnnScratch, knn, type KdTree } from './kdtree.js';
import type { NeighbourGraph } from './neighbour-graph.js';

export interface GapBridge {
  /** Vertex of the piece that was unreached. */
  from: number;
  /** Vertex of the already-reached set it was attached to. */
  to: number;
  lengthM: number;
}

export interface BridgeOptions {
  /** Longest gap that may be bridged, m. */
  maxGapM: number;
  /** Pieces with fewer vertices stay detached (treated as clutter). */
  minPieceVertices: number;
  /** Rounds of attaching (a piece attached in one round can carry others in the next). */
  maxRounds?: number;
  /**
   * Height of each vertex above the ground, m. With `minPieceTopM`, pieces that stay entirely
   * below that height are not bridged: near the ground they are streaks of mixed pixels between
   * the stem base and the ground, grass or litter, and once attached they carry clutter with them.
   * Bridges also land only on reached vertices at or above that height.
   */
  heightM?: ArrayLike<number>;
  minPieceTopM?: number;
  /**
   * Longest bridge as a multiple of the piece's own extent (along its rough axis); 0 or absent
   * disables the rule. An occluded stretch of a branch leaves fragments about as long as the gap
   * or longer; a small speck far from everything is clutter (spurious returns), not wood.
   */
  maxGapPerExtent?: number;
}

/**
 * Reattach pieces that the graph search did not reach (occlusion gaps) to the reached set.
 * Each piece connects from one of its vertices to the nearest reached vertex. The cost of a
 * candidate bridge is its length, raised by up to 50 % when it runs across the piece's own long
 * axis rather than along it: an occluded stretch of a branch usually continues that branch, so the
 * piece should join where its axis points (common practice, no source). Optionally (see
 * `BridgeOptions`) pieces near the ground, and gaps longer than the piece itself, are refused, and
 * bridges land only above a height. Distances and predecessors
 * in `paths` are extended in place; the bridges are returned.
 *
 * @param x,y,z vertex coordinates, m
 * @param tree kd-tree over the same vertices
 * @param include vertices that belong to the cloud being reconstructed
 */
export function bridgeGaps(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  graph: NeighbourGraph,
  tree: KdTree,
  paths: ShortestPaths,
  include: Uint8Array,
  options: BridgeOptions,
): GapBridge[] {
  const n = graph.vertexCount;
  const bridges: GapBridge[] = [];
  const scratch = createKnnScratch(1);
  const rounds = options.maxRounds ?? 12;
  const reached = new Uint8Array(n);
  // Bridges land only on reached vertices at or above minPieceTopM: near the ground the reached
  // set holds mixed-pixel streaks, and clutter attached to them would grow into false branches.
  const landing = new Uint8Array(n);
  const lowTop = options.heightM !== undefined && options.minPieceTopM !== undefined;
  for (let round = 0; round < rounds; round++) {
    const unreached = new Uint8Array(n);
    let anyUnreached = false;
    for (let v = 0; v < n; v++) {
      reached[v] = include[v] && paths.distanceM[v] < Infinity ? 1 : 0;
      landing[v] = reached[v] && !(lowTop && !(options.heightM![v] >= options.minPieceTopM!)) ? 1 : 0;
      if (include[v] && !reached[v]) {
        unreached[v] = 1;
        anyUnreached = true;
      }
    }
    if (!anyUnreached) break;
    const pieces = connectedComponents(graph, unreached);
    const members: number[][] = Array.from({ length: pieces.count }, () => []);
    for (let v = 0; v < n; v++) if (pieces.label[v] >= 0) members[pieces.label[v]].push(v);
    const candidates: { from: number; to: number; gap: number; cost: number }[] = [];
    for (let c = 0; c < pieces.count; c++) {
      const verts = members[c];
      if (verts.length < options.minPieceVertices) continue;
      if (options.heightM && options.minPieceTopM !== undefined && !(maxOf(options.heightM, verts) >= options.minPieceTopM)) continue;
      const axis = roughAxis(x, y, z, verts);
      const maxGap = options.maxGapPerExtent ? Math.min(options.maxGapM, options.maxGapPerExtent * extentAlong(x, y, z, verts, axis)) : options.maxGapM;
      if (!(maxGap > 0)) continue;
      const step = Math.max(1, Math.floor(verts.length / 96));
      let best: { from: number; to: number; gap: number; cost: number } | null = null;
      for (let s = 0; s < verts.length; s += step) {
        const v = verts[s];
        if (knn(tree, x[v], y[v], z[v], scratch, maxGap, landing) === 0) continue;
        const t = scratch.idx[0];
        const gap = Math.sqrt(scratch.d2[0]);
        let cost = gap;
        if (axis && gap > 0) {
          const cos = Math.abs(((x[t] - x[v]) * axis[0] + (y[t] - y[v]) * axis[1] + (z[t] - z[v]) * axis[2]) / gap);
          cost = gap * (1 + 0.5 * (1 - cos));
        }
        if (!best || cost < best.cost) best = { from: v, to: t, gap, cost };
      }
      if (best) candidates.push(best);
    }
    if (candidates.length === 0) break;
    candidates.sort((a, b) => a.cost - b.cost);
    for (const c of candidates) {
      bridges.push({ from: c.from, to: c.to, lengthM: c.gap });
      extendShortestPaths(graph, paths, c.from, paths.distanceM[c.to] + c.gap, c.to, include);
    }
  }
  return bridges;
}

/** Unit vector between the two mutually far vertices of a piece (two sweeps), or null for a blob. */
function roughAxis(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, verts: number[]): [number, number, number] | null {
  const far = (from: number): number => {
    let best = from;
    let bd = -1;
    for (const v of verts) {
      const d = (x[v] - x[from]) ** 2 + (y[v] - y[from]) ** 2 + (z[v] - z[from]) ** 2;
      if (d > bd) {
        bd = d;
        best = v;
      }
    }
    return best;
  };
  const a = far(verts[0]);
  const b = far(a);
  const len = Math.hypot(x[b] - x[a], y[b] - y[a], z[b] - z[a]);
  if (!(len > 0)) return null;
  return [(x[b] - x[a]) / len, (y[b] - y[a]) / len, (z[b] - z[a]) / len];
}

function maxOf(a: ArrayLike<number>, verts: number[]): number {
  let m = -Infinity;
  for (const v of verts) if (a[v] > m) m = a[v];
  return m;
}

/** Spread of the piece along its rough axis (0 for a blob without one), m. */
function extentAlong(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, verts: number[], axis: [number, number, number] | null): number {
  if (!axis) return 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of verts) {
    const t = x[v] * axis[0] + y[v] * axis[1] + z[v] * axis[2];
    if (t < lo) lo = t;
    if (t > hi) hi = t;
  }
  return hi - lo;
}
