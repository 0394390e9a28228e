import { treeMetrics } from '../topology/metrics.js';
import { SegmentTree } from '../topology/node-tree.js';
import type { Network, Segment } from '../types/network.js';
import { XylemapError } from '../util/errors.js';
import type { ScoreOptions } from './options.js';

/** Radius classes of the score (true radius for length and radius error; each network's own radius for volume), m. */
export const RADIUS_CLASSES = [
  { name: '<1cm', lo: 0, hi: 0.01 },
  { name: '1-2.5cm', lo: 0.01, hi: 0.025 },
  { name: '2.5-5cm', lo: 0.025, hi: 0.05 },
  { name: '5-10cm', lo: 0.05, hi: 0.1 },
  { name: '>10cm', lo: 0.1, hi: Infinity },
] as const;

export interface ScoreClassRow {
  radius_class: string;
  true_length_m: number;
  /** Share of the true axis length (sampled) that has a matching reconstructed axis. */
  recovered_fraction: number | null;
  /** Median and RMSE of (r_reconstructed − r_true) / r_true over matched samples. */
  radius_median_relative_error: number | null;
  radius_rmse_relative_error: number | null;
  true_volume_m3: number;
  reconstructed_volume_m3: number;
  volume_relative_error: number | null;
  /** True furcations whose parent END radius falls in the class, and the share found. */
  furcations_true: number;
  furcations_found_fraction: number | null;
}

export interface ScoreResult {
  schema: 'xylemap.score/1';
  segments: { true: number; reconstructed: number };
  dbh: { true_m: number | null; reconstructed_m: number | null; error_m: number | null; relative_error: number | null };
  height: { true_m: number; reconstructed_m: number; error_m: number };
  wood_volume: { true_m3: number; reconstructed_m3: number; relative_error: number | null };
  length: { true_m: number; reconstructed_m: number; recovered_fraction: number | null };
  radius: { samples: number; median_relative_error: number | null; rmse_relative_error: number | null };
  furcations: { true: number; reconstructed: number; found: number; found_fraction: number | null };
  /** Share of matched samples whose reconstructed segment has the same centrifugal branching order. */
  branch_order_agreement: number | null;
  /** Same, allowing the orders to differ by one (one spurious or missed furcation upstream). */
  branch_order_within_one: number | null;
  exponent: { true: number; reconstructed: number; error: number } | null;
  conductance: { true_kg_s_mpa: number; reconstructed_kg_s_mpa: number; relative_error: number } | null;
  by_radius_class: ScoreClassRow[];
}

/** What score reads from the summaries (summary.json; for the truth also truth.json's exponent_a). */
export interface ScoreSummaries {
  /** True exponent: truth.json `exponent_a`, else the truth summary's `scaling.exponent.estimate`. */
  trueExponent?: number;
  trueConductanceKgPerSPerMPa?: number;
  reconstructedExponent?: number;
  reconstructedConductanceKgPerSPerMPa?: number;
}

/**
 * Score a reconstructed network against the true one.
 *
 * Matching: every true axis is sampled at midpoints of pieces ≤ `sample_spacing_m` long; a sample
 * is matched to the nearest reconstructed axis (point–segment distance) within
 * max(`match_min_distance_m`, `match_radius_factor` × true radius) whose direction is within
 * `match_max_angle_deg` of the true one. Recovered length, radius errors and branching-order
 * agreement are sample-weighted (i.e. weighted by length). Volume by class compares each
 * network's own volume in the class (false positives count). A true furcation is found when a
 * reconstructed furcation (end of a segment with ≥ 2 children) lies within
 * max(`furcation_tolerance_m`, 2 × parent end radius).
 *
 * @param truth the true network (e.g. from a virtual scan's segments.csv)
 * @param reconstructed the network to score
 * @param options resolved `score` options
 * @param summaries exponent and conductance from the two folders' summaries, when present
 */
