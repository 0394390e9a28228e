import { readSync } from 'node:fs';
import { createLazPerf, type LazPerf } from 'laz-perf';
import type { PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import type { LasHeader } from './las-header.js';
import { decodeRecords, type LasLayout } from './las-points.js';

/** Records decoded into the WASM staging buffer before each column pass. */
const BLOCK_RECORDS = 65_536;

let lazPerf: Promise<LazPerf> | undefined;

/** The laz-perf WASM module, instantiated once per process. */
export function loadLazPerf(): Promise<LazPerf> {
  lazPerf ??= createLazPerf();
  return lazPerf;
}

/**
 * Decode the points of a LAZ file with laz-perf into `cloud` (already allocated for
 * `header.pointCount` points). The compressed file is read straight into the WASM heap (no second
 * copy in JS), laz-perf writes records into a staging block inside the heap, and the column
 * decoder reads them from there.
 * The caller must have refused the variants laz-perf cannot decode (see `refuseUnsupportedLaz`).
 */
export async function decodeLazInto(fd: number, fileSize: number, header: LasHeader, layout: LasLayout, cloud: PointCloud, path: string): Promise<void> {
  if (cloud.count === 0) return;
  const lp = await loadLazPerf();
  const rl = header.recordLength;
  const filePtr = lp._malloc(fileSize);
  const blockPtr = lp._malloc(BLOCK_RECORDS * rl);
  const reader = new lp.LASZip();
  try {
    let done = 0;
    while (done < fileSize) {
      const n = readSync(fd, lp.HEAPU8, filePtr + done, fileSize - done, done);
      if (n === 0) break;
      done += n;
    }
    try {
      reader.open(filePtr, fileSize);
    } catch (e) {
      lazPerf = undefined;
      throw new XylemapError(`the LAZ decoder could not open the file (${describe(e)})`, {
        file: path,
        hint: 'the LAZ file is damaged or uses an unsupported variant; convert it to uncompressed LAS',
      });
    }
    if (reader.getPointLength() !== rl) {
      throw new XylemapError(`LAZ decoder reports ${reader.getPointLength()}-byte records, header says ${rl}`, {
        file: path,
        hint: 'the LAZ file is damaged; re-compress it from the original LAS',
      });
    }
    for (let start = 0; start < cloud.count; start += BLOCK_RECORDS) {
      const n = Math.min(BLOCK_RECORDS, cloud.count - start);
      try {
        for (let k = 0; k < n; k++) reader.getPoint(blockPtr + k * rl);
      } catch (e) {
        // The WASM heap may be left inconsistent: the next file gets a fresh module.
        lazPerf = undefined;
        throw new XylemapError(`the LAZ decoder failed near point ${start} of ${cloud.count} (${describe(e)})`, {
          file: path,
          hint: 'the LAZ file is truncated or damaged; copy or export it again',
        });
      }
      // HEAPU8 may be replaced when the heap grows, so take it after decoding the block.
      decodeRecords(lp.HEAPU8, blockPtr, n, cloud, start, layout);
    }
  } finally {
    reader.delete();
    lp._free(blockPtr);
    lp._free(filePtr);
  }
}

function describe(e: unknown): string {
  const text = e instanceof Error ? e.message : String(e);
  // Emscripten's uncatchable-exception text is long and says nothing to a user.
  return /Exception catching is disabled/.test(text) ? 'internal decoder exception' : text;
}
