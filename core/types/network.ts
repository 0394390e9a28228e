/**
 * The network: fitted cylinders ("segments") with parent links — the tree's reconstructed
 * architecture. Coordinates are in the input file's own frame, metres.
 *
 * One Segment per cylinder. A network of 100 000 segments is ~30 MB as objects, which is why
 * segments (unlike points) are plain objects.
 */
export type Vec3 = [number, number, number];

export interface Segment {
  segmentId: number;
  /** -1 for the root segment (stem base). */
  parentId: number;
  /** Branch = axis from where it leaves its parent to its tip along its main continuation. */
  branchId: number;
  /** Centrifugal branching order: trunk 0, branches off the trunk 1, … */
  branchOrder: number;
  /** Strahler order: tips 1. */
  strahlerOrder: number;
  start: Vec3;
  end: Vec3;
  radiusM: number;
  /** Standard error of the radius from the fit; 0 for known truth. */
  radiusSeM: number;
  lengthM: number;
  fitRmseM: number;
  /** Fraction [0, 1] of the circumference that carries points. */
  arcCoverage: number;
  pointCount: number;
  reliable: boolean;
  /** Empty when reliable; otherwise a reason code (few_points, thin_arc, below_noise, taper_outlier, …). */
  reliabilityReason: string;
  /** Radius straight from the cylinder fit, before any documented correction; equals radiusM when uncorrected. */
  radiusFitM?: number;
  /** Name of the correction applied to the radius ("" when none). */
  radiusCorrection?: string;
  /** Further per-segment columns added by later stages (e.g. hydraulics), keyed by CSV column name. */
  extra?: Record<string, number | string>;
}

export interface Network {
  segments: Segment[];
  /** Coordinate reference of the input, passed through (e.g. WKT), if known. */
  crsWkt?: string;
}

export function segmentLength(s: Pick<Segment, 'start' | 'end'>): number {
  return Math.hypot(s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]);
}

export function segmentVolumeM3(s: Pick<Segment, 'radiusM' | 'lengthM'>): number {
  return Math.PI * s.radiusM * s.radiusM * s.lengthM;
}

/** The fields a segment cannot do without; everything else has a neutral default. */
export type SegmentGeometry = Pick<Segment, 'segmentId' | 'parentId' | 'start' | 'end' | 'radiusM'> & Partial<Segment>;

/**
 * A segment from its geometry, with neutral defaults for the rest: branch ids and orders 0 (for
 * annotation to fill), no uncertainty, full arc coverage, reliable. Length from the end points.
 */
export function createSegment(fields: SegmentGeometry): Segment {
  return {
    branchId: 0,
    branchOrder: 0,
    strahlerOrder: 0,
    radiusSeM: 0,
    lengthM: segmentLength(fields),
    fitRmseM: 0,
    arcCoverage: 1,
    pointCount: 0,
    reliable: true,
    reliabilityReason: '',
    ...fields,
  };
}