export function scoreNetworks(truth: Network, reconstructed: Network, options: ScoreOptions, summaries: ScoreSummaries = {}): ScoreResult {
  if (truth.segments.length === 0) throw new XylemapError('the true network has no segments', { stage: 'score', hint: 'point score at a folder written by xylemap simulate' });
  if (reconstructed.segments.length === 0) throw new XylemapError('the reconstructed network has no segments', { stage: 'score', hint: 'reconstruct a tree first' });
  const recon = reconstructed.segments;
  const maxTrueRadius = truth.segments.reduce((m, s) => Math.max(m, s.radiusM), 0);
  const tolMax = Math.max(options.match_min_distance_m, options.match_radius_factor * maxTrueRadius);
  const index = new SegmentGrid(recon, Math.max(0.1, tolMax));
  const cosMax = Math.cos((options.match_max_angle_deg * Math.PI) / 180);

  const classOf = (r: number): number => RADIUS_CLASSES.findIndex((c) => r >= c.lo && r < c.hi);
  const nClass = RADIUS_CLASSES.length;
  const trueLength = new Float64Array(nClass);
  const sampledLength = new Float64Array(nClass);
  const matchedLength = new Float64Array(nClass);
  const relErrors: number[][] = RADIUS_CLASSES.map(() => []);
  let orderSame = 0;
  let orderNear = 0;
  let orderTotal = 0;

  for (const s of truth.segments) {
    const c = classOf(s.radiusM);
    const len = axisLength(s);
    trueLength[c] += len;
    if (!(len > 0)) continue;
    const pieces = Math.max(1, Math.ceil(len / options.sample_spacing_m));
    const piece = len / pieces;
    const dir = unit(s);
    const tol = Math.max(options.match_min_distance_m, options.match_radius_factor * s.radiusM);
    for (let k = 0; k < pieces; k++) {
      const f = (k + 0.5) / pieces;
      const p: [number, number, number] = [
        s.start[0] + f * (s.end[0] - s.start[0]),
        s.start[1] + f * (s.end[1] - s.start[1]),
        s.start[2] + f * (s.end[2] - s.start[2]),
      ];
      sampledLength[c] += piece;
      const j = index.nearest(p, tol, dir, cosMax);
      if (j < 0) continue;
      matchedLength[c] += piece;
      relErrors[c].push((recon[j].radiusM - s.radiusM) / s.radiusM);
      orderTotal++;
      if (recon[j].branchOrder === s.branchOrder) orderSame++;
      if (Math.abs(recon[j].branchOrder - s.branchOrder) <= 1) orderNear++;
    }
  }

  const trueVolume = new Float64Array(nClass);
  const reconVolume = new Float64Array(nClass);
  for (const s of truth.segments) trueVolume[classOf(s.radiusM)] += volumeOf(s);
  for (const s of recon) reconVolume[classOf(s.radiusM)] += volumeOf(s);

  // Furcations.
  const trueF = furcationPoints(truth);
  const reconF = furcationPoints(reconstructed);
  const furcTrue = new Float64Array(nClass);
  const furcFound = new Float64Array(nClass);
  let found = 0;
  const furcCell = Math.max(options.furcation_tolerance_m, 2 * maxTrueRadius);
  const reconGrid = new Map<number, [number, number, number][]>();
  const keyOf = (p: [number, number, number], dx = 0, dy = 0, dz = 0): number =>
    cellKey(Math.floor(p[0] / furcCell) + dx, Math.floor(p[1] / furcCell) + dy, Math.floor(p[2] / furcCell) + dz);
  for (const g of reconF) {
    const k = keyOf(g.point);
    const list = reconGrid.get(k);
    if (list) list.push(g.point);
    else reconGrid.set(k, [g.point]);
  }
  for (const f of trueF) {
    const c = classOf(f.radiusM);
    furcTrue[c]++;
    const tol = Math.max(options.furcation_tolerance_m, 2 * f.radiusM);
    let hit = false;
    for (let dx = -1; dx <= 1 && !hit; dx++)
      for (let dy = -1; dy <= 1 && !hit; dy++)
        for (let dz = -1; dz <= 1 && !hit; dz++)
          for (const q of reconGrid.get(keyOf(f.point, dx, dy, dz)) ?? [])
            if (Math.hypot(q[0] - f.point[0], q[1] - f.point[1], q[2] - f.point[2]) <= tol) hit = true;
    if (hit) {
      furcFound[c]++;
      found++;
    }
  }

  const mt = treeMetrics(truth);
  const mr = treeMetrics(reconstructed);
  const allErrors = relErrors.flat();
  const ratio = (a: number, b: number): number | null => (b > 0 ? a / b : null);
  const relative = (got: number, want: number): number | null => (want > 0 ? (got - want) / want : null);
  const sum = (a: Float64Array): number => a.reduce((x, y) => x + y, 0);

  const byClass: ScoreClassRow[] = RADIUS_CLASSES.map((cl, c) => ({
    radius_class: cl.name,
    true_length_m: trueLength[c],
    recovered_fraction: ratio(matchedLength[c], sampledLength[c]),
    radius_median_relative_error: median(relErrors[c]),
    radius_rmse_relative_error: rms(relErrors[c]),
    true_volume_m3: trueVolume[c],
    reconstructed_volume_m3: reconVolume[c],
    volume_relative_error: relative(reconVolume[c], trueVolume[c]),
    furcations_true: furcTrue[c],
    furcations_found_fraction: ratio(furcFound[c], furcTrue[c]),
  }));

  const { trueExponent, reconstructedExponent, trueConductanceKgPerSPerMPa: gT, reconstructedConductanceKgPerSPerMPa: gR } = summaries;
  return {
    schema: 'xylemap.score/1',
    segments: { true: truth.segments.length, reconstructed: recon.length },
    dbh: {
      true_m: mt.dbh_m,
      reconstructed_m: mr.dbh_m,
      error_m: mt.dbh_m !== null && mr.dbh_m !== null ? mr.dbh_m - mt.dbh_m : null,
      relative_error: mt.dbh_m !== null && mr.dbh_m !== null ? relative(mr.dbh_m, mt.dbh_m) : null,
    },
    height: { true_m: mt.height_m, reconstructed_m: mr.height_m, error_m: mr.height_m - mt.height_m },
    wood_volume: { true_m3: mt.wood_volume_m3, reconstructed_m3: mr.wood_volume_m3, relative_error: relative(mr.wood_volume_m3, mt.wood_volume_m3) },
    length: { true_m: mt.total_length_m, reconstructed_m: mr.total_length_m, recovered_fraction: ratio(sum(matchedLength), sum(sampledLength)) },
    radius: { samples: allErrors.length, median_relative_error: median(allErrors), rmse_relative_error: rms(allErrors) },
    furcations: { true: trueF.length, reconstructed: reconF.length, found, found_fraction: ratio(found, trueF.length) },
    branch_order_agreement: ratio(orderSame, orderTotal),
    branch_order_within_one: ratio(orderNear, orderTotal),
    exponent:
      isNum(trueExponent) && isNum(reconstructedExponent)
        ? { true: trueExponent, reconstructed: reconstructedExponent, error: reconstructedExponent - trueExponent }
        : null,
    conductance:
      isNum(gT) && isNum(gR) && gT > 0
        ? { true_kg_s_mpa: gT, reconstructed_kg_s_mpa: gR, relative_error: (gR - gT) / gT }
        : null,
    by_radius_class: byClass,
  };
}

