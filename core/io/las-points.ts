import type { AttributeArray, ExtraBytesField, PointCloud, StandardAttribute } from '../types/point-cloud.js';
import { POINT_FORMAT_SIZES } from './las-header.js';
import { allocateExtraColumn, extraColumns, type ExtraColumn } from './las-extra-bytes.js';

/**
 * Point data record decoding (LAS 1.4 R15 Tables 7–17) into struct-of-arrays.
 *
 * Decoding runs column by column over a block of records (one tight loop per field), which keeps
 * each loop monomorphic; blocks are small enough (≈ 64 k records) to stay in cache between passes.
 */
export interface LasLayout {
  pointFormat: number;
  recordLength: number;
  scale: [number, number, number];
  offset: [number, number, number];
  extraColumns: ExtraColumn[];
  /** Width of the extra-bytes block per record. */
  extraWidth: number;
  /** Keep the whole extra-bytes block as raw bytes (some bytes are undescribed). */
  keepRaw: boolean;
}

export function hasGpsTime(pf: number): boolean {
  return pf === 1 || pf >= 3;
}
export function hasRgb(pf: number): boolean {
  return pf === 2 || pf === 3 || pf === 5 || pf === 7 || pf === 8 || pf === 10;
}
export function hasNir(pf: number): boolean {
  return pf === 8 || pf === 10;
}
export function hasWaveform(pf: number): boolean {
  return pf === 4 || pf === 5 || pf === 9 || pf === 10;
}

/** Byte offsets of the optional groups inside a record. */
export function groupOffsets(pf: number): { gps: number; rgb: number; nir: number; wave: number } {
  if (pf < 6) {
    return {
      gps: 20,
      rgb: pf === 2 ? 20 : 28,
      nir: -1,
      wave: pf === 4 ? 28 : 34,
    };
  }
  return { gps: 22, rgb: 30, nir: 36, wave: pf === 9 ? 30 : 38 };
}

export function buildLayout(
  pointFormat: number,
  recordLength: number,
  scale: [number, number, number],
  offset: [number, number, number],
  fields: ExtraBytesField[],
  keepRaw: boolean,
): LasLayout {
  const base = POINT_FORMAT_SIZES[pointFormat];
  const extraWidth = recordLength - base;
  return { pointFormat, recordLength, scale, offset, extraColumns: extraColumns(fields, base, extraWidth), extraWidth, keepRaw };
}

type Ctor<T> = new (buffer: ArrayBufferLike, byteOffset: number, length: number) => T;

/** A typed-array factory: ordinary memory, or SharedArrayBuffer memory that worker threads can fill. */
function factory(shared: boolean) {
  return <T>(C: Ctor<T> & { BYTES_PER_ELEMENT: number }, n: number): T =>
    new C(shared ? new SharedArrayBuffer(n * C.BYTES_PER_ELEMENT) : new ArrayBuffer(n * C.BYTES_PER_ELEMENT), 0, n);
}

/**
 * Allocate an empty cloud with every array the layout fills.
 * @param shared back the arrays by SharedArrayBuffer so worker threads can decode into them.
 */
