import { describe, expect, it } from 'vitest';
import { buildKdTree, createKnnScratch, knn, radiusSearch } from '../../core/graph/kdtree.js';
import { createRandom } from '../../core/util/random.js';

// Reference: the definition of k nearest neighbours / a radius ball, evaluated by exhaustive search.
function randomPoints(n: number, seed: number, spread = 1): { x: Float64Array; y: Float64Array; z: Float64Array } {
  const r = createRandom(seed);
  const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = r.uniform(0, spread);
    y[i] = r.uniform(0, spread);
    z[i] = r.uniform(0, spread * 0.3);
  }
  return { x, y, z };
}

function bruteKnn(x: Float64Array, y: Float64Array, z: Float64Array, q: [number, number, number], k: number, accept?: Uint8Array): number[] {
  const d: [number, number][] = [];
  for (let i = 0; i < x.length; i++) {
    if (accept && !accept[i]) continue;
    d.push([(x[i] - q[0]) ** 2 + (y[i] - q[1]) ** 2 + (z[i] - q[2]) ** 2, i]);
  }
  d.sort((a, b) => a[0] - b[0]);
  return d.slice(0, k).map((e) => e[0]);
}

describe('buildKdTree', () => {
  it('holds every input index exactly once', () => {
    const { x, y, z } = randomPoints(1000, 3);
    const tree = buildKdTree(x, y, z);
    const seen = new Uint8Array(1000);
    for (const i of tree.index) seen[i]++;
    expect(Array.from(seen).every((c) => c === 1)).toBe(true);
  });

  it('builds over a subset and reports only its indices', () => {
    const { x, y, z } = randomPoints(200, 4);
    const subset = Int32Array.from({ length: 50 }, (_, k) => 4 * k);
    const tree = buildKdTree(x, y, z, subset);
    expect(tree.count).toBe(50);
    expect(Array.from(tree.index).every((i) => i % 4 === 0)).toBe(true);
  });
});

describe('knn', () => {
  it('finds the same k nearest distances as an exhaustive search', () => {
    const { x, y, z } = randomPoints(3000, 5);
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(16);
    const r = createRandom(9);
    for (let t = 0; t < 200; t++) {
      const q: [number, number, number] = [r.uniform(-0.1, 1.1), r.uniform(-0.1, 1.1), r.uniform(-0.1, 0.4)];
      const found = knn(tree, q[0], q[1], q[2], s);
      expect(found).toBe(16);
      const ref = bruteKnn(x, y, z, q, 16);
      for (let f = 0; f < 16; f++) expect(s.d2[f]).toBeCloseTo(ref[f], 14);
    }
  });

  it('handles many duplicate points', () => {
    const n = 500;
    const x = new Float64Array(n).fill(1), y = new Float64Array(n).fill(2), z = new Float64Array(n);
    for (let i = 0; i < n; i += 10) z[i] = i * 0.001;
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(5);
    expect(knn(tree, 1, 2, 0, s)).toBe(5);
    expect(Array.from(s.d2)).toEqual([0, 0, 0, 0, 0]);
  });

  it('reports only neighbours within maxDist', () => {
    const { x, y, z } = randomPoints(2000, 6);
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(50);
    const found = knn(tree, 0.5, 0.5, 0.15, s, 0.05);
    const ref = bruteKnn(x, y, z, [0.5, 0.5, 0.15], 2000).filter((d) => d <= 0.05 ** 2);
    expect(found).toBe(Math.min(50, ref.length));
    for (let f = 0; f < found; f++) expect(s.d2[f]).toBeLessThanOrEqual(0.05 ** 2);
  });

  it('skips points rejected by the accept mask', () => {
    const { x, y, z } = randomPoints(1500, 7);
    const accept = new Uint8Array(1500);
    for (let i = 0; i < 1500; i += 3) accept[i] = 1;
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(4);
    knn(tree, 0.3, 0.7, 0.1, s, Infinity, accept);
    const ref = bruteKnn(x, y, z, [0.3, 0.7, 0.1], 4, accept);
    for (let f = 0; f < 4; f++) {
      expect(accept[s.idx[f]]).toBe(1);
      expect(s.d2[f]).toBeCloseTo(ref[f], 14);
    }
  });
});

describe('radiusSearch', () => {
  it('visits exactly the points inside the ball', () => {
    const { x, y, z } = randomPoints(4000, 8);
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(1);
    const got: number[] = [];
    radiusSearch(tree, 0.4, 0.6, 0.1, 0.08, (i) => got.push(i), s);
    const ref: number[] = [];
    for (let i = 0; i < 4000; i++) if ((x[i] - 0.4) ** 2 + (y[i] - 0.6) ** 2 + (z[i] - 0.1) ** 2 <= 0.08 ** 2) ref.push(i);
    expect(got.sort((a, b) => a - b)).toEqual(ref);
  });
});