/**
 * Exponent and conductance from summary.json objects (`scaling.exponent.estimate`,
 * `hydraulics.tree_conductance_kg_s_mpa`) and truth.json (`exponent_a`); missing values stay undefined.
 */
export function summariesFrom(trueSummary: unknown, truthJson: unknown, reconSummary: unknown): ScoreSummaries {
  const get = (o: unknown, path: string[]): number | undefined => {
    let v: unknown = o;
    for (const k of path) v = v && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined;
    return isNum(v) ? v : undefined;
  };
  return {
    trueExponent: get(truthJson, ['exponent_a']) ?? get(trueSummary, ['scaling', 'exponent', 'estimate']),
    trueConductanceKgPerSPerMPa: get(trueSummary, ['hydraulics', 'tree_conductance_kg_s_mpa']),
    reconstructedExponent: get(reconSummary, ['scaling', 'exponent', 'estimate']),
    reconstructedConductanceKgPerSPerMPa: get(reconSummary, ['hydraulics', 'tree_conductance_kg_s_mpa']),
  };
}

function isNum(v: unknown): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

function axisLength(s: Segment): number {
  return Math.hypot(s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]);
}

function volumeOf(s: Segment): number {
  return Math.PI * s.radiusM * s.radiusM * axisLength(s);
}