export function allocateLasCloud(layout: LasLayout, count: number, shared = false): PointCloud {
  const make = factory(shared);
  const pf = layout.pointFormat;
  const a: Partial<Record<StandardAttribute, AttributeArray>> = {
    intensity: make(Uint16Array, count),
    returnNumber: make(Uint8Array, count),
    numberOfReturns: make(Uint8Array, count),
    scanDirectionFlag: make(Uint8Array, count),
    edgeOfFlightLine: make(Uint8Array, count),
    classification: make(Uint8Array, count),
    classificationFlags: make(Uint8Array, count),
    scanAngleDeg: make(Float32Array, count),
    userData: make(Uint8Array, count),
    pointSourceId: make(Uint16Array, count),
  };
  if (pf >= 6) a.scanChannel = make(Uint8Array, count);
  if (hasGpsTime(pf)) a.gpsTime = make(Float64Array, count);
  if (hasRgb(pf)) {
    a.red = make(Uint16Array, count);
    a.green = make(Uint16Array, count);
    a.blue = make(Uint16Array, count);
  }
  if (hasNir(pf)) a.nir = make(Uint16Array, count);
  const extra: Record<string, AttributeArray> = {};
  for (const c of layout.extraColumns) extra[c.name] = allocateExtraColumn(c, count, shared);
  if (hasWaveform(pf)) {
    extra.wave_packet_index = make(Uint8Array, count);
    extra.wave_byte_offset = make(BigUint64Array, count);
    extra.wave_packet_size = make(Uint32Array, count);
    extra.wave_return_location_ps = make(Float32Array, count);
    extra.wave_dx = make(Float32Array, count);
    extra.wave_dy = make(Float32Array, count);
    extra.wave_dz = make(Float32Array, count);
  }
  const cloud: PointCloud = {
    count,
    x: make(Float64Array, count),
    y: make(Float64Array, count),
    z: make(Float64Array, count),
    attributes: a,
    extra,
    source: { format: 'las' },
  };
  if (layout.keepRaw && layout.extraWidth > 0) cloud.rawExtraBytes = make(Uint8Array, count * layout.extraWidth);
  return cloud;
}

/**
 * Decode `n` records that start at `byteOffset` of `bytes` into the cloud at index `start`.
 */
export function decodeRecords(bytes: Uint8Array, byteOffset: number, n: number, cloud: PointCloud, start: number, layout: LasLayout): void {
  const v = new DataView(bytes.buffer, bytes.byteOffset + byteOffset, n * layout.recordLength);
  const rl = layout.recordLength;
  const pf = layout.pointFormat;
  const end = n * rl;
  const a = cloud.attributes;
  // The fixed part of every record (coordinates, intensity, return/flag bytes, class, angle,
  // source id) in one fused pass: measured ≈ 20 % less CPU than one pass per field.
  if (pf < 6) decodeLegacyCore(v, rl, end, cloud, start, layout);
  else decodeExtendedCore(v, rl, end, cloud, start, layout);
  const g = groupOffsets(pf);
  if (hasRgb(pf)) {
    copyU16(v, g.rgb, rl, end, a.red as Uint16Array, start);
    copyU16(v, g.rgb + 2, rl, end, a.green as Uint16Array, start);
    copyU16(v, g.rgb + 4, rl, end, a.blue as Uint16Array, start);
  }
  if (hasNir(pf)) copyU16(v, g.nir, rl, end, a.nir as Uint16Array, start);
  if (hasWaveform(pf)) decodeWave(v, g.wave, rl, end, cloud, start);
  for (const c of layout.extraColumns) decodeExtra(v, c, rl, end, cloud.extra[c.name], start);
  if (cloud.rawExtraBytes) {
    const w = layout.extraWidth;
    const base = rl - w;
    const src = new Uint8Array(v.buffer, v.byteOffset, end);
    for (let p = base, o = start * w; p < end; p += rl, o += w) cloud.rawExtraBytes.set(src.subarray(p, p + w), o);
  }
}

/** Per-axis coordinate decoding constants: exact division when possible, else multiply-add. */
function axisCoder(s: number, o: number): { exact: boolean; d: number; k: number } {
  const e = exactDivisor(s, o);
  return e ? { exact: true, d: e.divisor, k: e.shift } : { exact: false, d: s, k: o };
}

