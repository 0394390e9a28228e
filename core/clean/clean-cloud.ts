import type { PointCloud } from '../types/point-cloud.js';
import type { Vec3 } from '../types/network.js';
import { XylemapError } from '../util/errors.js';
import { buildKdTree, type KdTree } from '../graph/kdtree.js';
import { buildNeighbourGraph, type NeighbourGraph } from '../graph/neighbour-graph.js';
import { connectedComponents } from '../graph/components.js';
import type { CleanOptionValues } from './options.js';
import { voxelize, type VoxelGrid } from './voxelize.js';
import { statisticalOutliers } from './outliers.js';
import { estimateGround, type GroundModel } from './ground.js';
import { findStemBase, pieceStats, type StemBase } from './stem-base.js';
import { leafMask, shapeFeaturesOf } from './wood-leaf.js';

/** Graph radius as a multiple of the median spacing of the thinned cloud, when that is larger than the option. */
const SPACING_TO_GRAPH_RADIUS = 3;

/** Why points were removed, counted per input point. */
export interface CleanCounts {
  input: number;
  non_finite: number;
  outlier: number;
  ground: number;
  below_ground: number;
  leaf: number;
  kept: number;
}

/**
 * The cleaned cloud as graph vertices (one per kept voxel) in a local frame (input minus `origin`).
 */
export interface CleanedCloud {
  /** Subtracted from every coordinate; add it back on output. */
  origin: Vec3;
  /** Local coordinates of all input points (NaN for non-finite ones), m. */
  local: { x: Float64Array; y: Float64Array; z: Float64Array };
  voxels: VoxelGrid;
  /** Graph vertex → voxel. */
  vertexVoxel: Int32Array;
  /** Vertex coordinates (voxel centroids), local frame, m. */
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Height of each vertex above the ground surface, m. */
  heightM: Float64Array;
  tree: KdTree;
  graph: NeighbourGraph;
  /** Connected piece of each vertex. */
  pieceLabel: Int32Array;
  base: StemBase;
  /** Median nearest-neighbour distance of the vertices, m. */
  medianSpacingM: number;
  /** Longest graph edge actually used, m. */
  graphRadiusM: number;
  ground: GroundModel;
  counts: CleanCounts;
  warnings: string[];
}

/**
 * Clean a single-tree scan: drop non-finite points, thin to voxels, remove statistical outliers,
 * estimate the ground and remove it (and points far below it), optionally drop leaf-like voxels,
 * build the neighbourhood graph and find the stem base.
 * @throws XylemapError on too few points or a cloud without a tree
 */
