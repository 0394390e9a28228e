import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import type { LasVlr, PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { headerSaysCompressed, parseEvlrs, parseLasHeader, parseVlrs, POINT_FORMAT_SIZES, readText, type LasHeader } from './las-header.js';
import { hasUndescribedBytes, parseExtraBytesFields } from './las-extra-bytes.js';
import { allocateLasCloud, buildLayout, decodeRecords, type LasLayout } from './las-points.js';
import { findLaszipVlr, parseLaszipVlr, refuseUnsupportedLaz } from './laszip-vlr.js';
import { decodeLazInto } from './laz-decode.js';
import { BLOCK_RECORDS, decodeParallel, decodeThreads } from './las-parallel.js';

/** EVLR payloads above this size (waveform data) are skipped, not kept in memory. */
const MAX_EVLR_PAYLOAD = 64 * 1024 * 1024;

function readAt(fd: number, position: number, length: number): Uint8Array {
  const out = new Uint8Array(length);
  let done = 0;
  while (done < length) {
    const n = readSync(fd, out, done, length - done, position + done);
    if (n === 0) break;
    done += n;
  }
  return done === length ? out : out.subarray(0, done);
}

export interface LasReadOptions {
  /** Decode threads for large uncompressed files (default: XYLEMAP_IO_THREADS, else 1). */
  threads?: number;
}

/**
 * Read a LAS or LAZ file (compression detected from the header, never from the name).
 * Points are read block by block into preallocated arrays, so the peak memory is the final
 * arrays plus one block (LAZ: plus the compressed bytes).
 * @throws XylemapError for damaged, truncated or unsupported files.
 */
export async function readLas(path: string, options: LasReadOptions = {}): Promise<PointCloud> {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (e) {
    throw new XylemapError(`cannot open file: ${(e as Error).message}`, { file: path, hint: 'check the path and permissions' });
  }
  try {
    return await readLasFd(fd, path, options);
  } finally {
    closeSync(fd);
  }
}

async function readLasFd(fd: number, path: string, options: LasReadOptions): Promise<PointCloud> {
  const fileSize = fstatSync(fd).size;
  const header = parseLasHeader(readAt(fd, 0, Math.min(fileSize, 375)), fileSize, path);
  const prefix = readAt(fd, 0, header.offsetToPointData);
  const vlrs = parseVlrs(prefix, header, path);
  const warnings: string[] = [];
  const evlrs = readEvlrs(fd, header, fileSize, warnings);
  const laszip = findLaszipVlr(vlrs);
  const compressed = headerSaysCompressed(header) || laszip !== undefined;
  const fields = parseExtraBytesFields([...vlrs, ...evlrs]);
  const base = POINT_FORMAT_SIZES[header.pointFormat];
  const extraWidth = header.recordLength - base;
  const described = fields.reduce((n, f) => Math.max(n, f.byteOffset + f.byteSize), 0);
  if (described > extraWidth) {
    warnings.push(`the Extra Bytes VLR describes ${described} bytes per point but records have only ${extraWidth}; fields past the record are ignored`);
  }
  const layout = buildLayout(header.pointFormat, header.recordLength, header.scale, header.offset, fields, hasUndescribedBytes(fields, extraWidth));
  const count = header.pointCount;
  let cloud: PointCloud;
  if (compressed) {
    if (!laszip) {
      throw new XylemapError('the header marks the points as compressed (LAZ) but the LASzip VLR is missing', {
        file: path,
        hint: 'the file is damaged; re-export it',
      });
    }
    const info = parseLaszipVlr(laszip, path);
    refuseUnsupportedLaz(info, header.pointFormat, path);
    checkChunkTable(fd, header, info.chunkSize, fileSize, path);
    // Real LAZ files need bytes per point, not points per byte (≥ 2.07 B/point among the reference
    // files, plane.laz); a count of more than 100 points per compressed byte is a damaged header.
    if (count > 100 * Math.max(1, fileSize - header.offsetToPointData)) {
      throw new XylemapError(`header says ${count} points, impossible for ${fileSize - header.offsetToPointData} bytes of LAZ data`, {
        file: path,
        hint: 'the header is damaged; re-export the file',
      });
    }
    cloud = allocate(layout, count, path);
    await decodeLazInto(fd, fileSize, header, layout, cloud, path);
  } else {
    const available = Math.floor((fileSize - header.offsetToPointData) / header.recordLength);
    if (count > available) {
      throw new XylemapError(`header says ${count} points but the file holds only ${available} (truncated file?)`, {
        file: path,
        hint: 'the file is truncated or its header is wrong; copy or export it again',
      });
    }
    const threads = decodeThreads(count, options.threads);
    cloud = allocate(layout, count, path, threads > 1);
    if (threads > 1) await decodeParallel(path, header.offsetToPointData, layout, cloud, threads);
    else readUncompressed(fd, header, layout, cloud, path);
  }
  cloud.source = {
    format: compressed ? 'laz' : 'las',
    path,
    lasVersion: `${header.versionMajor}.${header.versionMinor}`,
    pointFormat: header.pointFormat,
    recordLength: header.recordLength,
    scale: header.scale,
    offset: header.offset,
    headerBounds: { min: header.min, max: header.max },
    headerPointCount: count,
    globalEncoding: header.globalEncoding,
    systemId: header.systemId,
    software: header.software,
    creationDay: header.creationDay,
    creationYear: header.creationYear,
    fileSourceId: header.fileSourceId,
    vlrs,
    evlrs,
    extraBytesFields: fields,
    extraBytesPerRecord: extraWidth,
    compressed,
    warnings,
  };
  return cloud;
}

function allocate(layout: LasLayout, count: number, path: string, shared = false): PointCloud {
  try {
    return allocateLasCloud(layout, count, shared);
  } catch (e) {
    if (e instanceof RangeError) {
      throw new XylemapError(`not enough memory for ${count} points (${(e as Error).message})`, {
        file: path,
        hint: 'thin or tile the cloud first, or run on a machine with more memory',
      });
    }
    throw e;
  }
}

function readUncompressed(fd: number, header: LasHeader, layout: LasLayout, cloud: PointCloud, path: string): void {
  const rl = header.recordLength;
  const block = new Uint8Array(BLOCK_RECORDS * rl);
  for (let start = 0; start < cloud.count; start += BLOCK_RECORDS) {
    const n = Math.min(BLOCK_RECORDS, cloud.count - start);
    const want = n * rl;
    let done = 0;
    while (done < want) {
      const got = readSync(fd, block, done, want - done, header.offsetToPointData + start * rl + done);
      if (got === 0) throw new XylemapError('file ended inside the point data', { file: path, hint: 'the file is truncated; copy or export it again' });
      done += got;
    }
    decodeRecords(block, 0, n, cloud, start, layout);
  }
}

/** EVLRs (LAS 1.4): read header by header; big payloads (waveforms) are skipped, damage is a warning. */
function readEvlrs(fd: number, header: LasHeader, fileSize: number, warnings: string[]): LasVlr[] {
  if (header.versionMinor < 4 || header.evlrCount === 0) return [];
  if (!(header.startOfFirstEvlr > 0 && header.startOfFirstEvlr + 60 <= fileSize)) {
    warnings.push(`header lists ${header.evlrCount} EVLR(s) at byte ${header.startOfFirstEvlr}, outside the file; ignored`);
    return [];
  }
  const out: LasVlr[] = [];
  let at = header.startOfFirstEvlr;
  for (let i = 0; i < header.evlrCount; i++) {
    const head = readAt(fd, at, 60);
    if (head.length < 60) {
      warnings.push(`EVLR ${i + 1} of ${header.evlrCount} is cut off by the end of the file; ignored`);
      break;
    }
    const length = Number(new DataView(head.buffer).getBigUint64(20, true));
    if (!(at + 60 + length <= fileSize)) {
      warnings.push(`EVLR ${i + 1} of ${header.evlrCount} runs past the end of the file; ignored`);
      break;
    }
    if (length > MAX_EVLR_PAYLOAD) {
      warnings.push(`EVLR ${i + 1} ("${readText(head, 2, 16)}" ${new DataView(head.buffer).getUint16(18, true)}) holds ${length} B; not kept`);
    } else {
      const whole = new Uint8Array(60 + length);
      whole.set(head);
      whole.set(readAt(fd, at + 60, length), 60);
      out.push(...parseEvlrs(whole, 1).evlrs);
    }
    at += 60 + length;
  }
  return out;
}

/**
 * Cheap consistency check of a chunked LAZ without decoding: the chunk table's header (its
 * offset is the int64 at the start of the point data, or the file's last 8 bytes when that is −1)
 * gives the chunk count; with fixed-size chunks it bounds the point count.
 */
function checkChunkTable(fd: number, header: LasHeader, chunkSize: number, fileSize: number, path: string): void {
  if (header.pointCount === 0) return;
  const fail = (problem: string) =>
    new XylemapError(problem, { file: path, hint: 'the LAZ file is truncated or damaged; copy or export it again' });
  if (header.offsetToPointData + 8 > fileSize) throw fail('file ends before the LAZ chunk table pointer');
  let tableAt = Number(new DataView(readAt(fd, header.offsetToPointData, 8).buffer).getBigInt64(0, true));
  if (tableAt === -1 && fileSize >= 8) tableAt = Number(new DataView(readAt(fd, fileSize - 8, 8).buffer).getBigInt64(0, true));
  if (!(tableAt >= header.offsetToPointData + 8 && tableAt + 8 <= fileSize)) {
    throw fail(`LAZ chunk table pointer ${tableAt} lies outside the file (${fileSize} B)`);
  }
  const view = new DataView(readAt(fd, tableAt, 8).buffer);
  const numChunks = view.getUint32(4, true);
  if (chunkSize !== 0xffffffff && chunkSize > 0 && header.pointCount > numChunks * chunkSize) {
    throw fail(`header says ${header.pointCount} points but the LAZ chunk table has room for only ${numChunks * chunkSize}`);
  }
}
