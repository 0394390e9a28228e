import type { NeighbourGraph } from './neighbour-graph.js';
import { UnionFind } from './union-find.js';

/**
 * Connected components of the graph restricted to vertices with `include[v] !== 0`
 * (all when omitted). Excluded vertices get label -1.
 */
export function connectedComponents(graph: NeighbourGraph, include?: Uint8Array): { label: Int32Array; count: number; sizes: Int32Array } {
  const n = graph.vertexCount;
  const uf = new UnionFind(n);
  for (let v = 0; v < n; v++) {
    if (include && !include[v]) continue;
    for (let a = graph.offsets[v]; a < graph.offsets[v + 1]; a++) {
      const w = graph.targets[a];
      if (w > v && (!include || include[w])) uf.union(v, w);
    }
  }
  if (!include) return uf.labels();
  // Relabel only included vertices densely.
  const label = new Int32Array(n).fill(-1);
  const rootLabel = new Int32Array(n).fill(-1);
  let count = 0;
  for (let v = 0; v < n; v++) {
    if (!include[v]) continue;
    const r = uf.find(v);
    if (rootLabel[r] < 0) rootLabel[r] = count++;
    label[v] = rootLabel[r];
  }
  const sizes = new Int32Array(count);
  for (let v = 0; v < n; v++) if (label[v] >= 0) sizes[label[v]]++;
  return { label, count, sizes };
}
