import { describe, expect, it } from 'vitest';
import { networkProfiles } from '../../core/report/profiles.js';
import type { Network, Segment } from '../../core/types/network.js';

function seg(id: number, parent: number, start: [number, number, number], end: [number, number, number], r: number, order: number, branch: number): Segment {
  return {
    segmentId: id, parentId: parent, branchId: branch, branchOrder: order, strahlerOrder: 1, start, end, radiusM: r, radiusSeM: 0,
    lengthM: Math.hypot(end[0] - start[0], end[1] - start[1], end[2] - start[2]), fitRmseM: 0, arcCoverage: 1, pointCount: 10,
    reliable: id !== 3, reliabilityReason: id === 3 ? 'thin_arc' : '',
  };
}

// A Y: trunk 0→2 m (two 1 m segments), then a 3 m main child and a 1 m side child. Hand-computed answers.
const Y: Network = {
  segments: [
    seg(0, -1, [0, 0, 0], [0, 0, 1], 0.2, 0, 0),
    seg(1, 0, [0, 0, 1], [0, 0, 2], 0.18, 0, 0),
    seg(2, 1, [0, 0, 2], [0, 0, 5], 0.15, 0, 0),
    seg(3, 1, [0, 0, 2], [1, 0, 2], 0.05, 1, 1),
  ],
};

describe('networkProfiles', () => {
  it('gives path length from the base to each midpoint', () => {
    expect([...networkProfiles(Y).distanceFromBaseM]).toEqual([0.5, 1.5, 3.5, 2.5]);
  });

  it('gives the distance from the apex as the longest way from the midpoint to a tip end', () => {
    // segment 0: 0.5 (rest of itself) + 1 + 3 = 4.5; segment 1: 0.5 + 3; tips: half their length.
    expect([...networkProfiles(Y).distanceFromApexM]).toEqual([4.5, 3.5, 1.5, 0.5]);
  });

  it('follows the longest path and the trunk from the base', () => {
    const p = networkProfiles(Y);
    expect(p.longestPath).toEqual([0, 1, 2]);
    expect(p.stemPath).toEqual([0, 1, 2]);
  });

  it('sums length and volume (π r² L) per branching order', () => {
    const rows = networkProfiles(Y).byOrder;
    expect(rows.map((r) => r.order)).toEqual([0, 1]);
    expect(rows[0].lengthM).toBeCloseTo(5, 12);
    expect(rows[0].volumeM3).toBeCloseTo(Math.PI * (0.04 + 0.0324 + 0.0225 * 3), 12);
    expect(rows[0].meanRadiusM).toBeCloseTo((0.2 + 0.18 + 0.45) / 5, 12);
    expect(rows[1].reliableShare).toBe(0);
    expect(rows[0].reliableShare).toBe(1);
  });
});
