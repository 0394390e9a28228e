import type { Network } from '../types/network.js';
import { annotateNetwork, type AnnotatedNetwork } from '../topology/annotate.js';
import { XylemapError } from '../util/errors.js';
import {
  evaluateFurcations,
  exponentIntervals,
  medianValue,
  pooledExponent,
  streamRandom,
  type EvaluatedFurcation,
} from './estimate.js';
import { collectFurcations, type FurcationSet } from './furcation-set.js';
import { scalingOptions, type ScalingOptionValues } from './options.js';
import type { FurcationStatus } from './solve.js';
import { finiteOrNull } from './stats.js';
import { analyseTaper, type BranchTaperRow, type TaperSummary } from './taper.js';
import { theoryTable, theoryValues, type TheoryRow } from './theory.js';
import { trendTest, type TrendTest } from './trend.js';
import { wbeRatios, wbeWithInterval, type WbeRatios } from './wbe.js';

/** Statuses that enter the median as censored values when option unsolvable = censored. */
const CENSORED = new Set<string>(['children_thinner', 'child_thicker', 'above_range']);

export const EXCLUSION_REASONS = ['unreliable_segments', 'below_min_radius', 'children_thinner', 'child_thicker', 'above_range'] as const;
export type ExclusionReason = (typeof EXCLUSION_REASONS)[number];

export interface ExponentBlock {
  /** Median of the per-furcation exponents over used furcations. */
  estimate: number | null;
  ci95: [number | null, number | null];
  confidence: number;
  method: string;
  /** Huber M-estimate over the same furcations. */
  huber: number | null;
  n_furcations: number;
  n_used: number;
  /** Used furcations with a root in (1, exponent_max]. */
  n_solved: number;
  n_excluded: number;
  excluded_by_reason: Record<ExclusionReason, number>;
  /** Used furcations without a root in range, entering the median as censored values (option unsolvable = censored). */
  censored_by_reason: { children_thinner: number; child_thicker: number; above_range: number };
  /** Used furcations whose radii fell back to joint-adjacent segments. */
  n_radius_from_adjacent: number;
  /** Share of the observed between-furcation deviations kept in the bootstrap part of the interval. */
  spread_shrink: number | null;
  /** Typical SD of one furcation's exponent from radius errors (delta method). */
  measurement_sd: number | null;
  /** Robust SD of the solved exponents across furcations. */
  observed_sd: number | null;
}

export interface ByOrderRow {
  grouping: 'branch_order' | 'strahler_order' | 'parent_radius_class';
  group: string;
  n_used: number;
  n_excluded: number;
  estimate: number | null;
  ci95: [number | null, number | null];
  pooled: number | null;
}

export interface ScalingSummary {
  exponent: ExponentBlock;
  pooled: { estimate: number | null; ci95: [number | null, number | null]; n_used: number; method: string };
  by_order: ByOrderRow[];
  trend: TrendTest[];
  theory: TheoryRow[];
  wbe: { pooled: ReturnType<typeof wbeWithInterval>; by_order: (WbeRatios & { branch_order: number })[] };
  taper: TaperSummary | null;
  radius_rule: string;
  options: ScalingOptionValues;
  /** Plain-language cautions (merged into summary.json `warnings` with a "scaling: " prefix). */
  warnings: string[];
}

/** One row of furcations.csv. */
export interface FurcationRow {
  furcation_id: number;
  parent_segment_id: number;
  child_segment_ids: string;
  n_children: number;
  parent_branch_order: number;
  parent_strahler_order: number;
  parent_radius_m: number;
  parent_radius_se_m: number;
  child_radii_m: string;
  child_radii_se_m: string;
  exponent: number;
  status: FurcationStatus;
  /** Inverse delta-method variance normalised over solved furcations (equal when SEs are 0); 0 when censored or excluded. */
  weight: number;
  radius_source: string;
}

export interface ScalingResult {
  summary: ScalingSummary;
  furcationRows: FurcationRow[];
  branchTaperRows: BranchTaperRow[];
}

