import { SegmentTree } from '../topology/node-tree.js';
import type { Network, Segment, Vec3 } from '../types/network.js';
import { XylemapError } from '../util/errors.js';
import { createRandom, type Random } from '../util/random.js';
import type { SimulateOptions } from './options.js';
import { DEG, add, coneDirection, cross, dot, norm, normalize, rotate, scale } from './vec.js';

/** One furcation of a generated tree: parent END radius and children START radii obey the rule exactly. */
export interface GeneratedFurcation {
  parentSegmentId: number;
  childSegmentIds: number[];
  parentEndRadiusM: number;
  childStartRadiiM: number[];
  exponentA: number;
  /** Height of the furcation point above the stem base, m. */
  heightM: number;
  branchOrder: number;
  /** True where the trunk forks into co-dominant stems. */
  stemFork: boolean;
}

export interface GeneratedTree {
  network: Network;
  furcations: GeneratedFurcation[];
  /** Segment ids of the tips (for leaves). */
  tipSegmentIds: number[];
}

/** A pending axis: a branch from where it leaves its parent to its tip. */
interface Axis {
  parentIndex: number;
  start: Vec3;
  dir: Vec3;
  radiusM: number;
  lengthM: number;
  /** Length of the first internode (clear bole), 0 for evenly spaced internodes. */
  boleM: number;
  order: number;
  branchId: number;
  /** Laterals of this axis get the crown-shape length profile (the trunk and fork stems). */
  stem: boolean;
  /** Fork into two co-dominant stems after the first internode (trunk only). */
  forkAtEnd: boolean;
  /** Furcation record to complete with the first segment id of this axis, and the child slot. */
  furcation: GeneratedFurcation | null;
  furcationSlot: number;
}

const UP: Vec3 = [0, 0, 1];
/** No axis gets more internodes than this (guards against an exponent/share that never reaches the twig radius). */
const MAX_INTERNODES_PER_AXIS = 400;

/**
 * Generate a tree whose every cylinder is known.
 *
 * Rules (all seeded, deterministic for a given `options`):
 * - The trunk starts at the origin with `trunk_base_radius_m`; every axis carries internodes of
 *   `cylinders_per_internode` cylinders; radius tapers by `taper_fraction` along an internode.
 * - At the end of an internode the axis furcates: the leading child gets share q of the parent's
 *   END radius^a, the k laterals (1, or 2 with `three_way_fraction`) split 1 − q equally, so
 *   Σ r_child^a = r_parent^a to rounding (area-preservation rule, exponent `exponent_a`).
 *   q > 0.5 keeps the leader the thickest child, the main continuation by the project's branch rule.
 * - An axis stops furcating where a lateral would be thinner than `twig_radius_m`; its last internode is a tip.
 * - Lateral axis length: parent length × lateral_length_ratio × (r_lateral / r_parent_axis)^length_exponent
 *   (WBE length–radius scaling l ∝ r^(2/3), West, Brown & Enquist 1999, Nature 400:664), times the
 *   crown-shape profile for laterals of a stem.
 * - Directions: branch angle and phyllotaxis-like azimuth rotation for laterals, leader deflection
 *   away from them, a random bend per cylinder, and gravitropic turning of laterals.
 *
 * @param options resolved `simulate` options (only the tree keys are used)
 * @throws XylemapError when the tree would exceed `max_segments`
 */
