import type { Network, Segment, Vec3 } from '../types/network.js';
import { XylemapError } from '../util/errors.js';
import { segmentFromFields, segmentToFields } from './segment-fields.js';

/** Schema id of network.json; bump the number on any incompatible change. */
export const NETWORK_SCHEMA = 'xylemap.network/1';

/** Units of every numeric field, written into the file so that readers need no documentation. */
export const NETWORK_UNITS = {
  start: 'm (input frame)',
  end: 'm (input frame)',
  radius_m: 'm',
  radius_se_m: 'm',
  radius_fit_m: 'm',
  length_m: 'm',
  fit_rmse_m: 'm',
  arc_coverage: 'fraction of circumference, 0..1',
  point_count: 'points',
} as const;

/**
 * network.json: the network as one JSON object `{schema, units, crs_wkt?, segment_count, segments: [...]}`,
 * keys snake_case as in segments.csv; start/end as [x, y, z] in the input's own frame.
 * @param meta extra top-level fields (e.g. `{ source: "scan.las" }`), written after `units`
 */
export function formatNetworkJson(network: Network, meta: Record<string, unknown> = {}): string {
  const segments = network.segments.map((s) => ({
    ...segmentToFields(s),
    ...(s.extra && Object.keys(s.extra).length > 0 ? { extra: s.extra } : {}),
  }));
  return (
    JSON.stringify(
      {
        schema: NETWORK_SCHEMA,
        units: NETWORK_UNITS,
        ...meta,
        ...(network.crsWkt ? { crs_wkt: network.crsWkt } : {}),
        segment_count: segments.length,
        segments,
      },
      null,
      1,
    ) + '\n'
  );
}

/**
 * Read network.json back.
 * @throws XylemapError naming the file and the first bad field
 */
export function parseNetworkJson(text: string, file = 'network.json'): Network {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw new XylemapError(`not valid JSON (${(e as Error).message})`, { file, hint: 'network.json is written by xylemap reconstruct' });
  }
  const o = doc as Record<string, unknown>;
  if (!o || typeof o !== 'object' || o.schema !== NETWORK_SCHEMA) {
    throw new XylemapError(`not a network file: schema is ${JSON.stringify(o?.schema)}, expected "${NETWORK_SCHEMA}"`, {
      file,
      hint: 'give a network.json written by xylemap reconstruct',
    });
  }
  if (!Array.isArray(o.segments)) throw new XylemapError('"segments" must be an array', { file });
  const segments = (o.segments as Record<string, unknown>[]).map((r, i): Segment => {
    const num = (key: string, fallback?: number): number => {
      const v = r[key];
      if (v === undefined && fallback !== undefined) return fallback;
      if (typeof v !== 'number' || !Number.isFinite(v)) {
        throw new XylemapError(`segment ${i}: ${key} must be a finite number, got ${JSON.stringify(v)}`, { file });
      }
      return v;
    };
    const vec = (key: string): Vec3 => {
      const v = r[key];
      if (!Array.isArray(v) || v.length !== 3 || !v.every((c) => typeof c === 'number' && Number.isFinite(c))) {
        throw new XylemapError(`segment ${i}: ${key} must be [x, y, z] of finite numbers`, { file });
      }
      return [v[0], v[1], v[2]];
    };
    const str = (key: string, fallback: string): string => (typeof r[key] === 'string' ? (r[key] as string) : fallback);
    const extra = r.extra && typeof r.extra === 'object' ? (r.extra as Record<string, number | string>) : undefined;
    const reliable = r.reliable === undefined ? true : r.reliable === true;
    return segmentFromFields({ num, str }, { start: vec('start'), end: vec('end'), reliable, ...(extra ? { extra } : {}) }, `segment ${i}`, file);
  });
  return { segments, ...(typeof o.crs_wkt === 'string' ? { crsWkt: o.crs_wkt } : {}) };
}
