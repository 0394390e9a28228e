import { describe, expect, it } from 'vitest';
import { addEdges, allKnn, buildNeighbourGraph } from '../../core/graph/neighbour-graph.js';
import { buildKdTree } from '../../core/graph/kdtree.js';
import { connectedComponents } from '../../core/graph/components.js';
import { extendShortestPaths, shortestPaths } from '../../core/graph/dijkstra.js';
import { UnionFind } from '../../core/graph/union-find.js';

/** A w × h grid of points 1 m apart in the plane z = 0. */
function grid(w: number, h: number): { x: Float64Array; y: Float64Array; z: Float64Array } {
  const n = w * h;
  const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
  for (let j = 0; j < h; j++) for (let i = 0; i < w; i++) {
    x[j * w + i] = i;
    y[j * w + i] = j;
  }
  return { x, y, z };
}

describe('allKnn', () => {
  it('excludes the point itself and lists neighbours nearest first', () => {
    const { x, y, z } = grid(5, 5);
    const { idx, dist } = allKnn(buildKdTree(x, y, z), x, y, z, 4);
    // Centre point 12 of a unit grid: its 4 nearest are the 4 axis neighbours at 1 m (geometry of the grid).
    const nb = Array.from(idx.slice(48, 52)).sort((a, b) => a - b);
    expect(nb).toEqual([7, 11, 13, 17]);
    expect(Array.from(dist.slice(48, 52))).toEqual([1, 1, 1, 1]);
  });
});

describe('buildNeighbourGraph', () => {
  it('is symmetric, with edges no longer than the radius and weights equal to the Euclidean length', () => {
    const { x, y, z } = grid(6, 4);
    const g = buildNeighbourGraph(x, y, z, 8, 1.5);
    for (let v = 0; v < g.vertexCount; v++) {
      for (let a = g.offsets[v]; a < g.offsets[v + 1]; a++) {
        const w = g.targets[a];
        const len = Math.hypot(x[w] - x[v], y[w] - y[v]);
        expect(g.weights[a]).toBeCloseTo(len, 6);
        expect(len).toBeLessThanOrEqual(1.5);
        let back = 0;
        for (let b = g.offsets[w]; b < g.offsets[w + 1]; b++) if (g.targets[b] === v) back++;
        expect(back).toBe(1);
      }
    }
  });
});

describe('addEdges', () => {
  it('adds each extra edge in both directions and keeps the old ones', () => {
    const { x, y, z } = grid(3, 1);
    const g = buildNeighbourGraph(x, y, z, 1, 1.1);
    const g2 = addEdges(g, [0], [2], [2]);
    expect(g2.offsets[3]).toBe(g.offsets[3] + 2);
    const n0 = Array.from(g2.targets.slice(g2.offsets[0], g2.offsets[1])).sort();
    expect(n0).toEqual([1, 2]);
  });
});

describe('shortestPaths', () => {
  it('gives the Manhattan distance on a 4-connected unit grid', () => {
    // On a grid graph with unit edges the shortest path length is |dx| + |dy| (lattice geometry).
    const { x, y, z } = grid(7, 5);
    const g = buildNeighbourGraph(x, y, z, 4, 1.01);
    const p = shortestPaths(g, [0]);
    for (let v = 0; v < 35; v++) expect(p.distanceM[v]).toBeCloseTo(x[v] + y[v], 6);
    expect(p.predecessor[0]).toBe(-1);
  });

  it('takes the nearest of several sources and leaves excluded vertices unreached', () => {
    const { x, y, z } = grid(9, 1);
    const g = buildNeighbourGraph(x, y, z, 2, 1.01);
    const include = new Uint8Array(9).fill(1);
    include[6] = 0;
    const p = shortestPaths(g, [0, 4], include);
    expect(Array.from(p.distanceM.slice(0, 6))).toEqual([0, 1, 2, 1, 0, 1]);
    expect(p.distanceM[6]).toBe(Infinity);
    expect(p.distanceM[8]).toBe(Infinity);
  });
});

describe('extendShortestPaths', () => {
  it('continues the search from a newly attached vertex', () => {
    const { x, y, z } = grid(6, 1);
    const g = buildNeighbourGraph(x, y, z, 2, 1.01);
    const include = new Uint8Array(6).fill(1);
    include[3] = 0; // a gap between vertices 2 and 4
    const p = shortestPaths(g, [0], include);
    expect(p.distanceM[5]).toBe(Infinity);
    extendShortestPaths(g, p, 4, p.distanceM[2] + 2, 2, include);
    expect(p.distanceM[4]).toBe(4);
    expect(p.distanceM[5]).toBe(5);
    expect(p.predecessor[4]).toBe(2);
  });
});

describe('connectedComponents', () => {
  it('separates pieces that no edge joins', () => {
    const x = Float64Array.from([0, 1, 2, 10, 11, 30]);
    const y = new Float64Array(6), z = new Float64Array(6);
    const g = buildNeighbourGraph(x, y, z, 2, 1.5);
    const c = connectedComponents(g);
    expect(c.count).toBe(3);
    expect(Array.from(c.sizes).sort()).toEqual([1, 2, 3]);
    expect(c.label[0]).toBe(c.label[2]);
    expect(c.label[3]).not.toBe(c.label[2]);
  });
});

describe('UnionFind', () => {
  it('labels joined elements alike and counts set sizes', () => {
    const uf = new UnionFind(6);
    uf.union(0, 1);
    uf.union(1, 2);
    uf.union(4, 5);
    const l = uf.labels();
    expect(l.count).toBe(3);
    expect(l.label[0]).toBe(l.label[2]);
    expect(l.label[3]).not.toBe(l.label[4]);
    expect(Array.from(l.sizes)).toEqual([3, 1, 2]);
  });
});
