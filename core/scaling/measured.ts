import { parseCsv } from '../io/csv.js';
import { XylemapError } from '../util/errors.js';
import type { FurcationRecord, FurcationSet } from './furcation-set.js';

/**
 * Field measurements of branch diameters at furcations (calliper or tape), one row per branch:
 *
 *   furcation_id, role, diameter_m [, diameter_se_m, order, strahler_order, length_m]
 *
 * - `role` is `parent` (exactly one row per furcation, measured just below the joint) or `child`
 *   (at least two rows, measured just above it);
 * - `diameter_se_m` is the measurement's standard error (default 0);
 * - `order` is the parent's centrifugal branching order, `strahler_order` its Strahler order
 *   (give them on the parent row; default 0);
 * - `length_m` the internode length of that branch (optional, for the WBE length ratio).
 * Radii are diameters / 2.
 */
export const MEASURED_COLUMNS = ['furcation_id', 'role', 'diameter_m', 'diameter_se_m', 'order', 'strahler_order', 'length_m'] as const;

/** True when a CSV header looks like a measured-furcations table (has `role` and `diameter_m`). */
export function isMeasuredFurcationsHeader(header: string[]): boolean {
  return header.includes('role') && header.includes('diameter_m') && header.includes('furcation_id');
}

/**
 * Parse a measured-furcations CSV into a FurcationSet.
 * @param file shown in error messages
 * @throws XylemapError naming the line on any malformed row
 */
export function parseMeasuredFurcations(text: string, file = 'furcations-measured.csv'): FurcationSet {
  const { header, rows } = parseCsv(text);
  if (!isMeasuredFurcationsHeader(header)) {
    throw new XylemapError('not a measured-furcations table: needs columns furcation_id, role, diameter_m', {
      file,
      hint: `columns: ${MEASURED_COLUMNS.join(', ')} (the last four optional)`,
    });
  }
  const col = new Map(header.map((h, i) => [h, i]));
  const radius: number[] = [];
  const se: number[] = [];
  const groups = new Map<number, { parent: number[]; children: number[]; lengths: number[]; parentLength: number; order: number; strahler: number; firstLine: number }>();
  rows.forEach((r, k) => {
    const line = k + 2;
    const cell = (name: string): string => {
      const i = col.get(name);
      return i === undefined ? '' : (r[i] ?? '').trim();
    };
    const num = (name: string, fallback?: number): number => {
      const raw = cell(name);
      if (raw === '') {
        if (fallback !== undefined) return fallback;
        throw new XylemapError(`line ${line}: empty ${name}`, { file, hint: 'every row needs furcation_id, role and diameter_m' });
      }
      const v = Number(raw);
      if (!Number.isFinite(v)) throw new XylemapError(`line ${line}: ${name} is not a finite number ("${raw}")`, { file, hint: 'use plain decimal numbers in metres' });
      return v;
    };
    const id = num('furcation_id');
    const role = cell('role').toLowerCase();
    if (role !== 'parent' && role !== 'child') {
      throw new XylemapError(`line ${line}: role must be parent or child, got "${cell('role')}"`, { file });
    }
    const d = num('diameter_m');
    if (!(d > 0)) throw new XylemapError(`line ${line}: diameter_m must be > 0 m, got ${d}`, { file });
    const dse = num('diameter_se_m', 0);
    if (!(dse >= 0)) throw new XylemapError(`line ${line}: diameter_se_m must be ≥ 0 m, got ${dse}`, { file });
    const length = num('length_m', NaN);
    const g = groups.get(id) ?? { parent: [], children: [], lengths: [], parentLength: NaN, order: 0, strahler: 0, firstLine: line };
    groups.set(id, g);
    const sample = radius.length;
    radius.push(d / 2);
    se.push(dse / 2);
    if (role === 'parent') {
      g.parent.push(sample);
      g.parentLength = length;
      g.order = num('order', 0);
      g.strahler = num('strahler_order', 0);
    } else {
      g.children.push(sample);
      g.lengths.push(length);
    }
  });
  const furcations: FurcationRecord[] = [];
  for (const [id, g] of groups) {
    if (g.parent.length !== 1) {
      throw new XylemapError(`furcation ${id} (from line ${g.firstLine}) has ${g.parent.length} parent rows`, { file, hint: 'give exactly one row with role parent per furcation' });
    }
    if (g.children.length < 2) {
      throw new XylemapError(`furcation ${id} (from line ${g.firstLine}) has ${g.children.length} child row(s)`, { file, hint: 'a furcation needs at least two rows with role child' });
    }
    furcations.push({
      id,
      parentSegmentId: -1,
      childSegmentIds: [],
      parentSamples: g.parent,
      childSamples: g.children.map((c) => [c]),
      parentU: [0],
      childU: g.children.map(() => [0]),
      parentBranchOrder: g.order,
      parentStrahlerOrder: g.strahler,
      parentLengthM: g.parentLength,
      childLengthsM: g.lengths,
      radiusSource: 'measured',
    });
  }
  if (furcations.length === 0) throw new XylemapError('no furcations in the table', { file, hint: 'add rows: furcation_id, role, diameter_m' });
  return { sampleRadiusM: Float64Array.from(radius), sampleSeM: Float64Array.from(se), furcations };
}
