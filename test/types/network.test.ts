import { describe, expect, it } from 'vitest';
import { createSegment, segmentVolumeM3 } from '../../core/types/network.js';

describe('createSegment', () => {
  it('computes the length from the end points (a 3-4-12 box diagonal is 13 m) and fills neutral defaults', () => {
    const s = createSegment({ segmentId: 4, parentId: 1, start: [1, 1, 1], end: [4, 5, 13], radiusM: 0.05 });
    expect(s.lengthM).toBe(13);
    expect(s).toMatchObject({ branchOrder: 0, radiusSeM: 0, arcCoverage: 1, reliable: true, reliabilityReason: '' });
  });

  it('lets given fields win over the defaults', () => {
    const s = createSegment({ segmentId: 0, parentId: -1, start: [0, 0, 0], end: [0, 0, 1], radiusM: 0.1, lengthM: 2, reliable: false });
    expect(s.lengthM).toBe(2);
    expect(s.reliable).toBe(false);
  });
});

describe('segmentVolumeM3', () => {
  it('is π r² l (cylinder volume)', () => {
    expect(segmentVolumeM3({ radiusM: 0.5, lengthM: 4 })).toBeCloseTo(Math.PI, 12);
  });
});