function decodeLegacyCore(v: DataView, rl: number, end: number, cloud: PointCloud, start: number, layout: LasLayout): void {
  const a = cloud.attributes;
  const { x, y, z } = cloud;
  const cx = axisCoder(layout.scale[0], layout.offset[0]);
  const cy = axisCoder(layout.scale[1], layout.offset[1]);
  const cz = axisCoder(layout.scale[2], layout.offset[2]);
  const ex = cx.exact, dx = cx.d, kx = cx.k;
  const ey = cy.exact, dy = cy.d, ky = cy.k;
  const ez = cz.exact, dz = cz.d, kz = cz.k;
  const intensity = a.intensity as Uint16Array;
  const ret = a.returnNumber as Uint8Array;
  const nret = a.numberOfReturns as Uint8Array;
  const dir = a.scanDirectionFlag as Uint8Array;
  const edge = a.edgeOfFlightLine as Uint8Array;
  const cls = a.classification as Uint8Array;
  const flags = a.classificationFlags as Uint8Array;
  const angle = a.scanAngleDeg as Float32Array;
  const user = a.userData as Uint8Array;
  const psid = a.pointSourceId as Uint16Array;
  // GPS time (pf 1, 3, 4, 5 at byte 20) rides in the same pass (the branch is loop-invariant).
  const hasTime = hasGpsTime(layout.pointFormat);
  const gps = hasTime ? (a.gpsTime as Float64Array) : new Float64Array(0);
  for (let p = 0, i = start; p < end; p += rl, i++) {
    const X = v.getInt32(p, true);
    const Y = v.getInt32(p + 4, true);
    const Z = v.getInt32(p + 8, true);
    x[i] = ex ? (X + kx) / dx : X * dx + kx;
    y[i] = ey ? (Y + ky) / dy : Y * dy + ky;
    z[i] = ez ? (Z + kz) / dz : Z * dz + kz;
    intensity[i] = v.getUint16(p + 12, true);
    if (hasTime) gps[i] = v.getFloat64(p + 20, true);
    const b = v.getUint8(p + 14);
    ret[i] = b & 7;
    nret[i] = (b >> 3) & 7;
    dir[i] = (b >> 6) & 1;
    edge[i] = b >> 7;
    const c = v.getUint8(p + 15);
    cls[i] = c & 31;
    flags[i] = c >> 5; // synthetic, key-point, withheld: the same bit order as the pf 6 flags
    angle[i] = v.getInt8(p + 16);
    user[i] = v.getUint8(p + 17);
    psid[i] = v.getUint16(p + 18, true);
  }
}

function decodeExtendedCore(v: DataView, rl: number, end: number, cloud: PointCloud, start: number, layout: LasLayout): void {
  const a = cloud.attributes;
  const { x, y, z } = cloud;
  const cx = axisCoder(layout.scale[0], layout.offset[0]);
  const cy = axisCoder(layout.scale[1], layout.offset[1]);
  const cz = axisCoder(layout.scale[2], layout.offset[2]);
  const ex = cx.exact, dx = cx.d, kx = cx.k;
  const ey = cy.exact, dy = cy.d, ky = cy.k;
  const ez = cz.exact, dz = cz.d, kz = cz.k;
  const intensity = a.intensity as Uint16Array;
  const ret = a.returnNumber as Uint8Array;
  const nret = a.numberOfReturns as Uint8Array;
  const dir = a.scanDirectionFlag as Uint8Array;
  const edge = a.edgeOfFlightLine as Uint8Array;
  const cls = a.classification as Uint8Array;
  const flags = a.classificationFlags as Uint8Array;
  const chan = a.scanChannel as Uint8Array;
  const angle = a.scanAngleDeg as Float32Array;
  const user = a.userData as Uint8Array;
  const psid = a.pointSourceId as Uint16Array;
  const gps = a.gpsTime as Float64Array; // every format 6–10 has GPS time at byte 22
  for (let p = 0, i = start; p < end; p += rl, i++) {
    const X = v.getInt32(p, true);
    const Y = v.getInt32(p + 4, true);
    const Z = v.getInt32(p + 8, true);
    x[i] = ex ? (X + kx) / dx : X * dx + kx;
    y[i] = ey ? (Y + ky) / dy : Y * dy + ky;
    z[i] = ez ? (Z + kz) / dz : Z * dz + kz;
    intensity[i] = v.getUint16(p + 12, true);
    gps[i] = v.getFloat64(p + 22, true);
    const b = v.getUint8(p + 14);
    ret[i] = b & 15;
    nret[i] = b >> 4;
    const c = v.getUint8(p + 15);
    flags[i] = c & 15;
    chan[i] = (c >> 4) & 3;
    dir[i] = (c >> 6) & 1;
    edge[i] = c >> 7;
    cls[i] = v.getUint8(p + 16);
    user[i] = v.getUint8(p + 17);
    // LAS 1.4 Table 13: scan angle in 0.006° increments.
    angle[i] = v.getInt16(p + 18, true) * 0.006;
    psid[i] = v.getUint16(p + 20, true);
  }
}

