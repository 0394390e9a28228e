import type { PointCloud } from '../types/point-cloud.js';
import type { Network, Segment, Vec3 } from '../types/network.js';
import type { OptionValues } from '../options/declare.js';
import { cleanOptions } from '../clean/options.js';
import { cleanCloud, type CleanCounts } from '../clean/clean-cloud.js';
import { shortestPaths } from '../graph/dijkstra.js';
import { bridgeGaps } from '../graph/bridge-gaps.js';
import { annotateNetwork } from '../topology/annotate.js';
import { treeMetrics, type TreeMetrics } from '../topology/metrics.js';
import { reconstructOptions } from './options.js';
import { buildBandClusters } from './band-clusters.js';
import { buildSkeleton } from './skeleton.js';
import { fitSegments } from './fit-segments.js';
import { summarizeReliability, type ReliabilitySummary } from './reliability-summary.js';
import { correctNetworkRadii } from './correct-radii.js';
import { floorUnfittedRadii } from './child-floor.js';

/** A piece should hold this many times the fewest points a fit accepts (common practice, no source). */
const PIECE_POINTS_PER_FIT_POINT = 3;

/** Side shoots that stay below this height above the ground are ground clutter (common practice, no source). */
const GROUND_SHOOT_HEIGHT_M = 0.5;

/** A bridged gap may be at most this multiple of the attached piece's extent (common practice, no source). */
const BRIDGE_GAP_PER_EXTENT = 1;

export type ProgressCallback = (stage: string, done: number, total: number) => void;

export interface ReconstructOptionsInput {
  clean: OptionValues<typeof cleanOptions.specs>;
  reconstruct: OptionValues<typeof reconstructOptions.specs>;
}

/** The `tree` block of summary.json: topology metrics plus what reconstruction itself knows. */
export interface TreeBlock extends TreeMetrics {
  /** Stem-base position in the input's own frame, m. */
  stem_base_xyz: Vec3;
  /** Angle of the stem-base segment from vertical, degrees. */
  stem_lean_deg: number;
  point_count_input: number;
  point_count_used: number;
  points_removed: Omit<CleanCounts, 'input' | 'kept'>;
  voxel_count: number;
  band_cluster_count: number;
  gap_bridge_count: number;
}

export interface ReconstructResult {
  network: Network;
  /** Segment id per input point, -1 where the point is not part of the network. */
  pointSegmentId: Int32Array;
  tree: TreeBlock;
  reliability: ReliabilitySummary & { volume_fit_m3: number; volume_corrected_m3: number; taper_outliers: number };
  warnings: string[];
  /** Wall time per stage, ms. */
  timingsMs: Record<string, number>;
}

/**
 * Reconstruct one tree: clean → neighbourhood graph → graph distances from the stem base with
 * occlusion gaps bridged → geodesic bands and band clusters → branch pieces → one fitted cylinder
 * per piece → radius correction of unreliable segments → topology (branches, orders).
 * Works in a local frame (input minus its minimum corner) and returns coordinates in the input's
 * own frame.
 *
 * @param cloud the scan (any frame)
 * @param options resolved `clean` and `reconstruct` options
 * @param progress called with (stage, done, total) as stages advance
 * @throws XylemapError on a cloud that is too small or holds no tree
 */
