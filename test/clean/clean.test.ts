import { describe, expect, it } from 'vitest';
import { voxelize } from '../../core/clean/voxelize.js';
import { statisticalOutliers } from '../../core/clean/outliers.js';
import { estimateGround } from '../../core/clean/ground.js';
import { findStemBase, pieceStats } from '../../core/clean/stem-base.js';
import { leafMask, shapeFeaturesOf } from '../../core/clean/wood-leaf.js';
import { cleanCloud } from '../../core/clean/clean-cloud.js';
import { cleanOptions } from '../../core/clean/options.js';
import { buildKdTree } from '../../core/graph/kdtree.js';
import { createPointCloud } from '../../core/types/point-cloud.js';
import { createRandom } from '../../core/util/random.js';
import { XylemapError } from '../../core/util/errors.js';
import { syntheticTree } from '../reconstruct/synthetic-tree.js';

describe('voxelize', () => {
  it('puts each point in the voxel of its coordinates and places the vertex at the centroid', () => {
    const x = Float64Array.from([0.01, 0.02, 0.15, 0.16]);
    const y = Float64Array.from([0.0, 0.03, 0.0, 0.05]);
    const z = new Float64Array(4);
    const g = voxelize(x, y, z, 0.1);
    expect(g.count).toBe(2);
    expect(g.pointVoxel[0]).toBe(g.pointVoxel[1]);
    expect(g.pointVoxel[2]).toBe(g.pointVoxel[3]);
    const v = g.pointVoxel[2];
    // Centroid = arithmetic mean of the member points (definition).
    expect(g.x[v]).toBeCloseTo(0.155, 12);
    expect(g.y[v]).toBeCloseTo(0.025, 12);
    expect(Array.from(g.points.slice(g.pointOffsets[v], g.pointOffsets[v + 1]))).toEqual([2, 3]);
  });

  it('skips points outside the include mask', () => {
    const x = Float64Array.from([0, 1, 2]);
    const g = voxelize(x, new Float64Array(3), new Float64Array(3), 0.5, Uint8Array.from([1, 0, 1]));
    expect(g.count).toBe(2);
    expect(g.pointVoxel[1]).toBe(-1);
  });
});

describe('statisticalOutliers', () => {
  it('flags isolated points far from a dense patch and keeps the patch', () => {
    const r = createRandom(2);
    const n = 2000;
    const x = new Float64Array(n + 3), y = new Float64Array(n + 3), z = new Float64Array(n + 3);
    for (let i = 0; i < n; i++) {
      x[i] = r.uniform(0, 1);
      y[i] = r.uniform(0, 1);
    }
    [[3, 3, 3], [-2, 0, 1], [0.5, 0.5, 2]].forEach((p, k) => {
      x[n + k] = p[0];
      y[n + k] = p[1];
      z[n + k] = p[2];
    });
    const { outlier } = statisticalOutliers(buildKdTree(x, y, z), x, y, z, 8, 3);
    expect(outlier[n]).toBe(1);
    expect(outlier[n + 1]).toBe(1);
    expect(outlier[n + 2]).toBe(1);
    let flagged = 0;
    for (let i = 0; i < n; i++) flagged += outlier[i];
    // Mean + 3 std flags well under 1 % of a uniform patch (one-sided tail, common practice, no source).
    expect(flagged).toBeLessThan(n * 0.01);
  });
});

describe('estimateGround', () => {
  it('recovers a sloped ground plane under a crown, with stray points below ground', () => {
    // Ground z = 50 + 0.15 x − 0.05 y (a 15 % slope) sampled on 10 × 10 m; a crown blob 3–6 m above it
    // over a 4 × 4 m area (no ground visible below it), and 5 stray points 1 m below ground.
    const r = createRandom(5);
    const xs: number[] = [], ys: number[] = [], zs: number[] = [];
    const g = (x: number, y: number) => 50 + 0.15 * x - 0.05 * y;
    for (let i = 0; i < 20000; i++) {
      const x = r.uniform(0, 10), y = r.uniform(0, 10);
      if (x > 3 && x < 7 && y > 3 && y < 7) continue;
      xs.push(x); ys.push(y); zs.push(g(x, y) + 0.003 * r.normal());
    }
    for (let i = 0; i < 8000; i++) {
      const x = r.uniform(3, 7), y = r.uniform(3, 7);
      xs.push(x); ys.push(y); zs.push(g(x, y) + r.uniform(3, 6));
    }
    for (let i = 0; i < 5; i++) {
      const x = r.uniform(0, 10), y = r.uniform(0, 10);
      xs.push(x); ys.push(y); zs.push(g(x, y) - 1);
    }
    const model = estimateGround(Float64Array.from(xs), Float64Array.from(ys), Float64Array.from(zs), 0.5);
    expect(model.plane[1]).toBeCloseTo(0.15, 2);
    expect(model.plane[2]).toBeCloseTo(-0.05, 2);
    for (const [x, y] of [[1, 1], [5, 5], [9, 2], [2, 8]]) expect(Math.abs(model.heightAt(x, y) - g(x, y))).toBeLessThan(0.03);
  });
});

