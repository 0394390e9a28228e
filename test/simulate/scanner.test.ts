import { describe, expect, it } from 'vitest';
import { encodeLas } from '../../core/io/las-write.js';
import { formatSegmentsCsv } from '../../core/io/segments-csv.js';
import { rayCylinder } from '../../core/simulate/intersect.js';
import { simulateOptions, type SimulateOptions } from '../../core/simulate/options.js';
import { presetOptions } from '../../core/simulate/presets.js';
import { LABEL, scanPositions, scanScene, type ScanPosition } from '../../core/simulate/scanner.js';
import { buildScene } from '../../core/simulate/scene.js';
import { simulate } from '../../core/simulate/simulate.js';
import { createSegment, type Network, type Vec3 } from '../../core/types/network.js';
import { createRandom } from '../../core/util/random.js';

/** A scene of free-standing cylinders (start, end, radius); topology is irrelevant to the scanner. */
function cylinders(list: [Vec3, Vec3, number][]): Network {
  return {
    segments: list.map(([start, end, radiusM], i) => createSegment({ segmentId: i, parentId: i - 1, branchId: i, strahlerOrder: 1, start, end, radiusM })),
  };
}

const quiet = (extra: Partial<SimulateOptions>): SimulateOptions =>
  simulateOptions.resolve({ ground: false, clutter_fraction: 0, range_noise_m: 0, ...extra });
const at = (x: number, y: number, z: number): ScanPosition => ({ id: 1, x, y, z, registrationRotationDeg: 0, registrationShiftM: [0, 0, 0] });

function scan(network: Network, o: SimulateOptions, positions: ScanPosition[]) {
  return scanScene(buildScene(network, [], 0, 0.03, createRandom(3)), o, positions).cloud;
}

