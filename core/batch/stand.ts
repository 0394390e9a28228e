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
  segmentCount: number;
  exponent: number;
  exponentCiLow: number;
  exponentCiHigh: number;
  exponentNUsed: number;
  exponentNExcluded: number;
  treeConductanceKgPerSPerMPa: number;
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
    preset: t.preset,
    file: t.file,
    fieldDbhM: t.fieldDbhM,
    dbhM: numberAt(s, ['tree', 'dbh_m']),
    heightM: numberAt(s, ['tree', 'height_m']),
    woodVolumeM3: numberAt(s, ['tree', 'wood_volume_m3']),
    segmentCount: numberAt(s, ['tree', 'segment_count']),
    exponent: numberAt(s, ['scaling', 'exponent', 'estimate']),
    exponentCiLow: numberAt(s, ['scaling', 'exponent', 'ci95', 0]),
    exponentCiHigh: numberAt(s, ['scaling', 'exponent', 'ci95', 1]),
    exponentNUsed: numberAt(s, ['scaling', 'exponent', 'n_used']),
    exponentNExcluded: numberAt(s, ['scaling', 'exponent', 'n_excluded']),
    treeConductanceKgPerSPerMPa: numberAt(s, ['hydraulics', 'tree_conductance_kg_s_mpa']),
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
  'segment_count',
  'exponent',
  'exponent_ci95_low',
  'exponent_ci95_high',
  'exponent_n_used',
  'exponent_n_excluded',
  'tree_conductance_kg_s_mpa',
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
    cellNumber(r.segmentCount),
    cellNumber(r.exponent),
    cellNumber(r.exponentCiLow),
    cellNumber(r.exponentCiHigh),
    cellNumber(r.exponentNUsed),
    cellNumber(r.exponentNExcluded),
    cellNumber(r.treeConductanceKgPerSPerMPa),
    cellNumber(r.minWaterPotentialMPa),
    cellNumber(r.safetyMarginMPa),
    String(r.warningCount),
  ]);
  return formatCsv([...STAND_COLUMNS], rows);
}
