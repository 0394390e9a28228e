import { formatCsv } from '../io/csv.js';
import type { FurcationRow } from './analyse.js';

/** Column order of furcations.csv (one row per furcation; lists within a cell separated by ';'). */
export const FURCATION_COLUMNS: (keyof FurcationRow)[] = [
  'furcation_id',
  'parent_segment_id',
  'child_segment_ids',
  'n_children',
  'parent_branch_order',
  'parent_strahler_order',
  'parent_radius_m',
  'parent_radius_se_m',
  'child_radii_m',
  'child_radii_se_m',
  'exponent',
  'status',
  'weight',
  'radius_source',
];

/** furcations.csv text; NaN cells (no radius, no root) are written empty. */
export function formatFurcationsCsv(rows: FurcationRow[]): string {
  return formatCsv(
    FURCATION_COLUMNS as string[],
    rows.map((r) => FURCATION_COLUMNS.map((c) => {
      const v = r[c];
      return typeof v === 'number' && Number.isNaN(v) ? '' : v;
    })),
  );
}