describe('scanScene', () => {
  it('never returns a point from a pole hidden behind a trunk', () => {
    // Occlusion: the trunk (r 0.3 m, 5 m tall) at the origin shadows, seen from (−8, 0, 1.3), a
    // half-width of 0.3 × 10/8 = 0.375 m at x = 2 up to z = 1.3 + 3.7 × 10/8 = 5.9 m — the whole
    // 4 m pole of radius 2 cm there (footprint < 1 cm) is hidden.
    const trunk: [Vec3, Vec3, number] = [[0, 0, 0], [0, 0, 5], 0.3];
    const pole: [Vec3, Vec3, number] = [[2, 0, 0], [2, 0, 4], 0.02];
    const o = quiet({ angular_step_deg: 0.05 });
    const withTrunk = scan(cylinders([trunk, pole]), o, [at(-8, 0, 1.3)]);
    const seg = withTrunk.extra.segment_id as Int32Array;
    expect(seg.filter((s) => s === 0).length).toBeGreaterThan(1000);
    expect(seg.filter((s) => s === 1).length).toBe(0);
    // Control: without the trunk the same pole is seen (the check above can fail).
    const alone = scan(cylinders([pole]), o, [at(-8, 0, 1.3)]);
    expect((alone.extra.segment_id as Int32Array).filter((s) => s === 0).length).toBeGreaterThan(100);
  });

  it('puts wood points around the true surface with the range-noise standard deviation set', () => {
    // Gaussian noise along the ray: the residual |p − o| − t_true of clean wood returns has
    // mean 0 and SD σ; the sample SD's standard error is σ/√(2n) (normal theory), so 4 % is > 10 SE here.
    const sigma = 0.004;
    const net = cylinders([[[0, 0, 0], [0, 0, 3], 0.1]]);
    const o = quiet({ angular_step_deg: 0.05, range_noise_m: sigma });
    const pos = at(-5, 0.3, 1.3);
    const cloud = scan(net, o, [pos]);
    const label = cloud.extra.label as Uint8Array;
    const residuals: number[] = [];
    for (let i = 0; i < cloud.count; i++) {
      if (label[i] !== LABEL.wood) continue;
      const vx = cloud.x[i] - pos.x;
      const vy = cloud.y[i] - pos.y;
      const vz = cloud.z[i] - pos.z;
      const range = Math.hypot(vx, vy, vz);
      const t = rayCylinder(pos.x, pos.y, pos.z, vx / range, vy / range, vz / range, 0, 0, 0, 0, 0, 1, 3, 0.1);
      residuals.push(range - t);
    }
    expect(residuals.length).toBeGreaterThan(5000);
    const mean = residuals.reduce((a, b) => a + b, 0) / residuals.length;
    const sd = Math.sqrt(residuals.reduce((a, b) => a + (b - mean) ** 2, 0) / (residuals.length - 1));
    expect(Math.abs(mean)).toBeLessThan((4 * sigma) / Math.sqrt(residuals.length));
    expect(Math.abs(sd / sigma - 1)).toBeLessThan(0.04);
  });

  it('keeps a thin branch its true width with a point-like beam and inflates it with a divergent one', () => {
    // Beam footprint geometry: with footprint radius w a branch of radius r is detected while the
    // beam centre is within r + w(1 − …) of the axis, so its apparent half-width grows toward r + w.
    const r = 0.005;
    const net = cylinders([[[0, 0, 0], [0, 0, 2], r]]);
    const halfWidth = (o: SimulateOptions): { max: number; mixed: number; n: number } => {
      const cloud = scan(net, o, [at(-10, 0, 1)]);
      let max = 0;
      let mixed = 0;
      for (let i = 0; i < cloud.count; i++) {
        max = Math.max(max, Math.hypot(cloud.x[i], cloud.y[i]));
        if ((cloud.extra.label as Uint8Array)[i] === LABEL.mixed) mixed++;
      }
      return { max, mixed, n: cloud.count };
    };
    const sharp = halfWidth(quiet({ angular_step_deg: 0.005, beam_divergence_mrad: 0, beam_exit_diameter_m: 0 }));
    expect(sharp.n).toBeGreaterThan(100);
    expect(sharp.max).toBeLessThanOrEqual(r + 1e-9);
    expect(sharp.mixed).toBe(0);
    // w(10 m) = 2 mm + 10 m × 1 mrad = 12 mm.
    const wide = halfWidth(quiet({ angular_step_deg: 0.005, beam_divergence_mrad: 2, beam_exit_diameter_m: 0.004 }));
    expect(wide.max).toBeGreaterThan(1.5 * r);
    expect(wide.mixed).toBeGreaterThan(0.5 * wide.n);
  });

  it('places mixed-pixel returns between a branch edge and the surface behind it', () => {
    // The mixed-pixel artefact of averaging rangefinders: a footprint split between a foreground
    // edge and a background gives a range in between (e.g. Hebert & Krotkov 1992, from memory).
    const net = cylinders([
      [[0, 0, 0], [0, 0, 2], 0.02],
      [[3, 0, 0], [3, 0, 2], 1.0],
    ]);
    const cloud = scan(net, quiet({ angular_step_deg: 0.02, beam_divergence_mrad: 2 }), [at(-10, 0, 1)]);
    const label = cloud.extra.label as Uint8Array;
    let between = 0;
    for (let i = 0; i < cloud.count; i++) {
      if (label[i] !== LABEL.mixed) continue;
      const x = cloud.x[i];
      if (x > 0.2 && x < 1.8) between++;
    }
    expect(between).toBeGreaterThan(10);
  });

  it('labels every point consistently and tags it with its 1-based scan position', () => {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), angular_step_deg: 0.3, clutter_fraction: 0.01, leaves_per_tip: 2 });
    const v = simulate(o);
    const seg = v.cloud.extra.segment_id as Int32Array;
    const label = v.cloud.extra.label as Uint8Array;
    const source = v.cloud.attributes.pointSourceId as Uint16Array;
    const seen = new Set<number>();
    let wrongSegment = 0;
    let wrongSource = 0;
    for (let i = 0; i < v.cloud.count; i++) {
      seen.add(label[i]);
      const wood = label[i] === LABEL.wood || label[i] === LABEL.mixed;
      if (wood ? seg[i] < 0 : seg[i] !== -1) wrongSegment++;
      if (!(source[i] >= 1 && source[i] <= 3)) wrongSource++;
    }
    expect(wrongSegment).toBe(0);
    expect(wrongSource).toBe(0);
    expect([...seen].sort()).toEqual([0, 1, 2, 3, 4]);
    expect(v.truth.scan.points).toBe(v.cloud.count);
    // point_count of the truth is the number of returns labelled with the segment.
    const onSegments = seg.filter((id) => id >= 0).length;
    expect(v.tree.network.segments.reduce((a, s) => a + s.pointCount, 0)).toBe(onSegments);
  });
});

