import { describe, expect, it } from 'vitest';
import { scanCoverage } from '../../core/simulate/coverage.js';
import { createPointCloud } from '../../core/types/point-cloud.js';
import type { Network } from '../../core/types/network.js';

const segment = (segmentId: number, z0: number, z1: number, radiusM: number) => ({
  segmentId,
  parentId: segmentId - 1,
  branchId: 0,
  branchOrder: 0,
  strahlerOrder: 1,
  start: [0, 0, z0] as [number, number, number],
  end: [0, 0, z1] as [number, number, number],
  radiusM,
  radiusSeM: 0,
  lengthM: z1 - z0,
  fitRmseM: 0,
  arcCoverage: 1,
  pointCount: 0,
  reliable: true,
  reliabilityReason: '',
});

describe('scanCoverage', () => {
  it('sees the whole circumference of a stem ringed by returns in every bin', () => {
    // 8 returns per bin at 45° steps around the axis → every sector of every bin is occupied.
    const network: Network = { segments: [segment(0, 0, 1, 0.2)] };
    const xs: number[] = [];
    const ys: number[] = [];
    const zs: number[] = [];
    for (let b = 0; b < 20; b++)
      for (let k = 0; k < 8; k++) {
        const a = ((k + 0.5) * Math.PI) / 4;
        xs.push(0.2 * Math.cos(a));
        ys.push(0.2 * Math.sin(a));
        zs.push(0.05 * b + 0.025);
      }
    const cloud = createPointCloud(new Float64Array(xs), new Float64Array(ys), new Float64Array(zs));
    cloud.extra.segment_id = new Int32Array(xs.length);
    const stem = scanCoverage(network, cloud, 0.05).find((r) => r.radius_class === '>10cm')!;
    expect(stem.covered_fraction).toBeCloseTo(1, 12);
    expect(stem.arc_fraction).toBeCloseTo(1, 12);
  });

  it('counts the share of 5 cm bins that carry a return of their own segment', () => {
    // Hand-made case: a 1 m stem segment (r 0.2 m, 20 bins) with returns in the bins at
    // z = 0.01, 0.26, 0.51 → 3 of 20 bins = 15 %; a 1 m twig (r 5 mm) with none; one ground point.
    const network: Network = { segments: [segment(0, 0, 1, 0.2), segment(1, 1, 2, 0.005)] };
    const z = [0.01, 0.26, 0.27, 0.51, 0.0];
    const cloud = createPointCloud(new Float64Array([0.2, 0.2, 0.2, 0.2, 3]), new Float64Array(5), new Float64Array(z));
    cloud.extra.segment_id = new Int32Array([0, 0, 0, 0, -1]);
    const rows = scanCoverage(network, cloud, 0.05);
    const stem = rows.find((r) => r.radius_class === '>10cm')!;
    const twig = rows.find((r) => r.radius_class === '<1cm')!;
    expect(stem.covered_fraction).toBeCloseTo(3 / 20, 12);
    expect(stem.points_per_m).toBeCloseTo(4, 12);
    // All four stem returns lie at +x of the axis: one sector of 8 in each of the 3 bins hit.
    expect(stem.arc_fraction).toBeCloseTo(3 / 20 / 8, 12);
    expect(twig.covered_fraction).toBe(0);
    expect(rows.find((r) => r.radius_class === '5-10cm')!.covered_fraction).toBeNull();
  });
});
