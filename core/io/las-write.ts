import type { AttributeArray, LasVlr, PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { VERSION } from '../version.js';
import { writeFileAtomic } from './atomic.js';
import { POINT_FORMAT_SIZES } from './las-header.js';
import { dataTypeOfArray, encodeExtraBytesVlr, EXTRA_BYTES_RECORD, EXTRA_BYTES_USER, extraBytesShape, scalarSize } from './las-extra-bytes.js';
import { LASZIP_RECORD, LASZIP_USER } from './laszip-vlr.js';
import { groupOffsets, hasGpsTime, hasNir, hasRgb } from './las-points.js';

export type { LasVlr } from '../types/point-cloud.js';

export interface LasWriteOptions {
  version: '1.2' | '1.4';
  /** 0/1 (and 2/3 with RGB) in LAS 1.2; also 6/7/8 in LAS 1.4. */
  pointFormat: 0 | 1 | 2 | 3 | 6 | 7 | 8;
  /** Metres per integer step; default 0.0001 m (0.1 mm) on every axis. */
  scale?: [number, number, number];
  /** Default: the data minimum rounded down to a whole metre on every axis (0 for an empty cloud). */
  offset?: [number, number, number];
  /** Keys of `cloud.extra` written as described extra bytes (Extra Bytes VLR). */
  extraBytes?: string[];
  /**
   * Write `cloud.rawExtraBytes` (the source's whole extra-bytes block) verbatim, with the source's
   * Extra Bytes descriptors, before any `extraBytes` fields; for exact pass-through of fields this
   * writer cannot describe. Fields already in the raw block are not written twice.
   */
  rawExtraBytes?: boolean;
  /** VLRs/EVLRs to pass through (e.g. the CRS); LASzip and Extra Bytes VLRs are dropped (we write our own). */
  vlrs?: LasVlr[];
  /** GPS time type (global encoding bit 0): true = adjusted standard GPS time. Default: the source's bit, else false. */
  standardGpsTime?: boolean;
  /** Creation date written to the header; default today (UTC). */
  creation?: { day: number; year: number };
}

/** Default quantum: 0.1 mm keeps scanner precision (≈ 1–2 mm) with 200 km of int32 range. */
export const DEFAULT_LAS_SCALE: [number, number, number] = [0.0001, 0.0001, 0.0001];

const ALLOWED: Record<string, number[]> = { '1.2': [0, 1, 2, 3], '1.4': [0, 1, 2, 3, 6, 7, 8] };

interface ExtraOut {
  name: string;
  array: AttributeArray;
  dataType: number;
  size: number;
  at: number;
  scale?: number;
  offset?: number;
}

/**
 * Write-options that reproduce a LAS/LAZ source as closely as this writer can (same scale, offset,
 * version, point format when writable, VLRs, extra-bytes fields), for exact round trips.
 */
export function lasOptionsLike(cloud: PointCloud): LasWriteOptions {
  const s = cloud.source;
  const pf = s.pointFormat ?? 0;
  const version = s.lasVersion === '1.4' || pf >= 6 ? '1.4' : '1.2';
  const writable = ALLOWED[version].includes(pf) ? pf : pf >= 6 ? 8 : 3;
  return {
    version,
    pointFormat: writable as LasWriteOptions['pointFormat'],
    scale: s.scale,
    offset: s.offset,
    extraBytes: Object.keys(cloud.extra).filter((k) => !k.startsWith('wave_')),
    rawExtraBytes: cloud.rawExtraBytes !== undefined,
    vlrs: [...(s.vlrs ?? []), ...(s.evlrs ?? [])],
    standardGpsTime: s.globalEncoding !== undefined ? (s.globalEncoding & 1) === 1 : undefined,
    creation: s.creationYear ? { day: s.creationDay ?? 0, year: s.creationYear } : undefined,
  };
}

/**
 * Encode a cloud as an uncompressed LAS file (ASPRS LAS 1.2 / 1.4 R15).
 * Coordinates are stored as round((v − offset) / scale); with the default scale of 0.1 mm that
 * is exact to ±0.05 mm anywhere within ±214 km of the offset.
 * @throws XylemapError when a value cannot be stored (NaN, out of int32 range, class > 31 in pf 0–3 …).
 */
export function encodeLas(cloud: PointCloud, options: LasWriteOptions): Uint8Array {
  const fail = (problem: string, hint: string) => new XylemapError(problem, { stage: 'io', hint });
  const pf = options.pointFormat;
  const minor = options.version === '1.4' ? 4 : 2;
  if (!ALLOWED[options.version]?.includes(pf)) {
    throw fail(`point format ${pf} cannot be written as LAS ${options.version}`, 'use formats 0–3 with LAS 1.2, or 6–8 with LAS 1.4');
  }
  const n = cloud.count;
  const scale = options.scale ?? DEFAULT_LAS_SCALE;
  const offset = options.offset ?? defaultOffset(cloud);
  for (let k = 0; k < 3; k++) {
    if (!(Number.isFinite(scale[k]) && scale[k] > 0)) throw fail(`LAS scale ${'xyz'[k]} must be a finite number > 0, got ${scale[k]}`, 'pass a scale such as 0.0001');
    if (!Number.isFinite(offset[k])) throw fail(`LAS offset ${'xyz'[k]} must be finite, got ${offset[k]}`, 'pass a finite offset');
  }

  const base = POINT_FORMAT_SIZES[pf];
  const raw = options.rawExtraBytes && cloud.rawExtraBytes ? rawBlock(cloud) : null;
  const inRaw = new Set(raw ? (cloud.source.extraBytesFields ?? []).map((f) => extraColumnNames(f.name, f.dataType)).flat() : []);
  const extras = planExtras(cloud, (options.extraBytes ?? []).filter((k) => !inRaw.has(k)), base + (raw?.width ?? 0));
  const recordLength = base + (raw?.width ?? 0) + extras.reduce((s, e) => s + e.size, 0);
  if (recordLength > 65535) throw fail(`record length ${recordLength} exceeds 65535 bytes`, 'write fewer extra-bytes fields');

  const passThrough = (options.vlrs ?? []).filter(
    (v) => !(v.userId === LASZIP_USER && v.recordId === LASZIP_RECORD) && !(v.userId === EXTRA_BYTES_USER && v.recordId === EXTRA_BYTES_RECORD),
  );
  const vlrs: LasVlr[] = [];
  const evlrs: LasVlr[] = [];
  if (extras.length > 0 || (raw && raw.descriptors.length > 0)) {
    const own = encodeExtraBytesVlr(extras);
    let data = own;
    if (raw) {
      // The source's descriptors (verbatim), a filler for undescribed trailing raw bytes, then ours.
      const gap: { name: string; dataType: number; size: number }[] = [];
      // An "undocumented" descriptor counts its bytes in one byte, so cover long gaps in steps of 255.
      for (let left = extras.length > 0 ? raw.width - raw.described : 0; left > 0; left -= 255) gap.push({ name: 'undescribed', dataType: 0, size: Math.min(255, left) });
      const filler = encodeExtraBytesVlr(gap);
      data = concat([raw.descriptors, filler, own]);
    }
    vlrs.push({ userId: EXTRA_BYTES_USER, recordId: EXTRA_BYTES_RECORD, description: 'extra bytes', data, extended: false });
  }
  for (const v of passThrough) {
    if (minor === 4 && (v.extended || v.data.length > 65535)) evlrs.push(v);
    else if (v.data.length <= 65535) vlrs.push(v);
    else throw fail(`VLR "${v.userId}" ${v.recordId} holds ${v.data.length} B, more than a LAS 1.2 VLR can`, 'write LAS 1.4 instead');
  }

  const headerSize = minor === 4 ? 375 : 227;
  const vlrBytes = vlrs.reduce((s, v) => s + 54 + v.data.length, 0);
  const offsetToPointData = headerSize + vlrBytes;
  const pointBytes = n * recordLength;
  const evlrBytes = evlrs.reduce((s, v) => s + 60 + v.data.length, 0);
  const total = offsetToPointData + pointBytes + evlrBytes;
  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);

  // Points first: the header needs their bounds and return counts.
  const stats = encodePoints(cloud, view, offsetToPointData, recordLength, pf, scale, offset, extras);
  if (raw) {
    const w = raw.width;
    for (let i = 0, p = offsetToPointData + base; i < n; i++, p += recordLength) out.set(raw.bytes.subarray(i * w, i * w + w), p);
  }

  const enc = new TextEncoder();
  out.set(enc.encode('LASF'), 0);
  view.setUint16(4, cloud.source.fileSourceId ?? 0, true);
  const gpsStandard = options.standardGpsTime ?? ((cloud.source.globalEncoding ?? 0) & 1) === 1;
  view.setUint16(6, (gpsStandard ? 1 : 0) | (minor === 4 && pf >= 6 ? 16 : 0), true);
  out[24] = 1;
  out[25] = minor;
  out.set(enc.encode('xylemap').subarray(0, 32), 26);
  out.set(enc.encode(`xylemap ${VERSION}`).subarray(0, 32), 58);
  const creation = options.creation ?? today();
  view.setUint16(90, creation.day, true);
  view.setUint16(92, creation.year, true);
  view.setUint16(94, headerSize, true);
  view.setUint32(96, offsetToPointData, true);
  view.setUint32(100, vlrs.length, true);
  out[104] = pf;
  view.setUint16(105, recordLength, true);
  const legacyOk = pf < 6 && n <= 0xffffffff;
  if (minor !== 4 && n > 0xffffffff) throw fail(`${n} points exceed the LAS 1.2 limit of 4 294 967 295`, 'write LAS 1.4 instead');
  view.setUint32(107, legacyOk ? n : 0, true);
  for (let r = 0; r < 5; r++) view.setUint32(111 + 4 * r, legacyOk ? stats.byReturn[r + 1] : 0, true);
  for (let k = 0; k < 3; k++) {
    view.setFloat64(131 + 8 * k, scale[k], true);
    view.setFloat64(155 + 8 * k, offset[k], true);
    view.setFloat64(179 + 16 * k, n > 0 ? stats.max[k] : 0, true);
    view.setFloat64(187 + 16 * k, n > 0 ? stats.min[k] : 0, true);
  }
  if (minor === 4) {
    view.setBigUint64(227, 0n, true);
    view.setBigUint64(235, BigInt(evlrs.length > 0 ? offsetToPointData + pointBytes : 0), true);
    view.setUint32(243, evlrs.length, true);
    view.setBigUint64(247, BigInt(n), true);
    for (let r = 0; r < 15; r++) view.setBigUint64(255 + 8 * r, BigInt(stats.byReturn[r + 1]), true);
  }
  let at = headerSize;
  for (const v of vlrs) {
    out.set(enc.encode(v.userId).subarray(0, 16), at + 2);
    view.setUint16(at + 18, v.recordId, true);
    view.setUint16(at + 20, v.data.length, true);
    out.set(enc.encode(v.description).subarray(0, 32), at + 22);
    out.set(v.data, at + 54);
    at += 54 + v.data.length;
  }
  at = offsetToPointData + pointBytes;
  for (const v of evlrs) {
    out.set(enc.encode(v.userId).subarray(0, 16), at + 2);
    view.setUint16(at + 18, v.recordId, true);
    view.setBigUint64(at + 20, BigInt(v.data.length), true);
    out.set(enc.encode(v.description).subarray(0, 32), at + 28);
    out.set(v.data, at + 60);
    at += 60 + v.data.length;
  }
  return out;
}