export const RADIUS_RULE =
  'parent: median radius of the first k reliable segments of the internode below the furcation, skipping the j nearest the joint; children: the same above it (k = radius_window_segments, j = joint_skip_segments); joint-adjacent segments only when nothing else is reliable';

/**
 * Branching-exponent, WBE and taper statistics of a network: the `scaling` block of summary.json
 * plus the rows of furcations.csv.
 *
 * @param network segments with parent links; branch ids/orders are (re)computed by annotateNetwork
 * @param options scaling options (partial; validated, defaults filled)
 * @example const { summary } = analyseScaling(parseSegmentsCsv(text), { seed: 7 });
 */
export function analyseScaling(network: Network | AnnotatedNetwork, options?: Partial<ScalingOptionValues>): ScalingResult {
  const opts = scalingOptions.resolve(options ?? {});
  const ann = 'mainChild' in network && 'tree' in network ? (network as AnnotatedNetwork) : annotateNetwork(network);
  const set = collectFurcations(ann, opts);
  const taper = analyseTaper(ann, opts.min_taper_segments, opts.bootstrap_replicates, opts.confidence, streamRandom(opts.seed, 9));
  return analyseFurcationSet(set, opts, { taper: taper.summary, branchTaperRows: taper.branchRows, radiusRule: RADIUS_RULE });
}

/**
 * The statistics on prepared furcations (from a network or from field measurements).
 * @param extra taper results and the radius rule text, when the source has them
 */
