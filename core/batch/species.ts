/**
 * Species comparison across trees: the area-preservation exponent per species (mean, sd, Student
 * t-interval of the mean), pairwise differences (seeded permutation test and percentile bootstrap
 * interval), mean WBE quantities, and the power law of tree conductance against DBH, per species
 * and pooled.
 */
import { formatCsv } from '../io/csv.js';
import type { BatchOptionValues } from './options.js';
import { fitPowerLaw, type PowerLawFit } from './power-law.js';
import { fnv1a32 } from './shard.js';
import { cellNumber, inManifestOrder, numberAt, standRow, type TreeRecord } from './stand.js';
import { bootstrapMeanDifference, mean, permutationTest, tInterval } from './stats.js';

export type SpeciesStatsOptions = Pick<
  BatchOptionValues,
  'confidence' | 'permutation_replicates' | 'bootstrap_replicates' | 'seed' | 'min_trees_per_fit' | 'fit_dbh_source'
>;

export interface SpeciesBlock {
  species: string;
  tree_count: number;
  exponent: { n: number; mean: number | null; sd: number | null; ci: [number | null, number | null]; interval: 't' };
  /** Mean over trees of each numeric WBE quantity in summary.scaling.wbe (flattened keys). */
  wbe: Record<string, number | null>;
  /** K = c·DBH^d; null when too few trees (see min_trees_per_fit). */
  conductance_fit: ConductanceFitJson | null;
}

export interface ConductanceFitJson {
  n: number;
  c: number;
  c_ci: [number, number];
  d: number;
  d_ci: [number, number];
  r_squared: number | null;
  log_residual_sd: number | null;
  dbh_min_m: number;
  dbh_max_m: number;
  dbh_source: string;
}

export interface SpeciesPair {
  species_a: string;
  species_b: string;
  n_a: number;
  n_b: number;
  /** mean exponent of a minus mean exponent of b. */
  exponent_difference: number | null;
  p_value_permutation: number | null;
  ci_bootstrap: [number | null, number | null];
}

export interface SpeciesComparison {
  schema: 'xylemap.species/1';
  confidence: number;
  methods: Record<string, string | number>;
  species: SpeciesBlock[];
  pooled: SpeciesBlock;
  pairwise: SpeciesPair[];
}

/** The fits used for upscaling, recovered alongside the JSON (with their data for the bootstrap). */
export interface ConductanceFits {
  bySpecies: Map<string, PowerLawFit>;
  pooled: PowerLawFit | undefined;
  /** Per species (and "" for pooled) the (DBH, K) pairs the fit used. */
  data: Map<string, { dbhM: number[]; conductance: number[] }>;
}

const nul = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** DBH of a tree for the K–DBH fit, per the `fit_dbh_source` rule. */
export function fitDbh(t: TreeRecord, source: SpeciesStatsOptions['fit_dbh_source']): number {
  const scan = numberAt(t.summary, ['tree', 'dbh_m']);
  if (source === 'scan') return scan;
  if (source === 'field') return t.fieldDbhM;
  return Number.isFinite(t.fieldDbhM) ? t.fieldDbhM : scan;
}

/**
 * Numeric leaves of summary.scaling.wbe, one level of nesting flattened with "_" (arrays such as
 * by_order skipped); the tree-level `pooled` block keeps its own key names (radius_ratio_beta …).
 */
export function wbeQuantities(summary: unknown): Record<string, number> {
  const out: Record<string, number> = {};
  const wbe = summary && typeof summary === 'object' ? (summary as { scaling?: { wbe?: unknown } }).scaling?.wbe : undefined;
  if (!wbe || typeof wbe !== 'object' || Array.isArray(wbe)) return out;
  for (const [k, v] of Object.entries(wbe as Record<string, unknown>)) {
    if (typeof v === 'number' && Number.isFinite(v)) out[k] = v;
    else if (v && typeof v === 'object' && !Array.isArray(v)) {
      for (const [k2, v2] of Object.entries(v as Record<string, unknown>)) {
        if (typeof v2 === 'number' && Number.isFinite(v2)) out[k === 'pooled' ? k2 : `${k}_${k2}`] = v2;
      }
    }
  }
  return out;
}

