import type { LasVlr } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';

/**
 * The LASzip VLR (user "laszip encoded", record 22204) that every LAZ file carries. Its layout is
 * public (LASzip's `laszip.hpp` documentation): compressor, coder, version, options, chunk size,
 * special EVLR fields and a list of (type, size, version) items.
 */
export const LASZIP_USER = 'laszip encoded';
export const LASZIP_RECORD = 22204;

export interface LaszipInfo {
  /** 0 none, 1 point-wise, 2 point-wise chunked, 3 layered chunked (LAS 1.4 formats 6–10). */
  compressor: number;
  coder: number;
  version: string;
  options: number;
  /** Points per chunk; 0xFFFFFFFF means variable-size chunks (e.g. COPC). */
  chunkSize: number;
  items: { type: number; size: number; version: number }[];
}

/** Item type codes of LASzip. */
export const LASZIP_ITEM = {
  BYTE: 0,
  POINT10: 6,
  GPSTIME11: 7,
  RGB12: 8,
  WAVEPACKET13: 9,
  POINT14: 10,
  RGB14: 11,
  RGBNIR14: 12,
  WAVEPACKET14: 13,
  BYTE14: 14,
} as const;

export function findLaszipVlr(vlrs: LasVlr[]): LasVlr | undefined {
  return vlrs.find((v) => v.userId === LASZIP_USER && v.recordId === LASZIP_RECORD);
}

export function parseLaszipVlr(vlr: LasVlr, file: string): LaszipInfo {
  const d = vlr.data;
  if (d.length < 34) {
    throw new XylemapError(`LASzip VLR is ${d.length} bytes, at least 34 expected`, {
      file,
      hint: 'the LAZ file is damaged; re-export or re-compress it',
    });
  }
  const view = new DataView(d.buffer, d.byteOffset, d.byteLength);
  const numItems = view.getUint16(32, true);
  if (d.length < 34 + 6 * numItems) {
    throw new XylemapError(`LASzip VLR lists ${numItems} items but holds only ${d.length} bytes`, {
      file,
      hint: 'the LAZ file is damaged; re-export or re-compress it',
    });
  }
  const items = [];
  for (let i = 0; i < numItems; i++) {
    const at = 34 + 6 * i;
    items.push({ type: view.getUint16(at, true), size: view.getUint16(at + 2, true), version: view.getUint16(at + 4, true) });
  }
  return {
    compressor: view.getUint16(0, true),
    coder: view.getUint16(2, true),
    version: `${d[4]}.${d[5]}r${view.getUint16(6, true)}`,
    options: view.getUint32(8, true),
    chunkSize: view.getUint32(12, true),
    items,
  };
}

const CONVERT_HINT = 'convert it with a LAS 1.4-capable tool to uncompressed LAS (or re-compress it with a current LASzip) and read that';

/**
 * Refuse the LAZ variants laz-perf 0.0.7 cannot decode, BEFORE laz-perf sees them:
 * point-wise "compressor 1" makes it abort the process (an uncatchable WASM abort), waveform
 * formats 4/5/9/10 make it fail, and item version 4 is silently decoded to wrong values.
 * Measured on the reference files in shared/data/las-reference (README §"Odd files" 9).
 */
export function refuseUnsupportedLaz(info: LaszipInfo, pointFormat: number, file: string): void {
  const refuse = (what: string): never => {
    throw new XylemapError(`unsupported LAZ variant: ${what}`, { file, hint: CONVERT_HINT });
  };
  if (info.compressor === 1) refuse(`point-wise compressor 1 (LASzip ${info.version}) is not supported by the LAZ decoder`);
  if (info.compressor !== 2 && info.compressor !== 3) refuse(`compressor ${info.compressor} is unknown (expected 2 or 3)`);
  if (info.coder !== 0) refuse(`coder ${info.coder} is unknown (expected 0, arithmetic)`);
  if (pointFormat === 4 || pointFormat === 5 || pointFormat === 9 || pointFormat === 10) {
    refuse(`point format ${pointFormat} carries waveform packets, which the LAZ decoder cannot read`);
  }
  for (const item of info.items) {
    if (item.type === LASZIP_ITEM.WAVEPACKET13 || item.type === LASZIP_ITEM.WAVEPACKET14) refuse('waveform packet items cannot be decoded');
    if (item.version > 3) refuse(`LASzip item version ${item.version} (item type ${item.type}) would be decoded to wrong values`);
    const known = Object.values(LASZIP_ITEM) as number[];
    if (!known.includes(item.type)) refuse(`LASzip item type ${item.type} is unknown`);
  }
}