function unit(s: Segment): [number, number, number] {
  const l = axisLength(s) || 1;
  return [(s.end[0] - s.start[0]) / l, (s.end[1] - s.start[1]) / l, (s.end[2] - s.start[2]) / l];
}

function median(v: number[]): number | null {
  if (v.length === 0) return null;
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function rms(v: number[]): number | null {
  if (v.length === 0) return null;
  return Math.sqrt(v.reduce((a, x) => a + x * x, 0) / v.length);
}

/** Furcation points: end of every segment with ≥ 2 children, with that segment's radius. */
function furcationPoints(network: Network): { point: [number, number, number]; radiusM: number }[] {
  const tree = SegmentTree.fromNetwork(network);
  const out: { point: [number, number, number]; radiusM: number }[] = [];
  tree.eachBefore((i) => {
    if (tree.children[i].length >= 2) out.push({ point: network.segments[i].end, radiusM: network.segments[i].radiusM });
  });
  return out;
}

/** Cell key of integer cell coordinates (±65 536 cells per axis fit in 51 bits). */
function cellKey(x: number, y: number, z: number): number {
  return ((x + 65536) * 131072 + (y + 65536)) * 131072 + (z + 65536);
}

/** Uniform grid over segment boxes for nearest-axis queries within a bounded distance. */
class SegmentGrid {
  private cells = new Map<number, number[]>();
  private readonly units: Float64Array;

  constructor(
    private readonly segments: Segment[],
    private readonly cell: number,
  ) {
    this.units = new Float64Array(3 * segments.length);
    segments.forEach((s, i) => {
      this.units.set(unit(s), 3 * i);
      const lo = [0, 1, 2].map((a) => Math.floor(Math.min(s.start[a], s.end[a]) / cell));
      const hi = [0, 1, 2].map((a) => Math.floor(Math.max(s.start[a], s.end[a]) / cell));
      for (let x = lo[0]; x <= hi[0]; x++)
        for (let y = lo[1]; y <= hi[1]; y++)
          for (let z = lo[2]; z <= hi[2]; z++) {
            const key = cellKey(x, y, z);
            const list = this.cells.get(key);
            if (list) list.push(i);
            else this.cells.set(key, [i]);
          }
    });
  }

  /** Index of the nearest segment within `tol` whose direction agrees (|cos| ≥ cosMax), or -1. */
  nearest(p: [number, number, number], tol: number, dir: [number, number, number], cosMax: number): number {
    const reach = Math.ceil(tol / this.cell);
    const cx = Math.floor(p[0] / this.cell);
    const cy = Math.floor(p[1] / this.cell);
    const cz = Math.floor(p[2] / this.cell);
    let best = -1;
    let bestD = tol;
    // A segment spanning several cells is tested more than once; harmless for a minimum.
    for (let x = cx - reach; x <= cx + reach; x++)
      for (let y = cy - reach; y <= cy + reach; y++)
        for (let z = cz - reach; z <= cz + reach; z++) {
          const list = this.cells.get(cellKey(x, y, z));
          if (!list) continue;
          for (const i of list) {
            const d = pointSegmentDistance(p, this.segments[i]);
            if (d > bestD) continue;
            const u = this.units;
            if (Math.abs(u[3 * i] * dir[0] + u[3 * i + 1] * dir[1] + u[3 * i + 2] * dir[2]) < cosMax) continue;
            bestD = d;
            best = i;
          }
        }
    return best;
  }
}

function pointSegmentDistance(p: [number, number, number], s: Segment): number {
  const ex = s.end[0] - s.start[0];
  const ey = s.end[1] - s.start[1];
  const ez = s.end[2] - s.start[2];
  const l2 = ex * ex + ey * ey + ez * ez;
  let t = l2 > 0 ? ((p[0] - s.start[0]) * ex + (p[1] - s.start[1]) * ey + (p[2] - s.start[2]) * ez) / l2 : 0;
  t = Math.max(0, Math.min(1, t));
  return Math.hypot(p[0] - s.start[0] - t * ex, p[1] - s.start[1] - t * ey, p[2] - s.start[2] - t * ez);
}
