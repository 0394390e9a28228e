import type { Network } from '../types/network.js';
import { annotateNetwork, furcations, lengthOf, type AnnotatedNetwork } from './annotate.js';
import { convexHull2d, hullArea, hullDiameter } from './hull.js';

/** Breast height, 1.3 m above the stem base (common forestry practice; see GLOSSARY "DBH"). */
export const BREAST_HEIGHT_M = 1.3;

/**
 * A child at a fork below breast height counts as a separate stem when its radius is at least
 * this fraction of the main continuation's radius (common practice, no source: a fork into
 * comparable stems versus a low side branch).
 */
export const STEM_FORK_RADIUS_RATIO = 0.5;

/** The `tree` block of summary.json (snake_case keys, units in the names). */
export interface TreeMetrics {
  /** Equivalent single DBH sqrt(Σ d²) over the stems at breast height, m; null when the stem is shorter than 1.3 m. */
  dbh_m: number | null;
  /** Diameter of each stem at breast height, m (one entry unless the trunk forks below 1.3 m). */
  dbh_per_stem_m: number[];
  stem_count_at_breast_height: number;
  /** Highest segment end/start z minus the stem-base z, m. */
  height_m: number;
  /** Largest horizontal distance between any two segment end points, m. */
  crown_spread_m: number;
  /** Area of the convex hull of the segment end points projected on the horizontal plane, m². */
  crown_projected_area_m2: number;
  /** Height above the stem base where the lowest first-order branch leaves the stem, m; null without branches. */
  crown_base_height_m: number | null;
  /** Σ π r² L over segments, m³. */
  wood_volume_m3: number;
  /** Lateral surface Σ 2 π r L, m² (end caps excluded — they are internal joints). */
  surface_area_m2: number;
  total_length_m: number;
  /** Segment length summed per centrifugal branching order, index = order, m. */
  length_by_order_m: number[];
  segment_count: number;
  branch_count: number;
  furcation_count: number;
  max_branch_order: number;
  tip_count: number;
}

/**
 * Whole-tree metrics from a network.
 *
 * DBH rule: breast height is measured along the network's path length from the stem base
 * (so a leaning stem is measured along its axis, as a tape would be). The stems are the trunk
 * (branch order 0) plus, at every furcation whose parent ends below 1.3 m path length, each
 * child with radius ≥ STEM_FORK_RADIUS_RATIO × the main child's radius (and everything that
 * continues it). For each stem, the diameter is 2 × radius of the segment whose path interval
 * [start, end) contains 1.3 m. The equivalent single DBH is sqrt(Σ d²) (same basal area).
 *
 * @param network a network or an annotated network (annotation is recomputed when missing)
 */
export function treeMetrics(network: Network | AnnotatedNetwork): TreeMetrics {
  const ann = 'tree' in network && 'mainChild' in network ? (network as AnnotatedNetwork) : annotateNetwork(network);
  const { segments, tree, pathLengthFromBaseM, mainChild } = ann;
  const n = segments.length;
  const base = segments[tree.root].start;

  let volume = 0;
  let surface = 0;
  let total = 0;
  let maxZ = base[2];
  let maxOrder = 0;
  const byOrder: number[] = [];
  const branches = new Set<number>();
  let tips = 0;
  for (let i = 0; i < n; i++) {
    const s = segments[i];
    const l = lengthOf(s);
    volume += Math.PI * s.radiusM * s.radiusM * l;
    surface += 2 * Math.PI * s.radiusM * l;
    total += l;
    maxZ = Math.max(maxZ, s.start[2], s.end[2]);
    maxOrder = Math.max(maxOrder, s.branchOrder);
    while (byOrder.length <= s.branchOrder) byOrder.push(0);
    byOrder[s.branchOrder] += l;
    branches.add(s.branchId);
    if (tree.isTip(i)) tips++;
  }

  // Stems at breast height.
  const isStem = new Uint8Array(n);
  const dbhPerStem: number[] = [];
  tree.eachBefore((i) => {
    const p = tree.parent[i];
    if (p < 0) isStem[i] = 1;
    else if (isStem[p]) {
      const parentEnd = pathLengthFromBaseM[p];
      const main = mainChild[p];
      isStem[i] =
        main === i || (parentEnd < BREAST_HEIGHT_M && segments[i].radiusM >= STEM_FORK_RADIUS_RATIO * segments[main].radiusM) ? 1 : 0;
    }
    if (!isStem[i]) return;
    const endPath = pathLengthFromBaseM[i];
    const startPath = endPath - lengthOf(segments[i]);
    if (startPath <= BREAST_HEIGHT_M && BREAST_HEIGHT_M < endPath) dbhPerStem.push(2 * segments[i].radiusM);
  });
  const dbh = dbhPerStem.length > 0 ? Math.sqrt(dbhPerStem.reduce((a, d) => a + d * d, 0)) : null;

  let crownBase: number | null = null;
  for (let i = 0; i < n; i++) {
    const p = tree.parent[i];
    if (p >= 0 && segments[i].branchOrder === 1 && segments[p].branchOrder === 0) {
      const h = segments[i].start[2] - base[2];
      if (crownBase === null || h < crownBase) crownBase = h;
    }
  }

  const px = new Float64Array(n + 1);
  const py = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) {
    px[i] = segments[i].end[0];
    py[i] = segments[i].end[1];
  }
  px[n] = base[0];
  py[n] = base[1];
  const hull = convexHull2d(px, py);

  return {
    dbh_m: dbh,
    dbh_per_stem_m: dbhPerStem,
    stem_count_at_breast_height: dbhPerStem.length,
    height_m: maxZ - base[2],
    crown_spread_m: hullDiameter(hull),
    crown_projected_area_m2: hullArea(hull),
    crown_base_height_m: crownBase,
    wood_volume_m3: volume,
    surface_area_m2: surface,
    total_length_m: total,
    length_by_order_m: byOrder,
    segment_count: n,
    branch_count: branches.size,
    furcation_count: furcations(tree).length,
    max_branch_order: maxOrder,
    tip_count: tips,
  };
}