/**
 * When 1/scale is a whole number (0.01, 0.001, 0.00025 …) and offset/scale is too, a coordinate is
 * the exact rational (X + offset/scale) / (1/scale); one IEEE division then gives the double
 * nearest the decimal value (848899.7, not 848899.7000000001 from X × 0.01). Otherwise X·scale + offset.
 */
export function exactDivisor(scale: number, offset: number): { divisor: number; shift: number } | null {
  const inv = 1 / scale;
  const d = Math.round(inv);
  if (!(d >= 1 && d <= 1e12 && Math.abs(inv - d) <= 1e-9 * d)) return null;
  const shift = Math.round(offset * d);
  if (!(Math.abs(offset * d - shift) <= 1e-6 && Math.abs(shift) + 2 ** 31 < 2 ** 53)) return null;
  return { divisor: d, shift };
}

function copyU16(v: DataView, at: number, rl: number, end: number, out: Uint16Array, start: number): void {
  for (let p = at, i = start; p < end; p += rl, i++) out[i] = v.getUint16(p, true);
}

function decodeWave(v: DataView, at: number, rl: number, end: number, cloud: PointCloud, start: number): void {
  const e = cloud.extra;
  const idx = e.wave_packet_index as Uint8Array;
  const off = e.wave_byte_offset as BigUint64Array;
  const size = e.wave_packet_size as Uint32Array;
  const loc = e.wave_return_location_ps as Float32Array;
  const dx = e.wave_dx as Float32Array;
  const dy = e.wave_dy as Float32Array;
  const dz = e.wave_dz as Float32Array;
  for (let p = at, i = start; p < end; p += rl, i++) {
    idx[i] = v.getUint8(p);
    off[i] = v.getBigUint64(p + 1, true);
    size[i] = v.getUint32(p + 9, true);
    loc[i] = v.getFloat32(p + 13, true);
    dx[i] = v.getFloat32(p + 17, true);
    dy[i] = v.getFloat32(p + 21, true);
    dz[i] = v.getFloat32(p + 25, true);
  }
}

function readScalar(v: DataView, p: number, scalar: number): number {
  switch (scalar) {
    case 1: return v.getUint8(p);
    case 2: return v.getInt8(p);
    case 3: return v.getUint16(p, true);
    case 4: return v.getInt16(p, true);
    case 5: return v.getUint32(p, true);
    case 6: return v.getInt32(p, true);
    case 7: return Number(v.getBigUint64(p, true));
    case 8: return Number(v.getBigInt64(p, true));
    case 9: return v.getFloat32(p, true);
    default: return v.getFloat64(p, true);
  }
}

function decodeExtra(v: DataView, c: ExtraColumn, rl: number, end: number, out: AttributeArray, start: number): void {
  if (c.scaled) {
    const f = out as Float64Array;
    for (let p = c.recordOffset, i = start; p < end; p += rl, i++) f[i] = readScalar(v, p, c.scalar) * c.scale + c.offset;
    return;
  }
  if (c.scalar === 7) {
    const f = out as BigUint64Array;
    for (let p = c.recordOffset, i = start; p < end; p += rl, i++) f[i] = v.getBigUint64(p, true);
    return;
  }
  if (c.scalar === 8) {
    const f = out as BigInt64Array;
    for (let p = c.recordOffset, i = start; p < end; p += rl, i++) f[i] = v.getBigInt64(p, true);
    return;
  }
  const f = out as Float64Array; // any numeric typed array; assignment converts
  for (let p = c.recordOffset, i = start; p < end; p += rl, i++) f[i] = readScalar(v, p, c.scalar);
}
