import type { LasVlr } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';

/**
 * LAS public header block, VLR and EVLR layouts (ASPRS LAS 1.4 R15 §2.4–2.6; 1.0–1.3 headers are
 * prefixes of the 1.4 one: 227 B up to 1.2, 235 B in 1.3, 375 B in 1.4).
 */
export interface LasHeader {
  versionMajor: number;
  versionMinor: number;
  fileSourceId: number;
  globalEncoding: number;
  systemId: string;
  software: string;
  creationDay: number;
  creationYear: number;
  headerSize: number;
  offsetToPointData: number;
  vlrCount: number;
  /** Point data record format with the compression bits (6, 7) removed. */
  pointFormat: number;
  /** Raw point-format byte; bit 7 (or 6) set means LAZ. */
  pointFormatByte: number;
  recordLength: number;
  /** Point count to use: the 64-bit field for 1.4 (legacy field when that one is 0), else legacy. */
  pointCount: number;
  legacyPointCount: number;
  scale: [number, number, number];
  offset: [number, number, number];
  min: [number, number, number];
  max: [number, number, number];
  startOfWaveform: number;
  startOfFirstEvlr: number;
  evlrCount: number;
}

/** Bytes of the header that must exist for each minor version. */
export function minimumHeaderSize(versionMinor: number): number {
  return versionMinor >= 4 ? 375 : versionMinor === 3 ? 235 : 227;
}

/** Record sizes of the point data record formats 0–10 (LAS 1.4 R15 Tables 7–17). */
export const POINT_FORMAT_SIZES = [20, 28, 26, 34, 57, 63, 30, 36, 38, 59, 67] as const;

const decoder = new TextDecoder('latin1');

/** Fixed-width, NUL-padded text field. */
export function readText(bytes: Uint8Array, start: number, length: number): string {
  let end = start;
  while (end < start + length && bytes[end] !== 0) end++;
  return decoder.decode(bytes.subarray(start, end)).trimEnd();
}

/** A uint64 as a JS number; throws when it cannot be exact (no real file gets near 2^53). */
function u64(view: DataView, at: number, what: string, file: string): number {
  const v = view.getBigUint64(at, true);
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) {
    throw new XylemapError(`LAS header field "${what}" is ${v}, too large to be real`, {
      file,
      hint: 'the header is damaged; re-export the file',
    });
  }
  return Number(v);
}

/**
 * Parse and validate the public header block. `bytes` must hold at least the first 375 bytes of
 * the file (or the whole file if shorter); `fileSize` is the file's length in bytes.
 * @throws XylemapError for a wrong signature, truncated header, or impossible fields.
 */
