import type { Network } from '../types/network.js';
import type { PointCloud } from '../types/point-cloud.js';
import { RADIUS_CLASSES } from './score.js';
import { frame } from './vec.js';

const SECTORS = 8;

export interface CoverageRow {
  radius_class: string;
  true_length_m: number;
  /** Share of the true axis length, in bins of `binM`, that got at least one return of its segment. */
  covered_fraction: number | null;
  /**
   * Mean share of the circumference seen: each bin's returns are sorted into 8 sectors around the
   * axis; the share of occupied sectors, averaged over all bins (empty bins count 0), length-weighted.
   * One position sees at most about half the circumference of a cylinder.
   */
  arc_fraction: number | null;
  /** Returns of the class's segments (wood and mixed-pixel labels) per metre of axis. */
  points_per_m: number | null;
}

/**
 * How well a virtual scan sampled each radius class: the share of axis length (cut into bins of
 * `binM`) that received at least one return labelled with its segment, and returns per metre.
 * This is what a scan design controls before any reconstruction.
 *
 * @param network the true network
 * @param cloud the virtual scan (extra `segment_id`, −1 for non-wood)
 * @param binM bin length along each axis, m
 */
export function scanCoverage(network: Network, cloud: PointCloud, binM = 0.05): CoverageRow[] {
  const segs = network.segments;
  const index = new Map(segs.map((s, i) => [s.segmentId, i]));
  const binStart = new Int32Array(segs.length + 1);
  segs.forEach((s, i) => (binStart[i + 1] = binStart[i] + Math.max(1, Math.ceil(s.lengthM / binM))));
  // Per bin: bit k set when sector k of the circumference has a return.
  const hit = new Uint8Array(binStart[segs.length]);
  const frames = segs.map((s) => {
    const l = s.lengthM > 0 ? s.lengthM : 1;
    return frame([(s.end[0] - s.start[0]) / l, (s.end[1] - s.start[1]) / l, (s.end[2] - s.start[2]) / l]);
  });
  const points = new Float64Array(RADIUS_CLASSES.length);
  const classOf = (r: number): number => RADIUS_CLASSES.findIndex((c) => r >= c.lo && r < c.hi);
  const segId = cloud.extra.segment_id as Int32Array | undefined;
  if (segId) {
    for (let p = 0; p < cloud.count; p++) {
      const i = segId[p] >= 0 ? index.get(segId[p]) : undefined;
      if (i === undefined) continue;
      const s = segs[i];
      const ex = s.end[0] - s.start[0];
      const ey = s.end[1] - s.start[1];
      const ez = s.end[2] - s.start[2];
      const l2 = ex * ex + ey * ey + ez * ez;
      const t = l2 > 0 ? ((cloud.x[p] - s.start[0]) * ex + (cloud.y[p] - s.start[1]) * ey + (cloud.z[p] - s.start[2]) * ez) / l2 : 0;
      const bins = binStart[i + 1] - binStart[i];
      const [u, w] = frames[i];
      const rx = cloud.x[p] - s.start[0];
      const ry = cloud.y[p] - s.start[1];
      const rz = cloud.z[p] - s.start[2];
      const angle = Math.atan2(rx * w[0] + ry * w[1] + rz * w[2], rx * u[0] + ry * u[1] + rz * u[2]);
      const sector = Math.min(SECTORS - 1, Math.floor(((angle + Math.PI) / (2 * Math.PI)) * SECTORS));
      hit[binStart[i] + Math.min(bins - 1, Math.max(0, Math.floor(t * bins)))] |= 1 << sector;
      points[classOf(s.radiusM)]++;
    }
  }
  const length = new Float64Array(RADIUS_CLASSES.length);
  const covered = new Float64Array(RADIUS_CLASSES.length);
  const arc = new Float64Array(RADIUS_CLASSES.length);
  segs.forEach((s, i) => {
    const c = classOf(s.radiusM);
    const bins = binStart[i + 1] - binStart[i];
    let n = 0;
    let sectors = 0;
    for (let b = binStart[i]; b < binStart[i + 1]; b++) {
      if (hit[b] !== 0) n++;
      for (let k = 0; k < SECTORS; k++) sectors += (hit[b] >> k) & 1;
    }
    length[c] += s.lengthM;
    covered[c] += (s.lengthM * n) / bins;
    arc[c] += (s.lengthM * sectors) / (bins * SECTORS);
  });
  return RADIUS_CLASSES.map((cl, c) => ({
    radius_class: cl.name,
    true_length_m: length[c],
    covered_fraction: length[c] > 0 ? covered[c] / length[c] : null,
    arc_fraction: length[c] > 0 ? arc[c] / length[c] : null,
    points_per_m: length[c] > 0 ? points[c] / length[c] : null,
  }));
}
