import type { NeighbourGraph } from '../graph/neighbour-graph.js';
import type { ShortestPaths } from '../graph/dijkstra.js';
import { UnionFind } from '../graph/union-find.js';

/**
 * Band clusters: connected groups of graph vertices inside one geodesic band, linked into a tree.
 *
 * Bands adapt to the branch: a cluster C (its largest graph distance U) hands its shortest-path
 * descendants with distance ≤ U + w(C) to the next band, where w(C) = clamp(ratio × r(C), min, max)
 * and r(C) is C's rough radius. The next band is then split into connected pieces (graph edges
 * inside the band), each a child cluster of C. A cluster with two or more children is a furcation.
 * So a 30 cm trunk advances in steps of tens of centimetres while a twig advances in
 * centimetres, and every vertex lands in exactly one cluster.
 */
export interface BandClusters {
  count: number;
  /** Parent cluster, -1 for the root (the stem base). */
  parent: Int32Array;
  /** Cluster of each graph vertex, -1 for vertices not reached. */
  vertexCluster: Int32Array;
  /** Vertices of cluster c: vertices[offsets[c] .. offsets[c + 1]). */
  offsets: Int32Array;
  vertices: Int32Array;
  /** Smallest and largest graph distance inside the cluster, m. */
  minDistM: Float64Array;
  maxDistM: Float64Array;
  /** Centroid (3 per cluster), m. */
  centroid: Float64Array;
  /** Rough radius: median distance of the vertices from the growth axis through the centroid, m. */
  radiusM: Float64Array;
  /** Number of clusters holding a furcation (two or more children). */
  furcationCount: number;
}

export interface BandOptions {
  band_width_ratio: number;
  band_min_m: number;
  band_max_m: number;
}

/**
 * @param x,y,z vertex coordinates, m
 * @param paths graph distances from the stem base with predecessors (the shortest-path tree)
 * @param seeds the stem-base vertices (form the root cluster's start)
 */
