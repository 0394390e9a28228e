import { XylemapError } from '../util/errors.js';
import type { Network, Segment } from '../types/network.js';
import { formatCsv, parseCsv } from './csv.js';
import { segmentFromFields } from './segment-fields.js';

/**
 * segments.csv: one row per fitted cylinder, the format reconstruction writes, the scan lab writes
 * for its truth, and scaling/hydraulics read back. Coordinates in the input file's own frame;
 * lengths in metres. Columns after the required ones are kept as `extra`.
 */
export const SEGMENT_COLUMNS = [
  'segment_id',
  'parent_id',
  'branch_id',
  'branch_order',
  'strahler_order',
  'start_x',
  'start_y',
  'start_z',
  'end_x',
  'end_y',
  'end_z',
  'radius_m',
  'radius_se_m',
  'length_m',
  'fit_rmse_m',
  'arc_coverage',
  'point_count',
  'reliable',
  'reliability_reason',
  'radius_fit_m',
  'radius_correction',
] as const;

/** An unknown uncertainty is written as Inf (formatNumber) and must read back as such. */
const NON_FINITE_ALLOWED = new Set(['radius_se_m']);

function parseNumber(raw: string): number {
  if (raw === 'Inf') return Infinity;
  if (raw === '-Inf') return -Infinity;
  return Number(raw);
}

/** Columns a file must have; the rest default (se 0, coverage 1, reliable true …). */
const REQUIRED = ['segment_id', 'parent_id', 'start_x', 'start_y', 'start_z', 'end_x', 'end_y', 'end_z', 'radius_m'];

export function formatSegmentsCsv(network: Network | Segment[]): string {
  const segments = Array.isArray(network) ? network : network.segments;
  const extraKeys: string[] = [];
  for (const s of segments) for (const k of Object.keys(s.extra ?? {})) if (!extraKeys.includes(k)) extraKeys.push(k);
  const header = [...SEGMENT_COLUMNS, ...extraKeys];
  const rows = segments.map((s) => [
    s.segmentId,
    s.parentId,
    s.branchId,
    s.branchOrder,
    s.strahlerOrder,
    ...s.start,
    ...s.end,
    s.radiusM,
    s.radiusSeM,
    s.lengthM,
    s.fitRmseM,
    s.arcCoverage,
    s.pointCount,
    s.reliable ? 'true' : 'false',
    s.reliabilityReason,
    s.radiusFitM ?? s.radiusM,
    s.radiusCorrection ?? '',
    ...extraKeys.map((k) => s.extra?.[k] ?? ''),
  ]);
  return formatCsv(header, rows);
}

export function parseSegmentsCsv(text: string, file = 'segments.csv'): Network {
  const { header, rows } = parseCsv(text);
  const missing = REQUIRED.filter((c) => !header.includes(c));
  if (missing.length > 0) {
    throw new XylemapError(`not a segments table: missing column(s) ${missing.join(', ')}`, {
      file,
      hint: `a segments.csv needs at least ${REQUIRED.join(', ')}`,
    });
  }
  const col = new Map(header.map((h, i) => [h, i]));
  const known = new Set<string>(SEGMENT_COLUMNS);
  const extraKeys = header.filter((h) => !known.has(h));
  const segments = rows.map((r, rowIndex): Segment => {
    const line = rowIndex + 2;
    const num = (name: string, fallback?: number): number => {
      const i = col.get(name);
      const raw = i === undefined ? '' : (r[i] ?? '').trim();
      if (raw === '') {
        if (fallback !== undefined) return fallback;
        throw new XylemapError(`line ${line}: empty ${name}`, { file, hint: 'fill in every required column' });
      }
      const v = parseNumber(raw);
      if (!Number.isFinite(v) && !(NON_FINITE_ALLOWED.has(name) && !Number.isNaN(v))) {
        throw new XylemapError(`line ${line}: ${name} is not a finite number ("${raw}")`, { file, hint: 'use plain decimal numbers' });
      }
      return v;
    };
    const str = (name: string, fallback: string): string => {
      const i = col.get(name);
      return i === undefined ? fallback : (r[i] ?? fallback).trim();
    };
    const start: [number, number, number] = [num('start_x'), num('start_y'), num('start_z')];
    const end: [number, number, number] = [num('end_x'), num('end_y'), num('end_z')];
    const extra: Record<string, number | string> = {};
    for (const k of extraKeys) {
      const raw = str(k, '');
      const v = Number(raw);
      extra[k] = raw !== '' && Number.isFinite(v) ? v : raw;
    }
    const reliableText = str('reliable', 'true').toLowerCase();
    const reliable = reliableText === 'true' || reliableText === '1';
    return segmentFromFields({ num, str }, { start, end, reliable, ...(extraKeys.length > 0 ? { extra } : {}) }, `line ${line}`, file);
  });
  return { segments };
}
