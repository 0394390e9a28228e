import { treeMetrics } from '../topology/metrics.js';
import type { PointCloud } from '../types/point-cloud.js';
import { VERSION } from '../version.js';
import { scanCoverage, type CoverageRow } from './coverage.js';
import type { SimulateOptions } from './options.js';
import { buildScene } from './scene.js';
import { scanSceneParallel } from './parallel-scan.js';
import { scanPositions, scanRandom, scanScene, type ScanPosition, type ScanStats } from './scanner.js';
import { generateTree, type GeneratedTree } from './tree.js';

export interface VirtualScan {
  tree: GeneratedTree;
  positions: ScanPosition[];
  cloud: PointCloud;
  stats: ScanStats;
  /** The truth.json document. */
  truth: TruthDocument;
}

/** truth.json: everything the scan lab knows about the generated tree and its virtual scan. */
export interface TruthDocument {
  schema: 'xylemap.truth/1';
  xylemap_version: string;
  seed: number;
  preset: string | null;
  tree: {
    dbh_m: number | null;
    height_m: number;
    wood_volume_m3: number;
    total_branch_length_m: number;
    segment_count: number;
    branch_count: number;
    tip_count: number;
    furcation_count: number;
    max_branch_order: number;
    crown_spread_m: number;
    /** Branches, segments and length per centrifugal branching order (index = order). */
    counts_by_branch_order: { branch_order: number; branches: number; segments: number; length_m: number }[];
  };
  exponent_a: number;
  furcations: {
    parent_segment_id: number;
    child_segment_ids: number[];
    parent_end_radius_m: number;
    child_start_radii_m: number[];
    exponent_a: number;
    height_m: number;
    branch_order: number;
    stem_fork: boolean;
  }[];
  labels: Record<string, number>;
  scan: {
    positions: { id: number; x_m: number; y_m: number; z_m: number; registration_rotation_deg: number; registration_shift_m: number[]; rays: number; points: number }[];
    rays: number;
    points: number;
    points_per_label: Record<string, number>;
    /** Share of true axis length (5 cm bins) with at least one return of its segment, per radius class. */
    coverage_by_radius_class: CoverageRow[];
  };
  /** The resolved `simulate` options (generator and scan settings). */
  parameters: SimulateOptions;
}

/**
 * Generate a tree, scan it virtually and assemble the truth. Pure: nothing is written.
 * @param options resolved `simulate` options
 * @param preset name of the preset the options came from, recorded in the truth
 */
export function simulate(options: SimulateOptions, preset: string | null = null): VirtualScan {
  const { tree, scene, positions } = prepare(options);
  const { cloud, stats } = scanScene(scene, options, positions);
  return finish(tree, positions, cloud, stats, options, preset);
}

/**
 * `simulate` with the scan positions spread over worker threads; the same result, sooner.
 * @param threads worker threads (1 = scan in the calling thread)
 */
export async function simulateParallel(options: SimulateOptions, preset: string | null = null, threads = 2): Promise<VirtualScan> {
  const { tree, scene, positions } = prepare(options);
  const { cloud, stats } = await scanSceneParallel(scene, options, positions, threads);
  return finish(tree, positions, cloud, stats, options, preset);
}

function prepare(options: SimulateOptions) {
  const tree = generateTree(options);
  const rng = scanRandom(options.seed);
  const scene = buildScene(tree.network, tree.tipSegmentIds, options.leaves_per_tip, options.leaf_radius_m, rng);
  const positions = scanPositions(options, rng);
  return { tree, scene, positions };
}

function finish(tree: GeneratedTree, positions: ScanPosition[], cloud: PointCloud, stats: ScanStats, options: SimulateOptions, preset: string | null): VirtualScan {
  cloud.source = { format: 'generated', software: `xylemap ${VERSION} simulate` };
  countReturnsPerSegment(tree, cloud);
  const coverage = scanCoverage(tree.network, cloud);
  return { tree, positions, cloud, stats, truth: truthDocument(tree, positions, stats, options, preset, coverage) };
}

/** point_count of each true segment: its returns in the virtual scan (wood and mixed-pixel labels). */
function countReturnsPerSegment(tree: GeneratedTree, cloud: PointCloud): void {
  const segs = tree.network.segments;
  const index = new Map(segs.map((s, i) => [s.segmentId, i]));
  const counts = new Int32Array(segs.length);
  const ids = cloud.extra.segment_id as Int32Array;
  for (let p = 0; p < ids.length; p++) {
    const i = ids[p] >= 0 ? index.get(ids[p]) : undefined;
    if (i !== undefined) counts[i]++;
  }
  segs.forEach((s, i) => (s.pointCount = counts[i]));
}

/** Build truth.json from a generated tree and its scan. */
export function truthDocument(
  tree: GeneratedTree,
  positions: ScanPosition[],
  stats: ScanStats,
  options: SimulateOptions,
  preset: string | null,
  coverage: CoverageRow[],
): TruthDocument {
  const m = treeMetrics(tree.network);
  const byOrder: TruthDocument['tree']['counts_by_branch_order'] = [];
  const branchSets: Set<number>[] = [];
  for (const s of tree.network.segments) {
    while (byOrder.length <= s.branchOrder) {
      byOrder.push({ branch_order: byOrder.length, branches: 0, segments: 0, length_m: 0 });
      branchSets.push(new Set());
    }
    const row = byOrder[s.branchOrder];
    row.segments++;
    row.length_m += s.lengthM;
    branchSets[s.branchOrder].add(s.branchId);
  }
  byOrder.forEach((row, i) => (row.branches = branchSets[i].size));
  return {
    schema: 'xylemap.truth/1',
    xylemap_version: VERSION,
    seed: options.seed,
    preset,
    tree: {
      dbh_m: m.dbh_m,
      height_m: m.height_m,
      wood_volume_m3: m.wood_volume_m3,
      total_branch_length_m: m.total_length_m,
      segment_count: m.segment_count,
      branch_count: m.branch_count,
      tip_count: m.tip_count,
      furcation_count: tree.furcations.length,
      max_branch_order: m.max_branch_order,
      crown_spread_m: m.crown_spread_m,
      counts_by_branch_order: byOrder,
    },
    exponent_a: options.exponent_a,
    furcations: tree.furcations.map((f) => ({
      parent_segment_id: f.parentSegmentId,
      child_segment_ids: f.childSegmentIds,
      parent_end_radius_m: f.parentEndRadiusM,
      child_start_radii_m: f.childStartRadiiM,
      exponent_a: f.exponentA,
      height_m: f.heightM,
      branch_order: f.branchOrder,
      stem_fork: f.stemFork,
    })),
    labels: { wood: 0, ground: 1, clutter: 2, mixed_pixel: 3, leaf: 4 },
    scan: {
      positions: positions.map((p, i) => ({
        id: p.id,
        x_m: p.x,
        y_m: p.y,
        z_m: p.z,
        registration_rotation_deg: p.registrationRotationDeg,
        registration_shift_m: p.registrationShiftM,
        rays: stats.perPosition[i]?.rays ?? 0,
        points: stats.perPosition[i]?.points ?? 0,
      })),
      rays: stats.rays,
      points: stats.points,
      points_per_label: { ...stats.pointsPerLabel },
      coverage_by_radius_class: coverage,
    },
    parameters: options,
  };
}