/**
 * Encode and write a LAS file atomically (no partial file on failure).
 * @param path output path; its folder is created if missing.
 */
export function writeLas(path: string, cloud: PointCloud, options: LasWriteOptions): void {
  let bytes: Uint8Array;
  try {
    bytes = encodeLas(cloud, options);
  } catch (e) {
    if (e instanceof XylemapError) throw new XylemapError(e.message, { file: path, stage: 'io', hint: e.hint });
    throw e;
  }
  writeFileAtomic(path, bytes);
}

/** Offset default: data minimum rounded down to a whole metre (keeps stored integers positive and small). */
export function defaultOffset(cloud: PointCloud): [number, number, number] {
  if (cloud.count === 0) return [0, 0, 0];
  const out: [number, number, number] = [0, 0, 0];
  [cloud.x, cloud.y, cloud.z].forEach((a, k) => {
    let m = Infinity;
    for (let i = 0; i < a.length; i++) if (a[i] < m) m = a[i];
    out[k] = Number.isFinite(m) ? Math.floor(m) : 0;
  });
  return out;
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Column names the reader gives a field (array types get _0, _1, _2). */
function extraColumnNames(name: string, dataType: number): string[] {
  const shape = extraBytesShape(dataType);
  if (!shape || shape.elements === 1) return [name];
  return Array.from({ length: shape.elements }, (_, k) => `${name}_${k}`);
}

/** The source's raw extra-bytes block and its Extra Bytes descriptors (192 B each, verbatim). */
function rawBlock(cloud: PointCloud): { bytes: Uint8Array; width: number; described: number; descriptors: Uint8Array } {
  const width = cloud.source.extraBytesPerRecord ?? 0;
  const bytes = cloud.rawExtraBytes!;
  if (!(width > 0 && bytes.length === width * cloud.count)) {
    throw new XylemapError(`raw extra bytes hold ${bytes.length} B, expected ${width} B × ${cloud.count} points`, { stage: 'io' });
  }
  const sources = [...(cloud.source.vlrs ?? []), ...(cloud.source.evlrs ?? [])].filter((v) => v.userId === EXTRA_BYTES_USER && v.recordId === EXTRA_BYTES_RECORD);
  const descriptors = concat(sources.map((v) => v.data.subarray(0, v.data.length - (v.data.length % 192))));
  const described = (cloud.source.extraBytesFields ?? []).reduce((m, f) => Math.max(m, f.byteOffset + f.byteSize), 0);
  return { bytes, width, described: Math.min(described, width), descriptors };
}

function today(): { day: number; year: number } {
  const now = new Date();
  const start = Date.UTC(now.getUTCFullYear(), 0, 1);
  return { day: Math.floor((now.getTime() - start) / 86_400_000) + 1, year: now.getUTCFullYear() };
}

function planExtras(cloud: PointCloud, keys: string[], base: number): ExtraOut[] {
  const out: ExtraOut[] = [];
  let at = base;
  const known = new Map((cloud.source.extraBytesFields ?? []).map((f) => [f.name, f]));
  for (const name of keys) {
    const array = cloud.extra[name];
    if (!array) {
      throw new XylemapError(`extra-bytes field "${name}" is not in the cloud (has: ${Object.keys(cloud.extra).join(', ') || 'none'})`, {
        stage: 'io',
        hint: 'list only keys of cloud.extra in extraBytes',
      });
    }
    if (array.length !== cloud.count) {
      throw new XylemapError(`extra field "${name}" has ${array.length} values for ${cloud.count} points`, { stage: 'io' });
    }
    // A Float64 column that came from a scaled integer field is written back in that form.
    const src = known.get(name);
    const shape = src ? extraBytesShape(src.dataType) : null;
    if (src && shape && shape.elements === 1 && (src.scale || src.offset) && array instanceof Float64Array) {
      const size = scalarSize(shape.scalar);
      out.push({ name, array, dataType: shape.scalar, size, at, scale: src.scale?.[0] ?? 1, offset: src.offset?.[0] ?? 0 });
      at += size;
      continue;
    }
    const dataType = dataTypeOfArray(array);
    const size = scalarSize(dataType);
    out.push({ name, array, dataType, size, at });
    at += size;
  }
  return out;
}

interface PointStats {
  min: [number, number, number];
  max: [number, number, number];
  byReturn: number[];
}

function encodePoints(
  cloud: PointCloud,
  view: DataView,
  start: number,
  rl: number,
  pf: number,
  scale: [number, number, number],
  offset: [number, number, number],
  extras: ExtraOut[],
): PointStats {
  const n = cloud.count;
  const a = cloud.attributes;
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  const byReturn = new Array<number>(16).fill(0);
  const coords = [cloud.x, cloud.y, cloud.z];
  for (let k = 0; k < 3; k++) {
    const c = coords[k];
    const s = scale[k];
    const o = offset[k];
    for (let i = 0, p = start + 4 * k; i < n; i++, p += rl) {
      const q = Math.round((c[i] - o) / s);
      if (!(q >= -2147483648 && q <= 2147483647)) {
        throw new XylemapError(
          `point ${i}: ${'xyz'[k]} = ${c[i]} cannot be stored with scale ${s} and offset ${o} (outside the int32 range or not a number)`,
          { stage: 'io', hint: 'pass a larger scale or an offset near the data, or remove non-finite points' },
        );
      }
      view.setInt32(p, q, true);
      const v = q * s + o;
      if (v < min[k]) min[k] = v;
      if (v > max[k]) max[k] = v;
    }
  }
  const get = (name: keyof PointCloud['attributes']) => a[name] as ArrayLike<number> | undefined;
  const intensity = get('intensity');
  const ret = get('returnNumber');
  const nret = get('numberOfReturns');
  const dir = get('scanDirectionFlag');
  const edge = get('edgeOfFlightLine');
  const cls = get('classification');
  const flags = get('classificationFlags');
  const angle = get('scanAngleDeg');
  const user = get('userData');
  const psid = get('pointSourceId');
  const chan = get('scanChannel');
  const maxReturn = pf < 6 ? 7 : 15;
  for (let i = 0, p = start; i < n; i++, p += rl) {
    if (intensity) view.setUint16(p + 12, intensity[i], true);
    const r = ret ? ret[i] : 1;
    const nr = nret ? nret[i] : 1;
    if (!(r <= maxReturn && nr <= maxReturn)) {
      throw new XylemapError(`point ${i}: return ${r} of ${nr} exceeds ${maxReturn}, the limit of point format ${pf}`, {
        stage: 'io',
        hint: 'write LAS 1.4 with point format 6–8',
      });
    }
    byReturn[r]++;
    const c = cls ? cls[i] : 0;
    const f = flags ? flags[i] : 0;
    if (pf < 6) {
      if (c > 31) {
        throw new XylemapError(`point ${i}: classification ${c} exceeds 31, the limit of point format ${pf}`, {
          stage: 'io',
          hint: 'write LAS 1.4 with point format 6–8',
        });
      }
      view.setUint8(p + 14, (r & 7) | ((nr & 7) << 3) | ((dir ? dir[i] & 1 : 0) << 6) | ((edge ? edge[i] & 1 : 0) << 7));
      view.setUint8(p + 15, (c & 31) | ((f & 7) << 5));
      view.setInt8(p + 16, angle ? Math.max(-128, Math.min(127, Math.round(angle[i]))) : 0);
      view.setUint8(p + 17, user ? user[i] : 0);
      view.setUint16(p + 18, psid ? psid[i] : 0, true);
    } else {
      view.setUint8(p + 14, (r & 15) | ((nr & 15) << 4));
      view.setUint8(p + 15, (f & 15) | ((chan ? chan[i] & 3 : 0) << 4) | ((dir ? dir[i] & 1 : 0) << 6) | ((edge ? edge[i] & 1 : 0) << 7));
      view.setUint8(p + 16, c);
      view.setUint8(p + 17, user ? user[i] : 0);
      view.setInt16(p + 18, angle ? Math.max(-32768, Math.min(32767, Math.round(angle[i] / 0.006))) : 0, true);
      view.setUint16(p + 20, psid ? psid[i] : 0, true);
    }
  }
  const g = groupOffsets(pf);
  const gps = get('gpsTime');
  if (hasGpsTime(pf) && gps) for (let i = 0, p = start + g.gps; i < n; i++, p += rl) view.setFloat64(p, gps[i], true);
  if (hasRgb(pf)) {
    const rgb = [get('red'), get('green'), get('blue')];
    rgb.forEach((ch, k) => {
      if (ch) for (let i = 0, p = start + g.rgb + 2 * k; i < n; i++, p += rl) view.setUint16(p, ch[i], true);
    });
  }
  const nir = get('nir');
  if (hasNir(pf) && nir) for (let i = 0, p = start + g.nir; i < n; i++, p += rl) view.setUint16(p, nir[i], true);
  for (const e of extras) writeExtra(view, start, rl, n, e);
  return { min, max, byReturn };
}

function writeExtra(view: DataView, start: number, rl: number, n: number, e: ExtraOut): void {
  const arr = e.array;
  if (arr instanceof BigInt64Array || arr instanceof BigUint64Array) {
    for (let i = 0, p = start + e.at; i < n; i++, p += rl) {
      if (e.dataType === 7) view.setBigUint64(p, BigInt.asUintN(64, arr[i]), true);
      else view.setBigInt64(p, BigInt.asIntN(64, arr[i]), true);
    }
    return;
  }
  const a = arr as ArrayLike<number>;
  const s = e.scale ?? 1;
  const o = e.offset ?? 0;
  const scaled = e.scale !== undefined || e.offset !== undefined;
  for (let i = 0, p = start + e.at; i < n; i++, p += rl) {
    const v = scaled ? Math.round((a[i] - o) / s) : a[i];
    switch (e.dataType) {
      case 1: view.setUint8(p, v); break;
      case 2: view.setInt8(p, v); break;
      case 3: view.setUint16(p, v, true); break;
      case 4: view.setInt16(p, v, true); break;
      case 5: view.setUint32(p, v, true); break;
      case 6: view.setInt32(p, v, true); break;
      case 7: view.setBigUint64(p, BigInt(v), true); break;
      case 8: view.setBigInt64(p, BigInt(v), true); break;
      case 9: view.setFloat32(p, v, true); break;
      default: view.setFloat64(p, v, true);
    }
  }
}