function fitJson(fit: PowerLawFit | undefined, source: string): ConductanceFitJson | null {
  if (!fit) return null;
  return {
    n: fit.n,
    c: fit.c,
    c_ci: fit.cCi95,
    d: fit.d,
    d_ci: fit.dCi95,
    r_squared: nul(fit.rSquared),
    log_residual_sd: nul(fit.logResidualSd),
    dbh_min_m: fit.dbhMinM,
    dbh_max_m: fit.dbhMaxM,
    dbh_source: source,
  };
}

function fitData(trees: readonly TreeRecord[], source: SpeciesStatsOptions['fit_dbh_source']): { dbhM: number[]; conductance: number[] } {
  const dbhM: number[] = [];
  const conductance: number[] = [];
  for (const t of trees) {
    const d = fitDbh(t, source);
    const k = numberAt(t.summary, ['hydraulics', 'tree_conductance_kg_s_mpa']);
    if (d > 0 && k > 0) {
      dbhM.push(d);
      conductance.push(k);
    }
  }
  return { dbhM, conductance };
}

function block(
  name: string,
  trees: readonly TreeRecord[],
  wbeKeys: readonly string[],
  fit: PowerLawFit | undefined,
  o: SpeciesStatsOptions,
): SpeciesBlock {
  const exps = trees.map((t) => standRow(t).exponent).filter((v) => Number.isFinite(v));
  const ti = tInterval(exps, o.confidence);
  const wbe: Record<string, number | null> = {};
  for (const key of wbeKeys) {
    const vals = trees.map((t) => wbeQuantities(t.summary)[key]).filter((v): v is number => v !== undefined);
    wbe[key] = nul(mean(vals));
  }
  return {
    species: name,
    tree_count: trees.length,
    exponent: { n: ti.n, mean: nul(ti.mean), sd: nul(ti.sd), ci: [nul(ti.ci[0]), nul(ti.ci[1])], interval: 't' },
    wbe,
    conductance_fit: fitJson(fit, o.fit_dbh_source),
  };
}

/** Species names in a stable order (code-unit order, independent of locale). */
export function speciesNames(trees: readonly TreeRecord[]): string[] {
  return [...new Set(trees.map((t) => t.species))].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
}

/**
 * Compare species. Trees are taken in manifest order, so the result depends only on the set of
 * trees, not on how they were sharded.
 */
export function compareSpecies(
  records: readonly TreeRecord[],
  o: SpeciesStatsOptions,
): { comparison: SpeciesComparison; fits: ConductanceFits } {
  const trees = inManifestOrder(records);
  const names = speciesNames(trees);
  const wbeKeys = [...new Set(trees.flatMap((t) => Object.keys(wbeQuantities(t.summary))))].sort();
  const bySpecies = new Map<string, PowerLawFit>();
  const data = new Map<string, { dbhM: number[]; conductance: number[] }>();
  const blocks: SpeciesBlock[] = [];
  for (const name of names) {
    const group = trees.filter((t) => t.species === name);
    const d = fitData(group, o.fit_dbh_source);
    const fit = d.dbhM.length >= o.min_trees_per_fit ? fitPowerLaw(d.dbhM, d.conductance, o.confidence) : undefined;
    if (fit) {
      bySpecies.set(name, fit);
      data.set(name, d);
    }
    blocks.push(block(name, group, wbeKeys, fit, o));
  }
  const pooledData = fitData(trees, o.fit_dbh_source);
  const pooledFit = pooledData.dbhM.length >= 3 ? fitPowerLaw(pooledData.dbhM, pooledData.conductance, o.confidence) : undefined;
  if (pooledFit) data.set('', pooledData);
  const pairwise: SpeciesPair[] = [];
  for (let i = 0; i < names.length; i++) {
    for (let j = i + 1; j < names.length; j++) {
      const a = trees.filter((t) => t.species === names[i]).map((t) => standRow(t).exponent).filter(Number.isFinite);
      const b = trees.filter((t) => t.species === names[j]).map((t) => standRow(t).exponent).filter(Number.isFinite);
      // A seed per pair from the names, so adding a species does not change the other pairs' numbers.
      const seed = (o.seed ^ fnv1a32(`${names[i]}\u0000${names[j]}`)) >>> 0;
      const ci = bootstrapMeanDifference(a, b, o.bootstrap_replicates, o.confidence, seed);
      pairwise.push({
        species_a: names[i],
        species_b: names[j],
        n_a: a.length,
        n_b: b.length,
        exponent_difference: nul(mean(a) - mean(b)),
        p_value_permutation: nul(permutationTest(a, b, o.permutation_replicates, seed)),
        ci_bootstrap: [nul(ci[0]), nul(ci[1])],
      });
    }
  }
  return {
    comparison: {
      schema: 'xylemap.species/1',
      confidence: o.confidence,
      methods: {
        exponent_interval: 'Student t-interval of the mean of per-tree exponents (n - 1 degrees of freedom)',
        pairwise_test: 'two-sided permutation test of the difference of mean exponents, p = (1 + hits) / (1 + replicates)',
        pairwise_interval: 'percentile bootstrap of the difference of mean exponents, each species resampled with replacement',
        conductance_fit: 'K = c * DBH^d by least squares on ln K vs ln DBH; t-intervals of ln c and d (n - 2 df), c interval = exp of ln c interval',
        permutation_replicates: o.permutation_replicates,
        bootstrap_replicates: o.bootstrap_replicates,
        seed: o.seed,
        min_trees_per_fit: o.min_trees_per_fit,
        fit_dbh_source: o.fit_dbh_source,
      },
      species: blocks,
      pooled: block('pooled', trees, wbeKeys, pooledFit, o),
      pairwise,
    },
    fits: { bySpecies, pooled: pooledFit, data },
  };
}