export function generateTree(options: SimulateOptions): GeneratedTree {
  const o = options;
  const rng = createRandom(o.seed);
  const segments: Segment[] = [];
  const furcationList: GeneratedFurcation[] = [];
  const tips: number[] = [];
  const a = o.exponent_a;

  const leanAzimuth = rng.uniform(0, 2 * Math.PI);
  const trunkDir = coneDirection(UP, o.trunk_lean_deg * DEG, leanAzimuth);
  const fork = o.trunk_fork_height_m > 0 && o.trunk_fork_height_m < o.tree_height_m;
  const stack: Axis[] = [
    {
      parentIndex: -1,
      start: [0, 0, 0],
      dir: trunkDir,
      radiusM: o.trunk_base_radius_m,
      lengthM: fork ? o.trunk_fork_height_m : o.tree_height_m,
      boleM: fork ? o.trunk_fork_height_m : o.crown_base_fraction * o.tree_height_m,
      order: 0,
      branchId: 0,
      stem: true,
      forkAtEnd: fork,
      furcation: null,
      furcationSlot: 0,
    },
  ];
  let nextBranchId = 1;

  while (stack.length > 0) {
    const axis = stack.pop()!;
    const plan = planInternodes(axis, o, rng);
    let point = axis.start;
    let dir = axis.dir;
    let parentIndex = axis.parentIndex;
    let pendingFurcation = axis.furcation;
    let pendingSlot = axis.furcationSlot;
    let lateralAzimuth = rng.uniform(0, 2 * Math.PI);
    let along = 0;
    for (let i = 0; i < plan.length; i++) {
      const node = plan[i];
      const m = o.cylinders_per_internode;
      const cylLength = node.lengthM / m;
      for (let k = 0; k < m; k++) {
        if (!(i === 0 && k === 0)) dir = bendDirection(dir, axis, cylLength, o, rng);
        const end = add(point, scale(dir, cylLength));
        const radiusM = m > 1 ? node.radiusM * (1 - (o.taper_fraction * k) / (m - 1)) : node.radiusM;
        const index = segments.length;
        if (index >= o.max_segments) {
          throw new XylemapError(`the generated tree would have more than ${o.max_segments} segments`, {
            stage: 'simulate',
            option: 'simulate.max_segments',
            hint: 'raise twig_radius_m or lower exponent_a / trunk_base_radius_m, or raise max_segments',
          });
        }
        segments.push({
          segmentId: index,
          parentId: parentIndex,
          branchId: axis.branchId,
          branchOrder: axis.order,
          strahlerOrder: 0,
          start: point,
          end,
          radiusM,
          radiusSeM: 0,
          lengthM: cylLength,
          fitRmseM: 0,
          arcCoverage: 1,
          pointCount: 0,
          reliable: true,
          reliabilityReason: '',
        });
        if (pendingFurcation) {
          pendingFurcation.childSegmentIds[pendingSlot] = index;
          pendingFurcation = null;
        }
        parentIndex = index;
        point = end;
      }
      along += node.lengthM;
      const split = node.split;
      if (!split) {
        tips.push(parentIndex);
        continue;
      }
      const parentSeg = segments[parentIndex];
      const furcation: GeneratedFurcation = {
        parentSegmentId: parentIndex,
        childSegmentIds: new Array(1 + split.lateralRadiiM.length).fill(-1),
        parentEndRadiusM: parentSeg.radiusM,
        childStartRadiiM: [split.leaderRadiusM, ...split.lateralRadiiM],
        exponentA: a,
        heightM: point[2],
        branchOrder: axis.order,
        stemFork: axis.forkAtEnd,
      };
      furcationList.push(furcation);
      pendingFurcation = furcation;
      pendingSlot = 0;
      // Laterals leave at the phyllotaxis azimuth (two laterals sit opposite each other).
      lateralAzimuth += o.phyllotaxis_deg * DEG;
      const t = axis.lengthM > axis.boleM ? Math.min(1, Math.max(0, (along - axis.boleM) / (axis.lengthM - axis.boleM))) : 0;
      const lateralDirs: Vec3[] = [];
      split.lateralRadiiM.forEach((r, j) => {
        const phi = lateralAzimuth + j * Math.PI;
        const theta = axis.forkAtEnd ? 25 * DEG : Math.max(2 * DEG, (o.branch_angle_deg + o.branch_angle_jitter_deg * rng.normal()) * DEG);
        const d = coneDirection(dir, theta, phi);
        lateralDirs.push(d);
        const lengthM = axis.forkAtEnd
          ? o.tree_height_m - o.trunk_fork_height_m
          : axis.lengthM * o.lateral_length_ratio * Math.pow(r / axis.radiusM, o.length_exponent) * (axis.stem ? crownProfile(o.crown_shape, t) : 1);
        stack.push({
          parentIndex,
          start: point,
          dir: d,
          radiusM: r,
          lengthM,
          boleM: axis.forkAtEnd ? Math.max(0, o.crown_base_fraction * o.tree_height_m - o.trunk_fork_height_m) : 0,
          order: axis.order + 1,
          branchId: -1, // numbered when popped, below
          stem: axis.forkAtEnd,
          forkAtEnd: false,
          furcation,
          furcationSlot: j + 1,
        });
      });
      // The leader turns away from its laterals (mean of their horizontal pull, reversed).
      const deflection = axis.forkAtEnd ? 25 * DEG : o.leader_deflection_deg * DEG;
      const pull = normalize(lateralDirs.reduce((s, d) => add(s, d), [0, 0, 0] as Vec3));
      const k = cross(pull, dir);
      if (norm(k) > 1e-9 && deflection > 0) dir = normalize(rotate(dir, normalize(k), deflection));
      if (axis.forkAtEnd) {
        // The main stem goes on above the fork as its own pending axis (same branch and order).
        stack.push({
          parentIndex,
          start: point,
          dir,
          radiusM: split.leaderRadiusM,
          lengthM: o.tree_height_m - o.trunk_fork_height_m,
          boleM: Math.max(0, o.crown_base_fraction * o.tree_height_m - o.trunk_fork_height_m),
          order: axis.order,
          branchId: axis.branchId,
          stem: true,
          forkAtEnd: false,
          furcation,
          furcationSlot: 0,
        });
      }
    }
    // Provisional ids for the new laterals; the final numbering is pre-order (below).
    for (const pending of stack) if (pending.branchId === -1) pending.branchId = nextBranchId++;
  }

  const network: Network = { segments };
  assignStrahler(network);
  renumberBranchesInPreorder(network);
  return { network, furcations: furcationList, tipSegmentIds: tips };
}