export function cleanCloud(cloud: PointCloud, options: CleanOptionValues, progress?: (stage: string, done: number, total: number) => void): CleanedCloud {
  const file = cloud.source.path;
  const n = cloud.count;
  if (!(n >= options.min_points)) {
    throw new XylemapError(`too few points for a tree: ${n} (need at least ${options.min_points})`, {
      file,
      stage: 'clean',
      option: 'clean.min_points',
      hint: 'use a denser scan, or lower clean.min_points if the plant really is this small',
    });
  }
  const finite = new Uint8Array(n);
  let ox = Infinity, oy = Infinity, oz = Infinity;
  let nonFinite = 0;
  for (let i = 0; i < n; i++) {
    const a = cloud.x[i], b = cloud.y[i], c = cloud.z[i];
    if (Number.isFinite(a) && Number.isFinite(b) && Number.isFinite(c)) {
      finite[i] = 1;
      if (a < ox) ox = a;
      if (b < oy) oy = b;
      if (c < oz) oz = c;
    } else nonFinite++;
  }
  if (n - nonFinite < options.min_points) {
    throw new XylemapError(`only ${n - nonFinite} of ${n} points have finite coordinates (need ${options.min_points})`, { file, stage: 'clean' });
  }
  const origin: Vec3 = [ox, oy, oz];
  const lx = new Float64Array(n);
  const ly = new Float64Array(n);
  const lz = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lx[i] = finite[i] ? cloud.x[i] - ox : NaN;
    ly[i] = finite[i] ? cloud.y[i] - oy : NaN;
    lz[i] = finite[i] ? cloud.z[i] - oz : NaN;
  }
  progress?.('clean', 0, 4);
  // Ground first, on the raw points (two cheap passes): ground points usually outnumber the tree,
  // and thinning and outlier search then only see what stands above the ground.
  const ground = estimateGround(lx, ly, lz, options.ground_cell_m, finite);
  const pointReason = new Uint8Array(n); // 0 keep, 1 outlier, 2 ground, 3 below ground, 4 leaf, 5 non-finite
  const standing = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (!finite[i]) {
      pointReason[i] = 5;
      continue;
    }
    const h = lz[i] - ground.heightAt(lx[i], ly[i]);
    if (h < -options.below_ground_m) pointReason[i] = 3;
    else if (options.remove_ground && h < options.ground_height_m) pointReason[i] = 2;
    else standing[i] = 1;
  }
  const voxels = voxelize(lx, ly, lz, options.voxel_size_m, standing);
  progress?.('clean', 1, 4);
  if (voxels.count === 0) {
    throw new XylemapError('no tree found: nothing stands above the ground surface', {
      file,
      stage: 'clean',
      hint: 'the cloud looks like ground only; check the file, or set clean.remove_ground to false for a cloud without ground',
    });
  }
  const allTree = buildKdTree(voxels.x, voxels.y, voxels.z);
  const { outlier, medianSpacingM } = statisticalOutliers(allTree, voxels.x, voxels.y, voxels.z, options.outlier_neighbours, options.outlier_std_ratio);
  const voxelHeight = new Float64Array(voxels.count);
  const reason = new Uint8Array(voxels.count);
  for (let v = 0; v < voxels.count; v++) {
    voxelHeight[v] = voxels.z[v] - ground.heightAt(voxels.x[v], voxels.y[v]);
    if (outlier[v]) reason[v] = 1;
  }
  if (options.leaf_filter) {
    const keepIdx: number[] = [];
    for (let v = 0; v < voxels.count; v++) if (reason[v] === 0) keepIdx.push(v);
    const sub = Int32Array.from(keepIdx);
    const fx = new Float64Array(sub.length), fy = new Float64Array(sub.length), fz = new Float64Array(sub.length);
    for (let k = 0; k < sub.length; k++) {
      fx[k] = voxels.x[sub[k]];
      fy[k] = voxels.y[sub[k]];
      fz[k] = voxels.z[sub[k]];
    }
    const features = shapeFeaturesOf(buildKdTree(fx, fy, fz), fx, fy, fz, options.leaf_neighbours);
    const leaf = leafMask(features, options.leaf_linearity_max, options.leaf_scattering_min);
    for (let k = 0; k < sub.length; k++) if (leaf[k]) reason[sub[k]] = 4;
  }
  progress?.('clean', 2, 4);

  const kept: number[] = [];
  for (let v = 0; v < voxels.count; v++) if (reason[v] === 0) kept.push(v);
  const vertexVoxel = Int32Array.from(kept);
  const m = vertexVoxel.length;
  const x = new Float64Array(m), y = new Float64Array(m), z = new Float64Array(m), heightM = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const v = vertexVoxel[k];
    x[k] = voxels.x[v];
    y[k] = voxels.y[v];
    z[k] = voxels.z[v];
    heightM[k] = voxelHeight[v];
  }
  const counts: CleanCounts = { input: n, non_finite: nonFinite, outlier: 0, ground: 0, below_ground: 0, leaf: 0, kept: 0 };
  const names = ['kept', 'outlier', 'ground', 'below_ground', 'leaf'] as const;
  for (let i = 0; i < n; i++) {
    const r = pointReason[i];
    if (r === 2 || r === 3) counts[names[r]]++;
  }
  for (let v = 0; v < voxels.count; v++) counts[names[reason[v]]] += voxels.pointOffsets[v + 1] - voxels.pointOffsets[v];
  if (m === 0) {
    throw new XylemapError('no tree found: nothing is left after removing ground and outliers', {
      file,
      stage: 'clean',
      hint: 'check that the cloud contains a tree',
    });
  }
  const tree = buildKdTree(x, y, z);
  // Sparse scans (thinned files, airborne or distant scans) need longer edges than the default;
  // 3 × the median voxel spacing connects a surface sampled at that spacing (common practice, no source).
  const graphRadiusM = Math.max(options.graph_radius_m, SPACING_TO_GRAPH_RADIUS * medianSpacingM);
  const graph = buildNeighbourGraph(x, y, z, options.graph_neighbours, graphRadiusM, tree);
  progress?.('clean', 3, 4);
  const comps = connectedComponents(graph);
  const pieces = pieceStats(comps.label, comps.count, heightM);
  const base = findStemBase(pieces, comps.label, heightM, options.base_search_height_m, options.base_slice_m, file);
  const warnings = [...base.warnings];
  if (ground.acceptedFraction < 0.2 && options.remove_ground) {
    warnings.push(`little ground was seen (${Math.round(100 * ground.acceptedFraction)} % of cells); the ground surface is mostly a fitted plane`);
  }
  progress?.('clean', 4, 4);
  return {
    origin,
    local: { x: lx, y: ly, z: lz },
    voxels,
    vertexVoxel,
    x,
    y,
    z,
    heightM,
    tree,
    graph,
    pieceLabel: comps.label,
    base,
    medianSpacingM,
    graphRadiusM,
    ground,
    counts,
    warnings,
  };
}