export function buildBandClusters(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  graph: NeighbourGraph,
  paths: ShortestPaths,
  seeds: ArrayLike<number>,
  options: BandOptions,
): BandClusters {
  const n = graph.vertexCount;
  const dist = paths.distanceM;
  const pred = paths.predecessor;
  // Shortest-path tree children in CSR.
  const childOffsets = new Int32Array(n + 1);
  for (let v = 0; v < n; v++) if (pred[v] >= 0) childOffsets[pred[v] + 1]++;
  for (let v = 0; v < n; v++) childOffsets[v + 1] += childOffsets[v];
  const childFill = childOffsets.slice(0, n);
  const sptChildren = new Int32Array(childOffsets[n]);
  for (let v = 0; v < n; v++) if (pred[v] >= 0) sptChildren[childFill[pred[v]]++] = v;

  const vertexCluster = new Int32Array(n).fill(-1);
  const stamp = new Int32Array(n).fill(-1);
  const limit = new Float64Array(n);
  const uf = new UnionFind(n);
  const clusterVerts: Int32Array[] = [];
  const parent: number[] = [];
  const minD: number[] = [];
  const maxD: number[] = [];
  const cen: number[] = [];
  const rad: number[] = [];
  const width = (r: number): number => Math.min(options.band_max_m, Math.max(options.band_min_m, options.band_width_ratio * r));

  // Root: the seeds and their descendants within one band, as a single cluster.
  const seedList = Array.from(seeds);
  {
    const c0 = centroidOf(x, y, z, seedList);
    const r0 = medianRadius(x, y, z, seedList, c0, [0, 0, 1]);
    const w0 = width(r0);
    for (const s of seedList) limit[s] = w0;
    const region = growRegion(seedList, 0, true);
    addCluster(region, -1, [0, 0, 1]);
  }
  let regionId = 1;
  for (let c = 0; c < clusterVerts.length; c++) {
    const verts = clusterVerts[c];
    const w = width(rad[c]);
    const frontier: number[] = [];
    let u = maxD[c];
    for (const v of verts) {
      for (let a = childOffsets[v]; a < childOffsets[v + 1]; a++) {
        const ch = sptChildren[a];
        if (vertexCluster[ch] < 0 && stamp[ch] < 0) {
          frontier.push(ch);
          limit[ch] = Math.max(u + w, dist[ch] + 0.5 * w);
        }
      }
    }
    if (frontier.length === 0) continue;
    const region = growRegion(frontier, regionId++, false);
    // Split the band into connected pieces.
    for (const v of region) {
      for (let a = graph.offsets[v]; a < graph.offsets[v + 1]; a++) {
        const t = graph.targets[a];
        if (stamp[t] === stamp[v]) uf.union(v, t);
      }
    }
    const groups = new Map<number, number[]>();
    for (const v of region) {
      const r = uf.find(v);
      let g = groups.get(r);
      if (!g) groups.set(r, (g = []));
      g.push(v);
    }
    const pc: [number, number, number] = [cen[3 * c], cen[3 * c + 1], cen[3 * c + 2]];
    for (const g of groups.values()) {
      const gc = centroidOf(x, y, z, g);
      const axis = normalize([gc[0] - pc[0], gc[1] - pc[1], gc[2] - pc[2]]);
      addCluster(g, c, axis);
    }
    u = 0;
  }

  const count = clusterVerts.length;
  const offsets = new Int32Array(count + 1);
  for (let c = 0; c < count; c++) offsets[c + 1] = offsets[c] + clusterVerts[c].length;
  const vertices = new Int32Array(offsets[count]);
  for (let c = 0; c < count; c++) vertices.set(clusterVerts[c], offsets[c]);
  const childCount = new Int32Array(count);
  for (let c = 1; c < count; c++) childCount[parent[c]]++;
  let furcationCount = 0;
  for (let c = 0; c < count; c++) if (childCount[c] >= 2) furcationCount++;
  return {
    count,
    parent: Int32Array.from(parent),
    vertexCluster,
    offsets,
    vertices,
    minDistM: Float64Array.from(minD),
    maxDistM: Float64Array.from(maxD),
    centroid: Float64Array.from(cen),
    radiusM: Float64Array.from(rad),
    furcationCount,
  };

  /** Descend the shortest-path tree from `start` while distances stay within each vertex's limit. */
  function growRegion(start: number[], id: number, isRoot: boolean): number[] {
    const region: number[] = [];
    const stack = [...start];
    for (const s of start) stamp[s] = id;
    while (stack.length > 0) {
      const v = stack.pop()!;
      region.push(v);
      for (let a = childOffsets[v]; a < childOffsets[v + 1]; a++) {
        const ch = sptChildren[a];
        if (stamp[ch] >= 0 || vertexCluster[ch] >= 0) continue;
        if (dist[ch] <= limit[v] || (isRoot && dist[ch] === 0)) {
          stamp[ch] = id;
          limit[ch] = limit[v];
          stack.push(ch);
        }
      }
    }
    return region;
  }

  function addCluster(verts: number[], parentCluster: number, axis: [number, number, number]): void {
    const id = clusterVerts.length;
    let lo = Infinity;
    let hi = -Infinity;
    for (const v of verts) {
      vertexCluster[v] = id;
      if (dist[v] < lo) lo = dist[v];
      if (dist[v] > hi) hi = dist[v];
    }
    const c = centroidOf(x, y, z, verts);
    clusterVerts.push(Int32Array.from(verts));
    parent.push(parentCluster);
    minD.push(lo);
    maxD.push(hi);
    cen.push(c[0], c[1], c[2]);
    rad.push(medianRadius(x, y, z, verts, c, axis));
  }
}

function centroidOf(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, verts: ArrayLike<number>): [number, number, number] {
  let sx = 0, sy = 0, sz = 0;
  for (let k = 0; k < verts.length; k++) {
    const v = verts[k];
    sx += x[v];
    sy += y[v];
    sz += z[v];
  }
  const m = verts.length || 1;
  return [sx / m, sy / m, sz / m];
}

/** Median distance of the vertices from the line through `c` along `axis`, m. */
export function medianRadius(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  z: ArrayLike<number>,
  verts: ArrayLike<number>,
  c: [number, number, number],
  axis: [number, number, number],
): number {
  const m = verts.length;
  if (m === 0) return 0;
  const d = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const v = verts[k];
    const ex = x[v] - c[0], ey = y[v] - c[1], ez = z[v] - c[2];
    const t = ex * axis[0] + ey * axis[1] + ez * axis[2];
    d[k] = Math.sqrt(Math.max(0, ex * ex + ey * ey + ez * ez - t * t));
  }
  d.sort();
  return d[m >> 1];
}

function normalize(v: [number, number, number]): [number, number, number] {
  const l = Math.hypot(v[0], v[1], v[2]);
  return l > 0 ? [v[0] / l, v[1] / l, v[2] / l] : [0, 0, 1];
}