interface InternodePlan {
  lengthM: number;
  /** Start radius of the internode. */
  radiusM: number;
  /** The furcation at its end, if any (radii of the children). */
  split: { leaderRadiusM: number; lateralRadiiM: number[] } | null;
}

/**
 * The radii and lengths of an axis's internodes, decided before its geometry so every furcation
 * obeys the exponent rule on the parent's END radius.
 */
function planInternodes(axis: Axis, o: SimulateOptions, rng: Random): InternodePlan[] {
  const a = o.exponent_a;
  const m = o.cylinders_per_internode;
  const taper = m > 1 ? 1 - o.taper_fraction : 1;
  const plan: InternodePlan[] = [];
  let r = axis.radiusM;
  for (let i = 0; i < MAX_INTERNODES_PER_AXIS; i++) {
    const endR = r * taper;
    let split: InternodePlan['split'] = null;
    if (axis.forkAtEnd) {
      // Co-dominant fork: nearly equal stems; the first stays (slightly) the thicker main stem.
      split = { leaderRadiusM: endR * Math.pow(0.52, 1 / a), lateralRadiiM: [endR * Math.pow(0.48, 1 / a)] };
    } else {
      const q = Math.min(0.97, Math.max(0.5 + 1e-6, o.leading_share + o.share_jitter * rng.uniform(-1, 1)));
      const k = rng.next() < o.three_way_fraction ? 2 : 1;
      const lateral = endR * Math.pow((1 - q) / k, 1 / a);
      if (lateral >= o.twig_radius_m) split = { leaderRadiusM: endR * Math.pow(q, 1 / a), lateralRadiiM: new Array(k).fill(lateral) };
    }
    plan.push({ lengthM: 0, radiusM: r, split });
    if (!split || axis.forkAtEnd) break;
    r = split.leaderRadiusM;
  }
  // Lengths: the bole first (trunk), then the rest of the axis evenly with ±20 % jitter, never
  // shorter than two radii (a thick internode shorter than its diameter is not a cylinder).
  const n = plan.length;
  const bole = n > 1 || axis.forkAtEnd ? Math.min(axis.boleM, axis.lengthM) : 0;
  const rest = axis.lengthM - bole;
  const evenCount = bole > 0 ? n - 1 : n;
  plan.forEach((p, i) => {
    const base = bole > 0 && i === 0 ? bole : (evenCount > 0 ? rest / evenCount : rest) * rng.uniform(0.8, 1.2);
    p.lengthM = Math.max(base, 2 * p.radiusM, 0.01);
  });
  return plan;
}

