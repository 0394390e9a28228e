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
}

/**
 * Reattach pieces that the graph search did not reach (occlusion gaps) to the reached set.
 * Each piece connects from one of its vertices to the nearest reached vertex. The cost of a
 * candidate bridge is its length, raised by up to 50 % when it runs across the piece's own long
 * axis rather than along it: an occluded stretch of a branch usually continues that branch, so the
 * piece should join where its axis points (common practice, no source). Distances and predecessors
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
  for (let round = 0; round < rounds; round++) {
    const unreached = new Uint8Array(n);
    let anyUnreached = false;
    for (let v = 0; v < n; v++) {
      reached[v] = include[v] && paths.distanceM[v] < Infinity ? 1 : 0;
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
      const axis = roughAxis(x, y, z, verts);
      const step = Math.max(1, Math.floor(verts.length / 96));
      let best: { from: number; to: number; gap: number; cost: number } | null = null;
      for (let s = 0; s < verts.length; s += step) {
        const v = verts[s];
        if (knn(tree, x[v], y[v], z[v], scratch, options.maxGapM, reached) === 0) continue;
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
