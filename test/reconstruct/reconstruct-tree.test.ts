import { describe, expect, it } from 'vitest';
import { reconstructTree } from '../../core/reconstruct/reconstruct-tree.js';
import { cleanOptions } from '../../core/clean/options.js';
import { reconstructOptions } from '../../core/reconstruct/options.js';
import { XylemapError } from '../../core/util/errors.js';
import type { Vec3 } from '../../core/types/network.js';
import { syntheticTree, yTree, type TestCylinder } from './synthetic-tree.js';

const options = { clean: cleanOptions.defaults(), reconstruct: reconstructOptions.defaults() };
const BASE: Vec3 = [500010, 4000020, 120];
const groundAt = (base: Vec3) => ({ g0: base[2] - 0.1 * base[0], gx: 0.1, gy: 0, halfM: 2.5, centre: [base[0], base[1]] as [number, number], density: 1500 });

/** Wood volume of the test cylinders, Σ π r² L (cylinder volume formula). */
function volumeOf(cyl: TestCylinder[]): number {
  return cyl.reduce((v, c) => v + Math.PI * c.radiusM ** 2 * Math.hypot(c.end[0] - c.start[0], c.end[1] - c.start[1], c.end[2] - c.start[2]), 0);
}

describe('reconstructTree', () => {
  const cylinders = yTree(BASE);
  const cloud = syntheticTree({ cylinders, density: 6000, noiseM: 0.002, seed: 11, ground: groundAt(BASE) });
  const result = reconstructTree(cloud, options);

  it('measures the DBH of a 0.15 m radius stem within 1 %', () => {
    // Analytic: DBH = 2 r = 0.30 m for the generated stem.
    expect(result.tree.dbh_m).not.toBeNull();
    expect(Math.abs(result.tree.dbh_m! / 0.3 - 1)).toBeLessThan(0.01);
  });

  it('finds the three furcations of the Y-shaped test tree where they are', () => {
    // True furcations: the stem top and the two branch ends (where the twigs leave). A reconstructed
    // furcation counts within max(0.1 m, 2 × parent radius), the scan-lab score's rule.
    const kids = new Map<number, number>();
    for (const s of result.network.segments) kids.set(s.parentId, (kids.get(s.parentId) ?? 0) + 1);
    const forks = result.network.segments.filter((s) => (kids.get(s.segmentId) ?? 0) >= 2).map((s) => s.end);
    const truths: [Vec3, number][] = [[cylinders[0].end, 0.15], [cylinders[1].end, 0.1], [cylinders[2].end, 0.1]];
    for (const [p, r] of truths) {
      const d = Math.min(...forks.map((f) => Math.hypot(f[0] - p[0], f[1] - p[1], f[2] - p[2])));
      expect(d).toBeLessThan(Math.max(0.1, 2 * r) + 0.2);
    }
    expect(result.tree.tip_count).toBeGreaterThanOrEqual(4);
  });

  it('recovers the wood volume within 8 % of Σ π r² L of the cylinders', () => {
    // Measured +5 %: the joints at the forks add stem length inside the crotch; 8 % leaves room for noise.
    expect(Math.abs(result.tree.wood_volume_m3 / volumeOf(cylinders) - 1)).toBeLessThan(0.08);
  });

  it('returns coordinates in the input frame with the stem base on the ground', () => {
    const base = result.network.segments.find((s) => s.parentId < 0)!;
    expect(Math.hypot(base.start[0] - BASE[0], base.start[1] - BASE[1])).toBeLessThan(0.02);
    expect(Math.abs(base.start[2] - BASE[2])).toBeLessThan(0.05);
    expect(result.tree.height_m).toBeGreaterThan(5.4);
  });

  it('labels points of the stem with stem segments and leaves ground unlabelled', () => {
    const ids = result.pointSegmentId;
    const byId = new Map(result.network.segments.map((s) => [s.segmentId, s]));
    let stem = 0, stemOk = 0, groundLabelled = 0;
    const nTree = cloud.count - Math.round(1500 * 25);
    for (let i = 0; i < cloud.count; i++) {
      const h = cloud.z[i] - BASE[2] - 0.1 * (cloud.x[i] - BASE[0]);
      const onStem = i < nTree && Math.hypot(cloud.x[i] - BASE[0], cloud.y[i] - BASE[1]) < 0.2 && cloud.z[i] - BASE[2] > 0.3 && cloud.z[i] - BASE[2] < 2.5;
      if (onStem) {
        stem++;
        if (ids[i] >= 0 && byId.get(ids[i])!.branchOrder === 0) stemOk++;
      }
      if (i >= nTree && Math.abs(h) < 0.01 && ids[i] >= 0) groundLabelled++;
    }
    expect(stemOk / stem).toBeGreaterThan(0.98);
    expect(groundLabelled).toBe(0);
  });

  it('reports every segment with a radius, a reliability flag and a parent that exists', () => {
    const ids = new Set(result.network.segments.map((s) => s.segmentId));
    for (const s of result.network.segments) {
      expect(s.radiusM).toBeGreaterThan(0);
      expect(typeof s.reliable).toBe('boolean');
      if (!s.reliable) expect(s.reliabilityReason).not.toBe('');
      if (s.parentId >= 0) expect(ids.has(s.parentId)).toBe(true);
    }
    expect(result.reliability.segment_count).toBe(result.network.segments.length);
  });

  it('is repeatable: the same cloud gives the same network', () => {
    const small = syntheticTree({ cylinders: cylinders.slice(0, 3), density: 3000, noiseM: 0.002, seed: 16, ground: groundAt(BASE) });
    const a = reconstructTree(small, options);
    const b = reconstructTree(small, options);
    expect(b.network.segments.map((s) => s.radiusM)).toEqual(a.network.segments.map((s) => s.radiusM));
  });

  it('measures a leaning stem along its axis and warns about the lean', () => {
    // A 35° lean: DBH along the axis is still 2 r = 0.24 m (geometry of a straight cylinder).
    const lean = (35 * Math.PI) / 180;
    const top: Vec3 = [BASE[0] + 4 * Math.sin(lean), BASE[1], BASE[2] + 4 * Math.cos(lean)];
    const c = syntheticTree({
      cylinders: [{ start: BASE, end: top, radiusM: 0.12 }, { start: top, end: [top[0] + 0.5, top[1], top[2] + 1.5], radiusM: 0.06 }],
      density: 5000,
      noiseM: 0.002,
      seed: 12,
      ground: groundAt(BASE),
    });
    const r = reconstructTree(c, options);
    expect(Math.abs(r.tree.dbh_m! / 0.24 - 1)).toBeLessThan(0.02);
    expect(r.warnings.join(' ')).toMatch(/leans 3\d°/);
  });

  it('bridges an occlusion gap in the stem so the crown stays attached', () => {
    // The stem is missing between 1.6 and 1.9 m (0.3 m gap, less than bridge_max_gap_m).
    const lower: TestCylinder = { start: BASE, end: [BASE[0], BASE[1], BASE[2] + 1.6], radiusM: 0.1 };
    const upper: TestCylinder = { start: [BASE[0], BASE[1], BASE[2] + 1.9], end: [BASE[0], BASE[1], BASE[2] + 4], radiusM: 0.1 };
    const c = syntheticTree({ cylinders: [lower, upper], density: 5000, noiseM: 0.002, seed: 13, ground: groundAt(BASE) });
    const r = reconstructTree(c, options);
    expect(r.tree.gap_bridge_count).toBeGreaterThan(0);
    expect(r.tree.height_m).toBeGreaterThan(3.8);
    expect(Math.abs(r.tree.dbh_m! / 0.2 - 1)).toBeLessThan(0.02);
  });

  it('warns when a second tree stands in the cloud', () => {
    const second: Vec3 = [BASE[0] + 2, BASE[1], BASE[2] + 0.2];
    const c = syntheticTree({
      cylinders: [...yTree(BASE), { start: second, end: [second[0], second[1], second[2] + 4], radiusM: 0.1 }],
      density: 3000,
      noiseM: 0.002,
      seed: 14,
      ground: groundAt(BASE),
    });
    const r = reconstructTree(c, options);
    expect(r.warnings.join(' ')).toMatch(/second tree-like object/);
    expect(Math.abs(r.tree.dbh_m! / 0.3 - 1)).toBeLessThan(0.02);
  });

  it('refuses a cloud with fewer than 1000 points', () => {
    const c = syntheticTree({ cylinders: [{ start: BASE, end: [BASE[0], BASE[1], BASE[2] + 2], radiusM: 0.05 }], density: 1000, noiseM: 0.001, seed: 15 });
    expect(c.count).toBeLessThan(1000);
    expect(() => reconstructTree(c, options)).toThrow(XylemapError);
  });
});