export function reconstructTree(cloud: PointCloud, options: ReconstructOptionsInput, progress?: ProgressCallback): ReconstructResult {
  const timingsMs: Record<string, number> = {};
  let t0 = performance.now();
  const lap = (name: string): void => {
    const t = performance.now();
    timingsMs[name] = Math.round(t - t0);
    t0 = t;
  };
  const co = options.clean;
  const ro = options.reconstruct;

  const cleaned = cleanCloud(cloud, co, progress);
  lap('clean');
  const warnings = [...cleaned.warnings];
  const m = cleaned.x.length;

  progress?.('graph', 0, 2);
  const paths = shortestPaths(cleaned.graph, cleaned.base.seeds);
  const include = new Uint8Array(m).fill(1);
  const bridges = bridgeGaps(cleaned.x, cleaned.y, cleaned.z, cleaned.graph, cleaned.tree, paths, include, {
    maxGapM: co.bridge_max_gap_m,
    minPieceVertices: co.min_piece_voxels,
    heightM: cleaned.heightM,
    minPieceTopM: GROUND_SHOOT_HEIGHT_M,
    maxGapPerExtent: BRIDGE_GAP_PER_EXTENT,
  });
  // Unreached vertices in sizeable pieces (≥ 100 voxels) are objects or branches left out; single
  // stray voxels (clutter, mixed pixels) are expected and not worth a warning.
  const pieceSize = new Map<number, number>();
  for (let v = 0; v < m; v++) pieceSize.set(cleaned.pieceLabel[v], (pieceSize.get(cleaned.pieceLabel[v]) ?? 0) + 1);
  let unreachedBig = 0;
  for (let v = 0; v < m; v++) if (!(paths.distanceM[v] < Infinity) && pieceSize.get(cleaned.pieceLabel[v])! >= 100) unreachedBig++;
  const unreachedFraction = unreachedBig / m;
  if (unreachedFraction > 0.2) {
    warnings.push(
      `${Math.round(100 * unreachedFraction)} % of the cleaned cloud (in pieces of 100 voxels or more) could not be connected to the stem base (gaps longer than clean.bridge_max_gap_m = ${co.bridge_max_gap_m} m, or other objects) and was left out`,
    );
  }
  progress?.('graph', 2, 2);
  lap('graph');

  // A band narrower than the graph's edges would cut surfaces into specks.
  const bandMinM = Math.max(ro.band_min_m, 0.75 * cleaned.graphRadiusM);
  const bands = buildBandClusters(cleaned.x, cleaned.y, cleaned.z, cleaned.graph, paths, cleaned.base.seeds, {
    ...ro,
    band_min_m: bandMinM,
    band_max_m: Math.max(ro.band_max_m, bandMinM),
  });
  lap('bands');
  // A real branch has at least about one vertex per half graph edge along its length.
  const clusterPoints = new Float64Array(bands.count);
  const clusterMaxHeight = new Float64Array(bands.count).fill(-Infinity);
  for (let c = 0; c < bands.count; c++) {
    for (let a = bands.offsets[c]; a < bands.offsets[c + 1]; a++) {
      const v = bands.vertices[a];
      const vox = cleaned.vertexVoxel[v];
      clusterPoints[c] += cleaned.voxels.pointOffsets[vox + 1] - cleaned.voxels.pointOffsets[vox];
      if (cleaned.heightM[v] > clusterMaxHeight[c]) clusterMaxHeight[c] = cleaned.heightM[v];
    }
  }
  const skeleton = buildSkeleton(bands, {
    ...ro,
    min_vertices_per_m: 2 / cleaned.graphRadiusM,
    cluster_points: clusterPoints,
    min_piece_points: PIECE_POINTS_PER_FIT_POINT * ro.min_fit_points,
    cluster_max_height_m: clusterMaxHeight,
    ground_shoot_height_m: GROUND_SHOOT_HEIGHT_M,
  });
  lap('skeleton');

  progress?.('fit', 0, 1);
  const local = fitSegments(
    {
      px: cleaned.local.x,
      py: cleaned.local.y,
      pz: cleaned.local.z,
      vx: cleaned.x,
      vy: cleaned.y,
      vz: cleaned.z,
      vertexVoxel: cleaned.vertexVoxel,
      voxelPointOffsets: cleaned.voxels.pointOffsets,
      voxelPoints: cleaned.voxels.points,
      groundAt: (x, y) => cleaned.ground.heightAt(x, y),
    },
    bands,
    skeleton,
    ro,
  );
  progress?.('fit', 1, 1);
  lap('fit');

  const correction = correctNetworkRadii(local, ro.range_noise_m, ro.correct_radii ? 'taper' : 'none');
  const corrected = floorUnfittedRadii(correction.segments);
  const origin = cleaned.origin;
  const shifted: Segment[] = corrected.map((s) => ({
    ...s,
    start: [s.start[0] + origin[0], s.start[1] + origin[1], s.start[2] + origin[2]],
    end: [s.end[0] + origin[0], s.end[1] + origin[1], s.end[2] + origin[2]],
  }));
  const annotated = annotateNetwork({ segments: shifted, ...(cloud.source.vlrs ? {} : {}) });
  const network: Network = { segments: annotated.segments };
  const metrics = treeMetrics(annotated);
  lap('topology');

  // Labels: input point → voxel → vertex → cluster → (kept cluster) → piece.
  const pointSegmentId = new Int32Array(cloud.count).fill(-1);
  const voxelVertex = new Int32Array(cleaned.voxels.count).fill(-1);
  for (let v = 0; v < m; v++) voxelVertex[cleaned.vertexVoxel[v]] = v;
  for (let i = 0; i < cloud.count; i++) {
    const vox = cleaned.voxels.pointVoxel[i];
    if (vox < 0) continue;
    const vert = voxelVertex[vox];
    if (vert < 0) continue;
    const c = bands.vertexCluster[vert];
    if (c < 0) continue;
    const piece = skeleton.clusterPiece[skeleton.prunedInto[c]];
    if (piece >= 0) pointSegmentId[i] = piece;
  }
  lap('labels');

  const root = network.segments[0];
  const d = [root.end[0] - root.start[0], root.end[1] - root.start[1], root.end[2] - root.start[2]];
  const lean = (Math.acos(Math.min(1, Math.max(-1, d[2] / (Math.hypot(d[0], d[1], d[2]) || 1)))) * 180) / Math.PI;
  if (lean > 30) warnings.push(`the stem leans ${lean.toFixed(0)}° from vertical; DBH is taken 1.3 m along the stem axis`);
  if (network.segments.length < 3) warnings.push(`only ${network.segments.length} segment(s) were found: the cloud may not hold a tree, or the scan is too sparse`);
  if (metrics.dbh_m === null) warnings.push('the reconstructed stem is shorter than 1.3 m: no DBH');

  const { input, kept, ...removed } = cleaned.counts;
  let used = 0;
  for (let i = 0; i < cloud.count; i++) if (pointSegmentId[i] >= 0) used++;
  void kept;
  const tree: TreeBlock = {
    ...metrics,
    stem_base_xyz: [...root.start] as Vec3,
    stem_lean_deg: lean,
    point_count_input: input,
    point_count_used: used,
    points_removed: removed,
    voxel_count: cleaned.voxels.count,
    band_cluster_count: bands.count,
    gap_bridge_count: bridges.length,
  };
  const reliability = {
    ...summarizeReliability(network.segments),
    volume_fit_m3: correction.summary.volumeFitM3,
    volume_corrected_m3: correction.summary.volumeCorrectedM3,
    taper_outliers: correction.summary.taperOutliers,
  };
  return { network, pointSegmentId, tree, reliability, warnings, timingsMs };
}