describe('pieceStats', () => {
  it('counts vertices and height range per piece', () => {
    const s = pieceStats(Int32Array.from([0, 0, 1, -1]), 2, Float64Array.from([0.1, 2.5, 0.3, 9]));
    expect(s[0]).toEqual({ label: 0, vertexCount: 2, minHeightM: 0.1, maxHeightM: 2.5, tallCount: 1 });
    expect(s[1].vertexCount).toBe(1);
  });
});

describe('findStemBase', () => {
  it('picks the tall grounded piece over a low bush and seeds its lowest slice', () => {
    // Piece 0: a bush 0–0.4 m with many vertices; piece 1: a stem 0.05–5 m.
    const label: number[] = [], h: number[] = [];
    for (let i = 0; i < 500; i++) { label.push(0); h.push((i / 500) * 0.4); }
    for (let i = 0; i < 100; i++) { label.push(1); h.push(0.05 + (i / 100) * 5); }
    const L = Int32Array.from(label), H = Float64Array.from(h);
    const base = findStemBase(pieceStats(L, 2, H), L, H, 0.6, 0.1);
    expect(base.label).toBe(1);
    expect(base.seeds.length).toBeGreaterThan(0);
    for (const s of base.seeds) expect(H[s]).toBeLessThanOrEqual(0.05 + 0.1);
    expect(base.warnings).toEqual([]);
  });

  it('warns when a second tree-like piece stands beside the chosen one', () => {
    const label: number[] = [], h: number[] = [];
    for (let i = 0; i < 200; i++) { label.push(0); h.push((i / 200) * 6); }
    for (let i = 0; i < 150; i++) { label.push(1); h.push((i / 150) * 5); }
    const L = Int32Array.from(label), H = Float64Array.from(h);
    const base = findStemBase(pieceStats(L, 2, H), L, H, 0.6, 0.1);
    expect(base.label).toBe(0);
    expect(base.warnings.join(' ')).toMatch(/second tree-like object/);
  });

  it('refuses a cloud whose tallest object is lower than 0.5 m', () => {
    const L = new Int32Array(100), H = Float64Array.from({ length: 100 }, (_, i) => i * 0.003);
    expect(() => findStemBase(pieceStats(L, 1, H), L, H, 0.6, 0.1)).toThrow(/no tree found/);
  });
});

describe('shapeFeaturesOf', () => {
  it('finds points on a line linear and points on a plane planar', () => {
    // Eigenvalue features of a line are (1, 0, 0) and of a plane (0, 1, 0) in the limit (Demantké et al. 2011).
    const r = createRandom(3);
    const n = 400;
    const x = new Float64Array(2 * n), y = new Float64Array(2 * n), z = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) { x[i] = i * 0.005; y[i] = 0.0002 * r.normal(); z[i] = 0.0002 * r.normal(); }
    for (let i = n; i < 2 * n; i++) { x[i] = 10 + r.uniform(0, 0.3); y[i] = r.uniform(0, 0.3); z[i] = 0.0002 * r.normal(); }
    const f = shapeFeaturesOf(buildKdTree(x, y, z), x, y, z, 16);
    expect(f[3 * 200]).toBeGreaterThan(0.9);
    expect(f[3 * 600 + 1]).toBeGreaterThan(0.5);
    const leaf = leafMask(f, 0.5, 0);
    expect(leaf[200]).toBe(0);
    expect(leaf[600]).toBe(1);
  });
});

describe('cleanCloud', () => {
  const options = cleanOptions.defaults();

  it('refuses a tiny cloud with a clear message', () => {
    const c = createPointCloud(new Float64Array(500), new Float64Array(500), Float64Array.from({ length: 500 }, (_, i) => i * 0.01));
    try {
      cleanCloud(c, options);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(XylemapError);
      expect((e as XylemapError).oneLine()).toMatch(/too few points for a tree: 500/);
    }
  });

  it('refuses flat ground without a tree', () => {
    const c = syntheticTree({ cylinders: [], density: 0, noiseM: 0.002, seed: 4, ground: { g0: 10, gx: 0.05, gy: 0, halfM: 3, centre: [0, 0], density: 3000 } });
    expect(() => cleanCloud(c, options)).toThrow(/no tree found/);
  });

  it('finds the stem base on sloped ground far from the origin, not at the lowest point', () => {
    // Stem base at (700, 300, 88): ground rises 10 % towards +x; the lowest ground point is 0.3 m lower at x − 3.
    const c = syntheticTree({
      cylinders: [{ start: [700, 300, 88], end: [700, 300, 91], radiusM: 0.12 }],
      density: 6000,
      noiseM: 0.002,
      seed: 6,
      ground: { g0: 88 - 0.1 * 700, gx: 0.1, gy: 0, halfM: 3, centre: [700, 300], density: 1500 },
    });
    const r = cleanCloud(c, options);
    let sx = 0, sy = 0, sz = 0;
    for (const s of r.base.seeds) { sx += r.x[s]; sy += r.y[s]; sz += r.z[s]; }
    const k = r.base.seeds.length;
    expect(Math.hypot(sx / k + r.origin[0] - 700, sy / k + r.origin[1] - 300)).toBeLessThan(0.1);
    expect(Math.abs(sz / k + r.origin[2] - 88)).toBeLessThan(0.2);
    expect(r.counts.ground).toBeGreaterThan(0.8 * 1500 * 36);
  });
});
