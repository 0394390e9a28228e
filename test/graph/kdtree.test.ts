import { describe, expect, it } from 'vitest';
import { buildKdTree, createKnnScratch, knn, knnAllPoints, radiusSearch } from '../../core/graph/kdtree.js';
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

  it('copies the coordinates of each point to its tree position', () => {
    const { x, y, z } = randomPoints(700, 11);
    const tree = buildKdTree(x, y, z);
    for (let p = 0; p < tree.count; p++) {
      const i = tree.index[p];
      expect([tree.x[p], tree.y[p], tree.z[p]]).toEqual([x[i], y[i], z[i]]);
    }
  });

  it('keeps every range median between the left and right halves along its split axis', () => {
    // Definition of the implicit layout documented in kdtree.ts: range [lo, hi) splits at mid = (lo + hi) >> 1.
    const { x, y, z } = randomPoints(2000, 12);
    const tree = buildKdTree(x, y, z);
    const c = [tree.x, tree.y, tree.z];
    const ranges: [number, number][] = [[0, tree.count]];
    let checked = 0;
    while (ranges.length > 0) {
      const [lo, hi] = ranges.pop()!;
      if (hi - lo <= 8) continue;
      const mid = (lo + hi) >> 1;
      const key = c[tree.axis[mid]];
      for (let p = lo; p < mid; p++) expect(key[p]).toBeLessThanOrEqual(key[mid]);
      for (let p = mid + 1; p < hi; p++) expect(key[p]).toBeGreaterThanOrEqual(key[mid]);
      checked++;
      ranges.push([lo, mid], [mid + 1, hi]);
    }
    expect(checked).toBeGreaterThan(100);
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
  it('returns every point, nearest first, when k exceeds the point count', () => {
    const { x, y, z } = randomPoints(7, 13);
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(12);
    const found = knn(tree, 0.2, 0.2, 0.1, s);
    expect(found).toBe(7);
    const ref = bruteKnn(x, y, z, [0.2, 0.2, 0.1], 12);
    expect(ref.length).toBe(7);
    for (let f = 0; f < 7; f++) expect(s.d2[f]).toBeCloseTo(ref[f], 14);
    expect(new Set(Array.from(s.idx.subarray(0, 7))).size).toBe(7);
  });

  it('reports distinct indices among duplicate points', () => {
    const x = new Float64Array(300), y = new Float64Array(300), z = new Float64Array(300);
    for (let i = 0; i < 300; i++) x[i] = i % 3; // 100 copies of each of three points
    const tree = buildKdTree(x, y, z);
    const s = createKnnScratch(150);
    expect(knn(tree, 0.1, 0, 0, s)).toBe(150);
    expect(new Set(Array.from(s.idx)).size).toBe(150);
    for (let f = 0; f < 100; f++) expect(s.d2[f]).toBeCloseTo(0.01, 14);
    for (let f = 100; f < 150; f++) expect(s.d2[f]).toBeCloseTo(0.81, 14);
  });

  it('finds nothing in an empty tree', () => {
    const tree = buildKdTree(new Float64Array(0), new Float64Array(0), new Float64Array(0));
    expect(knn(tree, 0, 0, 0, createKnnScratch(3))).toBe(0);
  });
});

// Reference for knnAllPoints: exhaustive search over all other points for every point.
function bruteAll(x: Float64Array, y: Float64Array, z: Float64Array, k: number, maxDist = Infinity): number[][] {
  const rows: number[][] = [];
  for (let i = 0; i < x.length; i++) {
    const d: number[] = [];
    for (let j = 0; j < x.length; j++) {
      if (j === i) continue;
      const dd = (x[j] - x[i]) ** 2 + (y[j] - y[i]) ** 2 + (z[j] - z[i]) ** 2;
      if (dd <= maxDist * maxDist) d.push(Math.sqrt(dd));
    }
    d.sort((a, b) => a - b);
    rows.push(d.slice(0, k));
  }
  return rows;
}

/** Every row: distances as the reference, -1/Infinity padding, no self, no repeats, distance matches index. */
function expectRowsMatch(x: Float64Array, y: Float64Array, z: Float64Array, k: number, got: { idx: Int32Array; dist: Float32Array }, ref: number[][]): void {
  expect(got.idx.length).toBe(x.length * k);
  for (let i = 0; i < x.length; i++) {
    const seen = new Set<number>();
    for (let f = 0; f < k; f++) {
      const j = got.idx[i * k + f];
      const d = got.dist[i * k + f];
      if (f >= ref[i].length) {
        expect(j).toBe(-1);
        expect(d).toBe(Infinity);
        continue;
      }
      expect(j).not.toBe(i);
      expect(seen.has(j)).toBe(false);
      seen.add(j);
      expect(Math.abs(d - ref[i][f])).toBeLessThanOrEqual(1e-6 * ref[i][f] + 1e-12); // Float32 output
      expect(Math.abs(d - Math.hypot(x[j] - x[i], y[j] - y[i], z[j] - z[i]))).toBeLessThanOrEqual(1e-6 * d + 1e-12);
    }
  }
}

describe('knnAllPoints', () => {
  it('finds for every point the same neighbour distances as an exhaustive search, itself excluded', () => {
    const { x, y, z } = randomPoints(1200, 14);
    for (let i = 0; i < 1200; i += 7) {
      // exact duplicates of earlier points: self must be excluded by identity, not by distance 0
      x[i] = x[i >> 1];
      y[i] = y[i >> 1];
      z[i] = z[i >> 1];
    }
    const tree = buildKdTree(x, y, z);
    expectRowsMatch(x, y, z, 16, knnAllPoints(tree, 16), bruteAll(x, y, z, 16));
  });

  it('pads rows with -1 and Infinity when k exceeds the other points', () => {
    const { x, y, z } = randomPoints(9, 15);
    const tree = buildKdTree(x, y, z);
    expectRowsMatch(x, y, z, 12, knnAllPoints(tree, 12), bruteAll(x, y, z, 12));
  });

  it('reports only neighbours within maxDist', () => {
    const { x, y, z } = randomPoints(800, 16);
    const tree = buildKdTree(x, y, z);
    expectRowsMatch(x, y, z, 10, knnAllPoints(tree, 10, 0.06), bruteAll(x, y, z, 10, 0.06));
  });

  it('indexes rows by original index for a tree over a subset', () => {
    const { x, y, z } = randomPoints(60, 17);
    const subset = Int32Array.from({ length: 20 }, (_, k) => 3 * k);
    const got = knnAllPoints(buildKdTree(x, y, z, subset), 2);
    expect(got.idx.length).toBe((3 * 19 + 1) * 2);
    for (let i = 0; i <= 57; i++) {
      if (i % 3 !== 0) {
        expect([got.idx[2 * i], got.idx[2 * i + 1]]).toEqual([-1, -1]);
        continue;
      }
      const d = Array.from(subset).filter((j) => j !== i).map((j) => Math.hypot(x[j] - x[i], y[j] - y[i], z[j] - z[i])).sort((a, b) => a - b);
      for (let f = 0; f < 2; f++) {
        expect(got.idx[2 * i + f] % 3).toBe(0);
        expect(Math.abs(got.dist[2 * i + f] - d[f])).toBeLessThanOrEqual(1e-6 * d[f]);
      }
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
