import FlatQueue from 'flatqueue';
import type { NeighbourGraph } from './neighbour-graph.js';

/** Shortest-path distances from a set of sources, with the predecessor of every reached vertex. */
export interface ShortestPaths {
  /** Distance along the graph from the nearest source, m (Infinity when unreached). */
  distanceM: Float64Array;
  /** Previous vertex on the shortest path (-1 for sources and unreached vertices). */
  predecessor: Int32Array;
}

/**
 * Dijkstra (1959) from several sources at distance 0 with a binary heap (flatqueue: the fastest
 * queue measured in the issue) and lazy deletion. Only vertices with `include[v] !== 0` are entered.
 */
export function shortestPaths(graph: NeighbourGraph, sources: ArrayLike<number>, include?: Uint8Array): ShortestPaths {
  const n = graph.vertexCount;
  const distanceM = new Float64Array(n).fill(Infinity);
  const predecessor = new Int32Array(n).fill(-1);
  const paths = { distanceM, predecessor };
  const queue = new FlatQueue<number>();
  for (let s = 0; s < sources.length; s++) {
    distanceM[sources[s]] = 0;
    queue.push(sources[s], 0);
  }
  relaxAll(graph, paths, queue, include);
  return paths;
}

/**
 * Continue a finished search after new sources were attached: `vertex` is reached at
 * `distanceM` via `predecessor` (e.g. the far end of a gap bridge). Distances only shrink.
 */
export function extendShortestPaths(
  graph: NeighbourGraph,
  paths: ShortestPaths,
  vertex: number,
  distanceM: number,
  predecessor: number,
  include?: Uint8Array,
): void {
  if (!(distanceM < paths.distanceM[vertex])) return;
  paths.distanceM[vertex] = distanceM;
  paths.predecessor[vertex] = predecessor;
  const queue = new FlatQueue<number>();
  queue.push(vertex, distanceM);
  relaxAll(graph, paths, queue, include);
}

function relaxAll(graph: NeighbourGraph, paths: ShortestPaths, queue: FlatQueue<number>, include?: Uint8Array): void {
  const { offsets, targets, weights } = graph;
  const dist = paths.distanceM;
  const pred = paths.predecessor;
  while (queue.length > 0) {
    const d = queue.peekValue()!;
    const v = queue.pop()!;
    if (d > dist[v]) continue;
    for (let a = offsets[v], e = offsets[v + 1]; a < e; a++) {
      const w = targets[a];
      if (include && !include[w]) continue;
      const nd = d + weights[a];
      if (nd < dist[w]) {
        dist[w] = nd;
        pred[w] = v;
        queue.push(w, nd);
      }
    }
  }
}
