import type { Segment, Vec3 } from '../types/network.js';
import { BREAST_HEIGHT_M } from '../topology/metrics.js';
import { fitCylinder } from './fit/cylinder-fit.js';

/** Half-length of the breast-height slice in stem radii, and its bounds, m (common practice, no source). */
const SLICE_HALF_RADII = 1.5;
const SLICE_HALF_MIN_M = 0.05;
/** Shortest piece left beside the slice, m; when 1.3 m lies closer to a segment end the segment is left as it is. */
const MIN_PART_M = 0.02;
/** Fewest points of a part, as a share of its length's share of the segment's points. */
const MIN_POINT_SHARE = 0.5;
/** A slice fit is kept only within this factor of the whole segment's radius (common practice, no source). */
const SLICE_RADIUS_TOLERANCE = 0.3;

/**
 * A fitted cylinder measures the mean radius over its length, so on a tapering stem a segment
 * that merely contains breast height gives a DBH biased by the taper times the distance from its
 * middle to 1.3 m (about 1 % on the validation trees). Every fitted segment whose path interval
 * from the stem base contains 1.3 m (the DBH rule of the topology stage) is cut into a slice
 * centred on 1.3 m plus the parts below and above it; each part keeps the segment's axis and gets
 * the radius of a cylinder fitted to the segment's points in its own stretch (or the segment's
 * radius when the stretch holds too few points or the fit is implausible). Children move to the top part.
 *
 * @param segments network in the local frame (segmentId = index); changed and extended in place
 * @param pointsOf the input points of a segment (indices into px/py/pz)
 * @returns the segments array
 */
export function centreBreastHeight(
  segments: Segment[],
  pointsOf: (segment: number) => Int32Array | null,
  px: Float64Array,
  py: Float64Array,
  pz: Float64Array,
  options: { range_noise_m: number; min_fit_points: number },
): Segment[] {
  const n = segments.length;
  const children: number[][] = Array.from({ length: n }, () => []);
  let root = -1;
  for (let i = 0; i < n; i++) {
    const p = segments[i].parentId;
    if (p >= 0) children[p].push(i);
    else if (root < 0) root = i;
  }
  if (root < 0) return segments;
  // Path length from the stem base at each segment's end (iterative, parents first).
  const pathEnd = new Float64Array(n);
  const order = [root];
  pathEnd[root] = segLength(segments[root]);
  for (let k = 0; k < order.length; k++) {
    const i = order[k];
    for (const c of children[i]) {
      pathEnd[c] = pathEnd[i] + segLength(segments[c]);
      order.push(c);
    }
  }
  for (const i of order) {
    const s = segments[i];
    const len = segLength(s);
    const s0 = pathEnd[i] - len;
    if (!(s0 <= BREAST_HEIGHT_M && BREAST_HEIGHT_M < pathEnd[i]) || s.radiusCorrection !== '' || !(len > 0)) continue;
    const at = BREAST_HEIGHT_M - s0;
    const half = Math.min(Math.max(SLICE_HALF_MIN_M, SLICE_HALF_RADII * s.radiusM), at, len - at);
    if (!(half >= MIN_PART_M)) continue;
    const cuts = [0, at - half, at + half, len].filter((c, k, a) => k === 0 || c - a[k - 1] >= MIN_PART_M);
    if (len - cuts[cuts.length - 1] > 0) cuts[cuts.length - 1] = len;
    if (cuts.length < 3) continue;
    const pts = pointsOf(i);
    const u: Vec3 = [(s.end[0] - s.start[0]) / len, (s.end[1] - s.start[1]) / len, (s.end[2] - s.start[2]) / len];
    const along = (k: number): number => (px[k] - s.start[0]) * u[0] + (py[k] - s.start[1]) * u[1] + (pz[k] - s.start[2]) * u[2];
    const pointAt = (t: number): Vec3 => [s.start[0] + u[0] * t, s.start[1] + u[1] * t, s.start[2] + u[2] * t];
    const kids = children[i];
    const end = [...s.end] as Vec3;
    let prev = i;
    for (let k = 0; k + 1 < cuts.length; k++) {
      const a = cuts[k];
      const b = cuts[k + 1];
      const sub: number[] = [];
      if (pts) for (let q = 0; q < pts.length; q++) {
        const t = along(pts[q]);
        if (t >= a && t < b) sub.push(pts[q]);
      }
      // A stretch with under half its share of the points (e.g. the first centimetres of a lateral,
      // inside its parent) cannot be fitted on its own.
      const enough = sub.length >= options.min_fit_points && pts !== null && sub.length >= (MIN_POINT_SHARE * pts.length * (b - a)) / len;
      const fit = enough ? fitCylinder(px, py, pz, sub, { initialAxis: u, rangeNoiseM: options.range_noise_m }) : null;
      const ok = fit !== null && Math.abs(fit.radiusM / s.radiusM - 1) <= SLICE_RADIUS_TOLERANCE;
      const part: Segment = {
        ...s,
        start: pointAt(a),
        end: k + 2 === cuts.length ? end : pointAt(b),
        lengthM: b - a,
        pointCount: sub.length,
        radiusM: ok ? fit!.radiusM : s.radiusM,
        radiusFitM: ok ? fit!.radiusM : s.radiusM,
        radiusSeM: ok ? fit!.radiusSeM : s.radiusSeM,
        fitRmseM: ok ? fit!.rmseM : s.fitRmseM,
        arcCoverage: ok ? fit!.arcCoverage : s.arcCoverage,
      };
      if (k === 0) {
        segments[i] = { ...part, segmentId: i, parentId: s.parentId };
      } else {
        const id = segments.length;
        segments.push({ ...part, segmentId: id, parentId: prev });
        prev = id;
      }
    }
    for (const c of kids) segments[c].parentId = prev;
  }
  return segments;
}

function segLength(s: Segment): number {
  return Math.hypot(s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]);
}
