import type { Segment, Vec3 } from '../types/network.js';
import { XylemapError } from '../util/errors.js';

/** Reads one record's snake_case fields (a segments.csv row or a network.json segment object). */
export interface SegmentFieldReader {
  /** A number; the fallback when the field is absent, else a XylemapError. */
  num(name: string, fallback?: number): number;
  str(name: string, fallback: string): string;
}

/**
 * One segment from its snake_case fields, with the defaults both file formats share (no
 * uncertainty, full arc coverage, length from the end points, raw fit = radius) and the radius rule.
 * @param where "line 7" / "segment 3", for the error message
 */
export function segmentFromFields(
  f: SegmentFieldReader,
  geometry: { start: Vec3; end: Vec3; reliable: boolean; extra?: Record<string, number | string> },
  where: string,
  file: string,
): Segment {
  const { start, end } = geometry;
  const radiusM = f.num('radius_m');
  if (!(radiusM > 0)) throw new XylemapError(`${where}: radius_m must be > 0 m, got ${radiusM}`, { file });
  return {
    segmentId: f.num('segment_id'),
    parentId: f.num('parent_id'),
    branchId: f.num('branch_id', 0),
    branchOrder: f.num('branch_order', 0),
    strahlerOrder: f.num('strahler_order', 0),
    start,
    end,
    radiusM,
    radiusSeM: f.num('radius_se_m', 0),
    lengthM: f.num('length_m', Math.hypot(end[0] - start[0], end[1] - start[1], end[2] - start[2])),
    fitRmseM: f.num('fit_rmse_m', 0),
    arcCoverage: f.num('arc_coverage', 1),
    pointCount: f.num('point_count', 0),
    reliable: geometry.reliable,
    reliabilityReason: f.str('reliability_reason', ''),
    radiusFitM: f.num('radius_fit_m', radiusM),
    radiusCorrection: f.str('radius_correction', ''),
    ...(geometry.extra ? { extra: geometry.extra } : {}),
  };
}

/** A segment's snake_case fields (the inverse of `segmentFromFields`), as network.json and GraphML write them. */
export function segmentToFields(s: Segment): Record<string, number | string | boolean | Vec3> {
  return {
    segment_id: s.segmentId,
    parent_id: s.parentId,
    branch_id: s.branchId,
    branch_order: s.branchOrder,
    strahler_order: s.strahlerOrder,
    start: s.start,
    end: s.end,
    radius_m: s.radiusM,
    radius_se_m: s.radiusSeM,
    length_m: s.lengthM,
    fit_rmse_m: s.fitRmseM,
    arc_coverage: s.arcCoverage,
    point_count: s.pointCount,
    reliable: s.reliable,
    reliability_reason: s.reliabilityReason,
    radius_fit_m: s.radiusFitM ?? s.radiusM,
    radius_correction: s.radiusCorrection ?? '',
  };
}