/** Direction of the next cylinder: random bend, then gravitropic turning (laterals) or restoring (stems). */
function bendDirection(dir: Vec3, axis: Axis, lengthM: number, o: SimulateOptions, rng: Random): Vec3 {
  const bend = (axis.stem ? 0.3 : 1) * o.bend_deg * DEG * rng.normal();
  let d = coneDirection(dir, Math.abs(bend), rng.uniform(0, 2 * Math.PI));
  if (axis.stem) {
    // Stems straighten back toward their initial direction (keeps the set lean, common practice, no source).
    d = normalize(add(scale(d, 0.7), scale(axis.dir, 0.3)));
    return d;
  }
  const turn = o.gravitropism_deg_per_m * DEG * lengthM;
  const k = cross(d, UP);
  const kn = norm(k);
  if (kn < 1e-9 || turn === 0) return d;
  const angleToUp = Math.acos(Math.max(-1, Math.min(1, dot(d, UP))));
  // Rotating about d × up by a positive angle turns d toward up. Up-turning stops at vertical;
  // drooping stops at 110° from vertical.
  const step = turn > 0 ? Math.min(turn, angleToUp) : -Math.min(-turn, Math.max(0, 110 * DEG - angleToUp));
  if (step === 0) return d;
  return normalize(rotate(d, scale(k, 1 / kn), step));
}

/** Relative length of a stem's lateral at relative crown height t ∈ [0, 1] (shapes of our own choosing). */
function crownProfile(shape: SimulateOptions['crown_shape'], t: number): number {
  switch (shape) {
    case 'cone':
      return Math.max(0.08, 1 - t);
    case 'ellipsoid':
      return Math.max(0.2, Math.sqrt(Math.max(0, 1 - ((t - 0.4) / 0.75) ** 2)));
    default:
      return 1; // 'cylinder'
  }
}

/** Strahler order (Strahler 1957): tips 1; the highest child order k, + 1 when two or more children share it. */
function assignStrahler(network: Network): void {
  const tree = SegmentTree.fromNetwork(network);
  tree.eachAfter((i) => {
    const kids = tree.children[i];
    if (kids.length === 0) {
      network.segments[i].strahlerOrder = 1;
      return;
    }
    let max = 0;
    let count = 0;
    for (const c of kids) {
      const s = network.segments[c].strahlerOrder;
      if (s > max) {
        max = s;
        count = 1;
      } else if (s === max) count++;
    }
    network.segments[i].strahlerOrder = count >= 2 ? max + 1 : max;
  });
}

/** Branch ids 0, 1, 2 … in pre-order of the segment tree (trunk 0), the project's numbering. */
function renumberBranchesInPreorder(network: Network): void {
  const tree = SegmentTree.fromNetwork(network);
  const map = new Map<number, number>();
  tree.eachBefore((i) => {
    const s = network.segments[i];
    let id = map.get(s.branchId);
    if (id === undefined) {
      id = map.size;
      map.set(s.branchId, id);
    }
    s.branchId = id;
  });
}