describe('scanPositions', () => {
  it('puts the ring positions at the set distance and height, the first due east', () => {
    const o = simulateOptions.resolve({ scan_positions: 4, scan_distance_m: 8, scanner_height_m: 1.5 });
    const p = scanPositions(o, createRandom(1));
    expect(p.map((q) => q.id)).toEqual([1, 2, 3, 4]);
    expect(p[0].x).toBeCloseTo(8, 12);
    expect(p[0].y).toBeCloseTo(0, 12);
    for (const q of p) {
      expect(Math.hypot(q.x, q.y)).toBeCloseTo(8, 12);
      expect(q.z).toBe(1.5);
    }
  });

  it('refuses a scan without positions and a ring inside the stem', () => {
    expect(() => scanPositions(simulateOptions.resolve({ scan_positions: 0 }), createRandom(1))).toThrow(/no scan positions/);
    expect(() => scanPositions(simulateOptions.resolve({ trunk_base_radius_m: 1, scan_distance_m: 1 }), createRandom(1))).toThrow(/inside the stem|must be >/);
  });
});

describe('simulate', () => {
  it('gives byte-identical LAS and segments.csv for the same seed, and different ones for another', () => {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), angular_step_deg: 0.3, registration_error_m: 0.01, registration_error_deg: 0.1 });
    const las = (opts: SimulateOptions): Uint8Array =>
      encodeLas(simulate(opts).cloud, { version: '1.4', pointFormat: 6, extraBytes: ['segment_id', 'label'], creation: { day: 1, year: 2026 } });
    const a = las(o);
    const b = las(o);
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    expect(formatSegmentsCsv(simulate(o).tree.network)).toBe(formatSegmentsCsv(simulate(o).tree.network));
    expect(Buffer.from(las({ ...o, seed: 2 })).equals(Buffer.from(a))).toBe(false);
  });

  it('records every furcation, the exponent and the scan settings in the truth', () => {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), angular_step_deg: 0.4 });
    const { truth, tree } = simulate(o, 'sapling');
    expect(truth.furcations).toHaveLength(tree.furcations.length);
    expect(truth.tree.furcation_count).toBe(truth.furcations.length);
    for (const f of truth.furcations) {
      const lhs = f.child_start_radii_m.reduce((s, r) => s + r ** f.exponent_a, 0);
      expect(Math.abs(lhs / f.parent_end_radius_m ** f.exponent_a - 1)).toBeLessThan(1e-12);
      expect(f.child_segment_ids.every((id) => id >= 0)).toBe(true);
    }
    const total = truth.tree.counts_by_branch_order.reduce((s, r) => s + r.length_m, 0);
    expect(total).toBeCloseTo(truth.tree.total_branch_length_m, 9);
    expect(truth.parameters.angular_step_deg).toBe(0.4);
    expect(truth.preset).toBe('sapling');
    expect(truth.scan.positions).toHaveLength(3);
  });
});
