/**
 * The stand table: one row per processed tree with its key figures from summary.json. Rows follow
 * the manifest order, so a merged sharded run gives the same bytes as a single run.
 */
import { formatCsv } from '../io/csv.js';

/** What the batch knows of one finished tree: its manifest row and its summary.json object. */
export interface TreeRecord {
  index: number;
  treeId: string;
  species: string;
  file: string;
  plot: string;
  preset: string;
  /** NaN when not given. */
  fieldDbhM: number;
  summary: unknown;
}

/** A number at a key path of a JSON object, NaN when absent or not a finite number. */
export function numberAt(obj: unknown, path: readonly (string | number)[]): number {
  let v: unknown = obj;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return NaN;
    v = (v as Record<string | number, unknown>)[k];
  }
  return typeof v === 'number' && Number.isFinite(v) ? v : NaN;
}

/** A string at a key path of a JSON object, "" when absent. */
export function stringAt(obj: unknown, path: readonly string[]): string {
  let v: unknown = obj;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return '';
    v = (v as Record<string, unknown>)[k];
  }
  return typeof v === 'string' ? v : '';
}

export interface StandRow {
  treeId: string;
  species: string;
  plot: string;
  preset: string;
  file: string;
  fieldDbhM: number;
  dbhM: number;
  heightM: number;
  woodVolumeM3: number;
  totalLengthM: number;
  segmentCount: number;
  furcationCount: number;
  maxBranchOrder: number;
  reliableFraction: number;
  exponent: number;
  exponentCiLow: number;
  exponentCiHigh: number;
  exponentNUsed: number;
  exponentNExcluded: number;
  treeConductanceKgPerSPerMPa: number;
  conductancePerBasalAreaKgPerSPerMPaPerM2: number;
  leafSpecificConductanceKgPerSPerMPaPerM2: number;
  criticalTranspirationKgPerS: number;
  minWaterPotentialMPa: number;
  safetyMarginMPa: number;
  warningCount: number;
}

/** Key figures of one tree (missing values are NaN). */
export function standRow(t: TreeRecord): StandRow {
  const s = t.summary;
  const warnings = s && typeof s === 'object' ? (s as { warnings?: unknown }).warnings : undefined;
  return {
    treeId: t.treeId,
    species: t.species,
    plot: t.plot,
    // The preset the tree was run with: the manifest's, else what the hydraulics stage reports.
    preset: t.preset || stringAt(s, ['hydraulics', 'preset']),
    file: t.file,
    fieldDbhM: t.fieldDbhM,
    dbhM: numberAt(s, ['tree', 'dbh_m']),
    heightM: numberAt(s, ['tree', 'height_m']),
    woodVolumeM3: numberAt(s, ['tree', 'wood_volume_m3']),
    totalLengthM: numberAt(s, ['tree', 'total_length_m']),
    segmentCount: numberAt(s, ['tree', 'segment_count']),
    furcationCount: numberAt(s, ['tree', 'furcation_count']),
    maxBranchOrder: numberAt(s, ['tree', 'max_branch_order']),
    reliableFraction: numberAt(s, ['reliability', 'reliable_fraction']),
    exponent: numberAt(s, ['scaling', 'exponent', 'estimate']),
    exponentCiLow: numberAt(s, ['scaling', 'exponent', 'ci95', 0]),
    exponentCiHigh: numberAt(s, ['scaling', 'exponent', 'ci95', 1]),
    exponentNUsed: numberAt(s, ['scaling', 'exponent', 'n_used']),
    exponentNExcluded: numberAt(s, ['scaling', 'exponent', 'n_excluded']),
    treeConductanceKgPerSPerMPa: numberAt(s, ['hydraulics', 'tree_conductance_kg_s_mpa']),
    conductancePerBasalAreaKgPerSPerMPaPerM2: numberAt(s, ['hydraulics', 'conductance_per_basal_area_kg_s_mpa_m2']),
    leafSpecificConductanceKgPerSPerMPaPerM2: numberAt(s, ['hydraulics', 'leaf_specific_conductance_kg_s_mpa_m2']),
    criticalTranspirationKgPerS: numberAt(s, ['hydraulics', 'critical_transpiration_kg_s']),
    minWaterPotentialMPa: numberAt(s, ['hydraulics', 'min_water_potential_mpa']),
    safetyMarginMPa: numberAt(s, ['hydraulics', 'safety_margin_mpa']),
    warningCount: Array.isArray(warnings) ? warnings.length : 0,
  };
}

export const STAND_COLUMNS = [
  'tree_id',
  'species',
  'plot',
  'preset',
  'file',
  'field_dbh_m',
  'dbh_m',
  'height_m',
  'wood_volume_m3',
  'total_length_m',
  'segment_count',
  'furcation_count',
  'max_branch_order',
  'reliable_fraction',
  'exponent',
  'exponent_ci95_low',
  'exponent_ci95_high',
  'exponent_n_used',
  'exponent_n_excluded',
  'tree_conductance_kg_s_mpa',
  'conductance_per_basal_area_kg_s_mpa_m2',
  'leaf_specific_conductance_kg_s_mpa_m2',
  'critical_transpiration_kg_s',
  'min_water_potential_mpa',
  'safety_margin_mpa',
  'warning_count',
] as const;

/** A number for a CSV cell: empty when missing (NaN), else the shortest round-trip decimal. */
export function cellNumber(v: number): string {
  return Number.isFinite(v) ? String(v) : '';
}

/** Sort records into manifest order (the order every table and statistic uses). */
export function inManifestOrder<T extends { index: number; treeId: string }>(records: readonly T[]): T[] {
  return records.slice().sort((a, b) => a.index - b.index || (a.treeId < b.treeId ? -1 : a.treeId > b.treeId ? 1 : 0));
}

/** stand.csv text, rows in manifest order. */
export function formatStandCsv(records: readonly TreeRecord[]): string {
  const rows = inManifestOrder(records).map(standRow).map((r) => [
    r.treeId,
    r.species,
    r.plot,
    r.preset,
    r.file,
    cellNumber(r.fieldDbhM),
    cellNumber(r.dbhM),
    cellNumber(r.heightM),
    cellNumber(r.woodVolumeM3),
    cellNumber(r.totalLengthM),
    cellNumber(r.segmentCount),
    cellNumber(r.furcationCount),
    cellNumber(r.maxBranchOrder),
    cellNumber(r.reliableFraction),
    cellNumber(r.exponent),
    cellNumber(r.exponentCiLow),
    cellNumber(r.exponentCiHigh),
    cellNumber(r.exponentNUsed),
    cellNumber(r.exponentNExcluded),
    cellNumber(r.treeConductanceKgPerSPerMPa),
    cellNumber(r.conductancePerBasalAreaKgPerSPerMPaPerM2),
    cellNumber(r.leafSpecificConductanceKgPerSPerMPaPerM2),
    cellNumber(r.criticalTranspirationKgPerS),
    cellNumber(r.minWaterPotentialMPa),
    cellNumber(r.safetyMarginMPa),
    String(r.warningCount),
  ]);
  return formatCsv([...STAND_COLUMNS], rows);
}