export function analyseFurcationSet(
  set: FurcationSet,
  opts: ScalingOptionValues,
  extra: { taper: TaperSummary | null; branchTaperRows: BranchTaperRow[]; radiusRule: string },
): ScalingResult {
  const edges = parseEdges(opts.radius_class_edges_m);
  const evaluated = evaluateFurcations(set, opts.min_radius_m, opts.exponent_max);
  const censoredOk = opts.unsolvable === 'censored';
  const used = evaluated.filter((f) => f.status === 'solved' || (censoredOk && CENSORED.has(f.status)));
  const solved = used.filter((f) => f.status === 'solved');
  const B = opts.bootstrap_replicates;
  const conf = opts.confidence;
  const maxA = opts.exponent_max;

  type Grouping = { name: ByOrderRow['grouping']; key: (f: EvaluatedFurcation) => string | null };
  const groupings: Grouping[] = [
    { name: 'branch_order', key: (f) => String(f.record.parentBranchOrder) },
    { name: 'strahler_order', key: (f) => String(f.record.parentStrahlerOrder) },
    { name: 'parent_radius_class', key: (f) => radiusClass(f.parentRadiusM, edges) },
  ];
  const keyLists = groupings.map((g) => {
    const keys = [...new Set(evaluated.map(g.key).filter((k): k is string => k !== null))];
    return keys.sort((x, y) => sortKey(x) - sortKey(y));
  });
  const labels = groupings.map((g, gi) => ({ labels: Int32Array.from(used, (f) => keyLists[gi].indexOf(g.key(f)!)), count: keyLists[gi].length }));
  const main = exponentIntervals(set, used, B, conf, maxA, streamRandom(opts.seed, 0), true, labels, opts.monte_carlo_draws);

  const excluded = Object.fromEntries(EXCLUSION_REASONS.map((r) => [r, 0])) as Record<ExclusionReason, number>;
  const censored = { children_thinner: 0, child_thicker: 0, above_range: 0 };
  const usedSet = new Set(used);
  for (const f of evaluated) {
    if (!usedSet.has(f)) excluded[f.status as ExclusionReason]++;
    else if (f.status !== 'solved') censored[f.status as keyof typeof censored]++;
  }

  const byOrder: ByOrderRow[] = [];
  groupings.forEach((g, gi) => {
    keyLists[gi].forEach((k, li) => {
      const all = evaluated.filter((f) => g.key(f) === k);
      const members = used.filter((f) => g.key(f) === k);
      const logRatios = members.filter((f) => f.status === 'solved').map((f) => Float64Array.from(f.childRadiiM, (r) => Math.log(r / f.parentRadiusM)));
      const part = main.groups[gi][li];
      byOrder.push({
        grouping: g.name,
        group: k,
        n_used: members.length,
        n_excluded: all.length - members.length,
        estimate: finiteOrNull(part.estimate),
        ci95: part.ci,
        pooled: finiteOrNull(pooledExponent(logRatios, maxA, part.estimate)),
      });
    });
  });

  const trend = [
    // Rank-based, so censored values (+∞) take part as the largest ranks.
    trendTest('branch_order', used.map((f) => f.record.parentBranchOrder), used.map(medianValue), opts.permutations, streamRandom(opts.seed, 5)),
    trendTest('strahler_order', used.map((f) => f.record.parentStrahlerOrder), used.map(medianValue), opts.permutations, streamRandom(opts.seed, 6)),
    trendTest('log_parent_radius', used.map((f) => Math.log(f.parentRadiusM)), used.map(medianValue), opts.permutations, streamRandom(opts.seed, 7)),
  ];

  // WBE ratios need radii only, so every furcation with radii (not pre-excluded, above min radius) counts.
  const withRadii = evaluated.filter((f) => f.status !== 'unreliable_segments' && f.status !== 'below_min_radius');
  const orders = [...new Set(withRadii.map((f) => f.record.parentBranchOrder))].sort((a, b) => a - b);
  const wbe = {
    pooled: wbeWithInterval(withRadii, B, conf, streamRandom(opts.seed, 8)),
    by_order: orders.map((o) => ({ branch_order: o, ...wbeRatios(withRadii.filter((f) => f.record.parentBranchOrder === o)) })),
  };

  const summary: ScalingSummary = {
    exponent: {
      estimate: finiteOrNull(main.estimate),
      ci95: main.ci,
      confidence: conf,
      method: `median over furcations${censoredOk ? ' (unsolvable ones censored: +∞ or their root ≤ 1)' : ''}; interval: bootstrap over furcations (deviations shrunk by spread_shrink) plus Monte Carlo radius errors`,
      huber: finiteOrNull(main.huber),
      n_furcations: evaluated.length,
      n_used: used.length,
      n_solved: solved.length,
      n_excluded: evaluated.length - used.length,
      excluded_by_reason: excluded,
      censored_by_reason: censored,
      n_radius_from_adjacent: used.filter((f) => f.record.radiusSource === 'adjacent').length,
      spread_shrink: finiteOrNull(main.spreadShrink),
      measurement_sd: finiteOrNull(main.measurementSd),
      observed_sd: finiteOrNull(main.observedSd),
    },
    pooled: {
      estimate: finiteOrNull(main.pooled),
      ci95: main.pooledCi,
      n_used: solved.length,
      method: 'least squares: minimise Σ_f (Σ_i (r_i/r_0)^a − 1)²; interval as for the median',
    },
    by_order: byOrder,
    trend,
    theory: theoryTable(theoryValues(opts.hydraulic_exponent_m, opts.metabolic_exponent_n), main.estimate, main.ci, main.pooledCi),
    wbe,
    taper: extra.taper,
    radius_rule: extra.radiusRule,
    options: opts,
    warnings: scalingWarnings(evaluated.length, used.length, censored.children_thinner + censored.child_thicker + censored.above_range + excluded.children_thinner + excluded.child_thicker + excluded.above_range, used.filter((f) => f.record.radiusSource === 'adjacent').length),
  };
  return { summary, furcationRows: furcationRows(evaluated), branchTaperRows: extra.branchTaperRows };
}

