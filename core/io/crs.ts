import type { LasVlr } from '../types/point-cloud.js';

/**
 * What a LAS file says about its coordinate reference system. Sources: the OGC WKT VLR/EVLR
 * (LASF_Projection 2112, LAS 1.4 §2.5.2) and the GeoTIFF key directory (LASF_Projection 34735 with
 * doubles in 34736 and ASCII in 34737; GeoTIFF 1.0 spec §2.4, key ids §6.2).
 */
export interface CrsSummary {
  /** "wkt", "geotiff", "wkt+geotiff" or null when the file has no CRS record. */
  source: string | null;
  /** First keyword of the WKT (PROJCS, GEOGCS, GEOCCS, COMPD_CS, PROJCRS …). */
  wktKind?: string;
  /** The WKT's first quoted name. */
  wktName?: string;
  projectedCsType?: number;
  geographicType?: number;
  verticalCsType?: number;
  linearUnits?: number;
  citation?: string;
}

const PROJECTION = 'LASF_Projection';
/** GeoTIFF key ids (GeoTIFF 1.0 §6.2). */
const KEY = { GTCitation: 1026, GeographicType: 2048, ProjectedCSType: 3072, PCSCitation: 3073, ProjLinearUnits: 3076, VerticalCSType: 4096 };

/** First keyword and first quoted name of a WKT string, e.g. PROJCS["ETRS89 / UTM zone 32N", … */
export function wktHead(wkt: string): { kind: string; name: string } | null {
  const m = /^\s*([A-Za-z_]+)\s*\[\s*"([^"]*)"/.exec(wkt);
  return m ? { kind: m[1].toUpperCase(), name: m[2] } : null;
}

/** Parse a GeoTIFF key directory (array of uint16: version, revision, minor, count, then 4 per key). */
export function geoKeys(directory: Uint8Array, ascii?: Uint8Array): Map<number, number | string> {
  const keys = new Map<number, number | string>();
  const view = new DataView(directory.buffer, directory.byteOffset, directory.byteLength);
  if (directory.length < 8) return keys;
  const count = view.getUint16(6, true);
  for (let k = 0; k < count; k++) {
    const at = 8 + 8 * k;
    if (at + 8 > directory.length) break;
    const id = view.getUint16(at, true);
    const location = view.getUint16(at + 2, true);
    const n = view.getUint16(at + 4, true);
    const value = view.getUint16(at + 6, true);
    if (location === 0) keys.set(id, value);
    else if (location === 34737 && ascii) {
      const text = new TextDecoder('latin1').decode(ascii.subarray(value, value + n));
      keys.set(id, text.replace(/[|\0]+$/, ''));
    }
  }
  return keys;
}

/** Summarize the CRS records among a file's VLRs and EVLRs. */
export function summarizeCrs(vlrs: LasVlr[]): CrsSummary {
  const out: CrsSummary = { source: null };
  const find = (id: number) => vlrs.find((v) => v.userId === PROJECTION && v.recordId === id);
  const sources: string[] = [];
  const wkt = find(2112);
  if (wkt) {
    const text = new TextDecoder('utf-8').decode(wkt.data).replace(/\0+$/, '');
    const head = wktHead(text);
    if (head) {
      out.wktKind = head.kind;
      out.wktName = head.name;
    }
    sources.push('wkt');
  }
  const dir = find(34735);
  if (dir) {
    const keys = geoKeys(dir.data, find(34737)?.data);
    const num = (id: number) => (typeof keys.get(id) === 'number' ? (keys.get(id) as number) : undefined);
    out.projectedCsType = num(KEY.ProjectedCSType);
    out.geographicType = num(KEY.GeographicType);
    out.verticalCsType = num(KEY.VerticalCSType);
    out.linearUnits = num(KEY.ProjLinearUnits);
    const citation = keys.get(KEY.PCSCitation) ?? keys.get(KEY.GTCitation);
    if (typeof citation === 'string') out.citation = citation;
    sources.push('geotiff');
  }
  out.source = sources.length ? sources.join('+') : null;
  return out;
}

/** One short line, e.g. "EPSG:25832 (ProjectedCSType) · WKT PROJCS "ETRS89 / UTM zone 32N"". */
export function crsLine(crs: CrsSummary): string {
  if (!crs.source) return 'none';
  const parts: string[] = [];
  // 32767 is GeoTIFF's "user-defined": the real definition is in the WKT or other keys.
  const code = (v: number | undefined) => (v !== undefined && v !== 32767 ? v : undefined);
  if (code(crs.projectedCsType) !== undefined) parts.push(`EPSG:${crs.projectedCsType} (ProjectedCSType)`);
  else if (code(crs.geographicType) !== undefined) parts.push(`EPSG:${crs.geographicType} (GeographicType)`);
  else if (crs.projectedCsType === 32767) parts.push('user-defined projected CRS');
  if (crs.verticalCsType !== undefined) parts.push(`vertical EPSG:${crs.verticalCsType}`);
  if (crs.wktKind) parts.push(`WKT ${crs.wktKind} "${crs.wktName}"`);
  return parts.length ? parts.join(' · ') : crs.source;
}
