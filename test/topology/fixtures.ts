import { createSegment, type Segment, type Vec3 } from '../../core/types/network.js';

/** A plain segment with the given geometry; orders/branch ids left at 0 for annotation to fill. */
export function seg(segmentId: number, parentId: number, start: Vec3, end: Vec3, radiusM: number, radiusSeM = 0): Segment {
  return createSegment({ segmentId, parentId, start, end, radiusM, radiusSeM, pointCount: 100 });
}

/**
 * Hand-built tree (all lengths 1 m). Trunk 0→1→2→5→6 (seg 5 wins the radius tie at seg 2 by
 * supplying more length); side branches 4 (off 2), 3 (off 1) with sub-branches 7 (main) and 8.
 */
export function smallTree(): Segment[] {
  return [
    seg(0, -1, [0, 0, 0], [0, 0, 1], 0.2),
    seg(1, 0, [0, 0, 1], [0, 0, 2], 0.15),
    seg(2, 1, [0, 0, 2], [0, 0, 3], 0.1),
    seg(3, 1, [0, 0, 2], [1, 0, 2], 0.08),
    seg(4, 2, [0, 0, 3], [0, 0, 4], 0.05),
    seg(5, 2, [0, 0, 3], [0, 1, 3], 0.05),
    seg(6, 5, [0, 1, 3], [0, 2, 3], 0.03),
    seg(7, 3, [1, 0, 2], [2, 0, 2], 0.04),
    seg(8, 3, [1, 0, 2], [1, 0, 3], 0.03),
  ];
}