export function parseLasHeader(bytes: Uint8Array, fileSize: number, file: string): LasHeader {
  const bad = (problem: string, hint = 'the file is not a valid LAS file; re-export it from the scanner software') =>
    new XylemapError(problem, { file, hint });
  if (bytes.length < 4 || readText(bytes, 0, 4) !== 'LASF') throw bad('not a LAS file (signature "LASF" missing)');
  if (bytes.length < 227) throw bad(`truncated LAS header: ${bytes.length} bytes, at least 227 needed`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const versionMajor = bytes[24];
  const versionMinor = bytes[25];
  if (versionMajor !== 1 || versionMinor > 4) {
    throw bad(`unsupported LAS version ${versionMajor}.${versionMinor} (supported: 1.0–1.4)`);
  }
  const headerSize = view.getUint16(94, true);
  const need = minimumHeaderSize(versionMinor);
  if (bytes.length < need) throw bad(`truncated LAS ${versionMajor}.${versionMinor} header: ${bytes.length} bytes, ${need} needed`);
  if (headerSize < need) {
    throw bad(`LAS ${versionMajor}.${versionMinor} header size field is ${headerSize}, at least ${need} expected`);
  }
  const offsetToPointData = view.getUint32(96, true);
  if (offsetToPointData < headerSize || offsetToPointData > fileSize) {
    throw bad(`offset to point data is ${offsetToPointData}, outside the file (header ${headerSize} B, file ${fileSize} B)`);
  }
  const pointFormatByte = bytes[104];
  const pointFormat = pointFormatByte & 0x3f;
  if (pointFormat > 10) {
    throw bad(`unsupported point data record format ${pointFormat} (LAS defines 0–10)`, 'convert the file to a standard LAS point format');
  }
  const recordLength = view.getUint16(105, true);
  if (recordLength < POINT_FORMAT_SIZES[pointFormat]) {
    throw bad(`record length ${recordLength} is shorter than the ${POINT_FORMAT_SIZES[pointFormat]} bytes of point format ${pointFormat}`);
  }
  const legacyPointCount = view.getUint32(107, true);
  const f64 = (at: number) => view.getFloat64(at, true);
  const scale: [number, number, number] = [f64(131), f64(139), f64(147)];
  const offset: [number, number, number] = [f64(155), f64(163), f64(171)];
  for (let k = 0; k < 3; k++) {
    if (!(scale[k] !== 0 && Number.isFinite(scale[k]))) throw bad(`scale factor ${'xyz'[k]} is ${scale[k]}, must be finite and non-zero`);
    if (!Number.isFinite(offset[k])) throw bad(`offset ${'xyz'[k]} is ${offset[k]}, must be finite`);
  }
  let pointCount = legacyPointCount;
  let startOfWaveform = 0;
  let startOfFirstEvlr = 0;
  let evlrCount = 0;
  if (versionMinor >= 3) startOfWaveform = u64(view, 227, 'start of waveform data', file);
  if (versionMinor >= 4) {
    startOfFirstEvlr = u64(view, 235, 'start of first EVLR', file);
    evlrCount = view.getUint32(243, true);
    const count64 = u64(view, 247, 'number of point records', file);
    // LAS 1.4 §2.4: the 64-bit count is authoritative; some writers leave it 0 for legacy formats.
    pointCount = count64 !== 0 ? count64 : legacyPointCount;
  }
  return {
    versionMajor,
    versionMinor,
    fileSourceId: view.getUint16(4, true),
    globalEncoding: view.getUint16(6, true),
    systemId: readText(bytes, 26, 32),
    software: readText(bytes, 58, 32),
    creationDay: view.getUint16(90, true),
    creationYear: view.getUint16(92, true),
    headerSize,
    offsetToPointData,
    vlrCount: view.getUint32(100, true),
    pointFormat,
    pointFormatByte,
    recordLength,
    pointCount,
    legacyPointCount,
    scale,
    offset,
    max: [f64(179), f64(195), f64(211)],
    min: [f64(187), f64(203), f64(219)],
    startOfWaveform,
    startOfFirstEvlr,
    evlrCount,
  };
}

/** True when the header says the point data are LASzip-compressed (bit 7, or bit 6 in old LAZ). */
export function headerSaysCompressed(header: LasHeader): boolean {
  return (header.pointFormatByte & 0xc0) !== 0;
}

/**
 * Parse the VLRs that sit between the header and the point data.
 * @param bytes the file bytes from 0 to at least `offsetToPointData`.
 */
export function parseVlrs(bytes: Uint8Array, header: LasHeader, file: string): LasVlr[] {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const vlrs: LasVlr[] = [];
  let at = header.headerSize;
  for (let i = 0; i < header.vlrCount; i++) {
    if (at + 54 > header.offsetToPointData) {
      throw new XylemapError(
        `VLR ${i + 1} of ${header.vlrCount} runs past the start of the point data (byte ${header.offsetToPointData})`,
        { file, hint: 'the header or its VLRs are damaged; re-export the file' },
      );
    }
    const length = view.getUint16(at + 20, true);
    const end = at + 54 + length;
    if (end > header.offsetToPointData) {
      throw new XylemapError(`VLR ${i + 1} ("${readText(bytes, at + 2, 16)}") is ${length} B long and runs past the point data`, {
        file,
        hint: 'the header or its VLRs are damaged; re-export the file',
      });
    }
    vlrs.push({
      userId: readText(bytes, at + 2, 16),
      recordId: view.getUint16(at + 18, true),
      description: readText(bytes, at + 22, 32),
      data: bytes.slice(at + 54, end),
      extended: false,
    });
    at = end;
  }
  return vlrs;
}

/**
 * Parse EVLRs from a byte block that starts at the file's `startOfFirstEvlr`.
 * Tolerant: a damaged EVLR area stops the parse (the points are still good) and is reported.
 */
export function parseEvlrs(bytes: Uint8Array, count: number): { evlrs: LasVlr[]; complete: boolean } {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const evlrs: LasVlr[] = [];
  let at = 0;
  for (let i = 0; i < count; i++) {
    if (at + 60 > bytes.length) return { evlrs, complete: false };
    const length = view.getBigUint64(at + 20, true);
    if (length > BigInt(bytes.length - at - 60)) return { evlrs, complete: false };
    const end = at + 60 + Number(length);
    evlrs.push({
      userId: readText(bytes, at + 2, 16),
      recordId: view.getUint16(at + 18, true),
      description: readText(bytes, at + 28, 32),
      data: bytes.slice(at + 60, end),
      extended: true,
    });
    at = end;
  }
  return { evlrs, complete: true };
}