/** Cautions a reader should see next to the estimate (thresholds: common practice, no source). */
function scalingWarnings(total: number, used: number, unsolvable: number, adjacent: number): string[] {
  const w: string[] = [];
  if (total === 0) w.push('the network has no furcations; no exponent can be estimated');
  else if (used === 0) w.push('no furcation could be used; see excluded_by_reason');
  else if (used < 10) w.push(`only ${used} furcations used; the interval rests on few values`);
  if (total > 0 && unsolvable / total > 0.2) {
    w.push(`${unsolvable} of ${total} furcations have no exponent above 1 (children too thin or a child too thick); radii of thin branches may be biased`);
  }
  if (adjacent > 0) w.push(`${adjacent} used furcations took radii from joint-adjacent segments (nothing else reliable)`);
  return w;
}

function furcationRows(evaluated: EvaluatedFurcation[]): FurcationRow[] {
  const used = evaluated.filter((f) => f.status === 'solved');
  const inv = used.map((f) => (f.exponentVariance > 0 ? 1 / f.exponentVariance : NaN));
  const allFinite = inv.length > 0 && inv.every((w) => Number.isFinite(w));
  const total = allFinite ? inv.reduce((a, b) => a + b, 0) : used.length;
  const weightOf = new Map<EvaluatedFurcation, number>();
  used.forEach((f, k) => weightOf.set(f, allFinite ? inv[k] / total : 1 / total));
  const join = (v: number[]) => v.join(';');
  return evaluated.map((f) => ({
    furcation_id: f.record.id,
    parent_segment_id: f.record.parentSegmentId,
    child_segment_ids: join(f.record.childSegmentIds),
    n_children: f.record.childSamples.length,
    parent_branch_order: f.record.parentBranchOrder,
    parent_strahler_order: f.record.parentStrahlerOrder,
    parent_radius_m: f.parentRadiusM,
    parent_radius_se_m: f.parentSeM,
    child_radii_m: join(f.childRadiiM),
    child_radii_se_m: join(f.childSeM),
    exponent: f.exponent,
    status: f.status,
    weight: weightOf.get(f) ?? 0,
    radius_source: f.record.radiusSource,
  }));
}

/** Parse "0.01,0.025" into increasing positive edges. */
export function parseEdges(text: string): number[] {
  const edges = text.trim() === '' ? [] : text.split(',').map((s) => Number(s.trim()));
  for (let i = 0; i < edges.length; i++) {
    if (!(edges[i] > 0) || (i > 0 && !(edges[i] > edges[i - 1]))) {
      throw new XylemapError(`radius class edges must be increasing numbers > 0 m, got "${text}"`, {
        stage: 'scaling',
        option: 'scaling.radius_class_edges_m',
        hint: 'write them like 0.01,0.025,0.05,0.1',
      });
    }
  }
  return edges;
}

/** Class label of a radius, "lo-hi" in m ("<lo" / ">=hi" at the ends); null for NaN. */
export function radiusClass(radiusM: number, edges: number[]): string | null {
  if (!Number.isFinite(radiusM)) return null;
  if (edges.length === 0) return 'all';
  if (radiusM < edges[0]) return `<${edges[0]}`;
  for (let i = 1; i < edges.length; i++) if (radiusM < edges[i]) return `${edges[i - 1]}-${edges[i]}`;
  return `>=${edges[edges.length - 1]}`;
}

/** Numeric sort key for group labels: the first number in the label ("<" classes first). */
function sortKey(label: string): number {
  if (label.startsWith('<')) return -Infinity;
  const v = parseFloat(label.replace(/^>=/, ''));
  return Number.isFinite(v) ? v : Infinity;
}

/**
 * The same statistics on field-measured furcation diameters (see measured.ts for the table);
 * there is no network, so no taper block.
 */
export function analyseMeasuredFurcations(set: FurcationSet, options?: Partial<ScalingOptionValues>): ScalingResult {
  const opts = scalingOptions.resolve(options ?? {});
  return analyseFurcationSet(set, opts, { taper: null, branchTaperRows: [], radiusRule: 'measured: radius = diameter_m / 2 as given, SE = diameter_se_m / 2' });
}
