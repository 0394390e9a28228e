import { describe, expect, it } from 'vitest';
import { floorUnfittedRadii } from '../../core/reconstruct/child-floor.js';
import { createSegment, type Segment } from '../../core/types/network.js';

function seg(id: number, parentId: number, radiusM: number, radiusCorrection = ''): Segment {
  const fitted = radiusCorrection === '';
  return createSegment({ segmentId: id, parentId, start: [0, 0, id], end: [0, 0, id + 1], radiusM, radiusFitM: radiusM, radiusCorrection, reliable: fitted, reliabilityReason: fitted ? '' : 'few_points' });
}

describe('floorUnfittedRadii', () => {
  it('raises an unfitted segment to its thickest child, since Σ r_i^a = r_0^a with a > 0 implies r_0 ≥ max r_i', () => {
    const out = floorUnfittedRadii([seg(0, -1, 0.1), seg(1, 0, 0.0001, 'cluster_spread'), seg(2, 1, 0.03), seg(3, 1, 0.05)]);
    expect(out[1].radiusM).toBe(0.05);
    expect(out[1].radiusCorrection).toBe('child_floor');
    expect(out[1].radiusFitM).toBe(0.0001);
  });

  it('carries the floor down a chain of unfitted segments, children first', () => {
    const out = floorUnfittedRadii([seg(0, -1, 0.001, 'cluster_spread'), seg(1, 0, 0.001, 'cluster_spread'), seg(2, 1, 0.02)]);
    expect(out.map((s) => s.radiusM)).toEqual([0.02, 0.02, 0.02]);
  });

  it('never changes a fitted segment, nor an unfitted one already thick enough', () => {
    const segments = [seg(0, -1, 0.01), seg(1, 0, 0.04), seg(2, 0, 0.06, 'cluster_spread'), seg(3, 2, 0.05)];
    const out = floorUnfittedRadii(segments);
    expect(out).toEqual(segments);
  });
});