/** species.csv: one row per species, then a "pooled" row. */
export function formatSpeciesCsv(c: SpeciesComparison): string {
  const wbeKeys = Object.keys(c.pooled.wbe);
  const level = Math.round(c.confidence * 100);
  const header = [
    'species',
    'tree_count',
    'exponent_n',
    'exponent_mean',
    'exponent_sd',
    `exponent_ci${level}_low`,
    `exponent_ci${level}_high`,
    ...wbeKeys.map((k) => `wbe_${k}_mean`),
    'k_fit_n',
    'k_c',
    `k_c_ci${level}_low`,
    `k_c_ci${level}_high`,
    'k_d',
    `k_d_ci${level}_low`,
    `k_d_ci${level}_high`,
    'k_r_squared',
    'k_dbh_min_m',
    'k_dbh_max_m',
  ];
  const n = (v: number | null | undefined): string => (v === null || v === undefined ? '' : cellNumber(v));
  const row = (b: SpeciesBlock): string[] => {
    const f = b.conductance_fit;
    return [
      b.species,
      String(b.tree_count),
      String(b.exponent.n),
      n(b.exponent.mean),
      n(b.exponent.sd),
      n(b.exponent.ci[0]),
      n(b.exponent.ci[1]),
      ...wbeKeys.map((k) => n(b.wbe[k])),
      f ? String(f.n) : '0',
      n(f?.c),
      n(f?.c_ci[0]),
      n(f?.c_ci[1]),
      n(f?.d),
      n(f?.d_ci[0]),
      n(f?.d_ci[1]),
      n(f?.r_squared),
      n(f?.dbh_min_m),
      n(f?.dbh_max_m),
    ];
  };
  return formatCsv(header, [...c.species.map(row), row(c.pooled)]);
}

/** species-pairs.csv: one row per pair of species. */
export function formatSpeciesPairsCsv(c: SpeciesComparison): string {
  const level = Math.round(c.confidence * 100);
  const n = (v: number | null): string => (v === null ? '' : cellNumber(v));
  return formatCsv(
    ['species_a', 'species_b', 'n_a', 'n_b', 'exponent_difference', 'p_value_permutation', `ci${level}_bootstrap_low`, `ci${level}_bootstrap_high`],
    c.pairwise.map((p) => [
      p.species_a,
      p.species_b,
      String(p.n_a),
      String(p.n_b),
      n(p.exponent_difference),
      n(p.p_value_permutation),
      n(p.ci_bootstrap[0]),
      n(p.ci_bootstrap[1]),
    ]),
  );
}
