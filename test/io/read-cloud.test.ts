/**
 * Format sniffing and bad input. The LAS layout facts used to damage files on purpose come from the
 * ASPRS LAS 1.4 R15 specification (Table 3: signature at 0, version at 24–25, offset to point data
 * at 96, point format at 104, record length at 105, legacy count at 107, 64-bit count at 247).
 * Fuzzing uses fast-check with fixed seeds so every run is the same.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readCloud, sniffFormat } from '../../core/io/read-cloud.js';
import { XylemapError } from '../../core/util/errors.js';
import { ref, tempDir } from './shared-data.js';

async function outcome(path: string): Promise<{ error?: XylemapError; count?: number }> {
  try {
    const c = await readCloud(path, { allowEmpty: true });
    return { count: c.count };
  } catch (e) {
    if (e instanceof XylemapError) return { error: e };
    throw e; // any other error type fails the property
  }
}

function write(dir: string, name: string, bytes: Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
}

/** The count a LAS header states, read straight from the bytes (LAS 1.4 R15 Table 3). */
function headerCount(b: Uint8Array): number {
  const v = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const legacy = v.getUint32(107, true);
  if (b[25] >= 4 && b.length >= 255) {
    const c64 = Number(v.getBigUint64(247, true));
    return c64 !== 0 ? c64 : legacy;
  }
  return legacy;
}

describe('sniffFormat', () => {
  it('recognises LAS by "LASF", PLY by "ply" and a newline, text otherwise, and binary junk', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    expect(sniffFormat(enc('LASF\x00\x00'))).toBe('las');
    expect(sniffFormat(enc('ply\nformat ascii 1.0\n'))).toBe('ply');
    expect(sniffFormat(enc('plywood 1 2\n'))).toBe('ascii');
    expect(sniffFormat(enc('1.0 2.0 3.0\n'))).toBe('ascii');
    expect(sniffFormat(Uint8Array.of(0x50, 0x4b, 3, 4, 0, 0))).toBe('binary');
    expect(sniffFormat(new Uint8Array(0))).toBe('empty');
  });
});

describe('readCloud', () => {
  it('names a missing file and says what to check', async () => {
    const e = await outcome('/nonexistent/scan.las');
    expect(e.error!.oneLine()).toBe('/nonexistent/scan.las: cannot read: no such file — check the path and permissions');
  });

  it('refuses a directory', async () => {
    const dir = tempDir();
    mkdirSync(join(dir, 'scan.las'));
    expect((await outcome(join(dir, 'scan.las'))).error!.message).toMatch(/is a directory/);
  });

  it('refuses an empty file', async () => {
    expect((await outcome(write(tempDir(), 'e.las', new Uint8Array(0)))).error!.message).toMatch(/empty/);
  });

  it('refuses a wrong signature without falling back to text', async () => {
    const b = readFileSync(ref('laspy/simple.las'));
    b[0] = 0x58; // "XASF"
    expect((await outcome(write(tempDir(), 'sig.las', b))).error!.message).toMatch(/unknown file format/);
  });

  it('refuses a header whose count is larger than the data', async () => {
    const b = readFileSync(ref('laspy/simple.las'));
    new DataView(b.buffer, b.byteOffset).setUint32(107, 1066, true);
    const e = (await outcome(write(tempDir(), 'count.las', b))).error!;
    expect(e.message).toBe('header says 1066 points but the file holds only 1065 (truncated file?)');
  });

  it('refuses an unsupported point format', async () => {
    const b = readFileSync(ref('laspy/simple.las'));
    b[104] = 11;
    expect((await outcome(write(tempDir(), 'pf.las', b))).error!.message).toMatch(/point data record format 11/);
  });

  it('refuses a LAZ whose chunk table says there are fewer points than the header', async () => {
    const b = readFileSync(ref('laz-perf/autzen_trim.laz'));
    new DataView(b.buffer, b.byteOffset).setUint32(107, 150001, true); // 3 chunks of 50 000 (io_tests.cpp: 110 000 points, 50 000-point chunks)
    expect((await outcome(write(tempDir(), 'count.laz', b))).error!.message).toMatch(/chunk table has room for only 150000/);
  });

  it('refuses a COPC LAZ (variable chunks) whose header count exceeds its points, and reads the next file normally', async () => {
    // PDAL CopcReaderTest.cpp TEST inspect: lone-star.copc.laz has 518 862 points
    const b = readFileSync(ref('pdal/lone-star.copc.laz'));
    new DataView(b.buffer, b.byteOffset).setBigUint64(247, 518_863n, true);
    const e = (await outcome(write(tempDir(), 'copc.laz', b))).error!;
    expect(e.oneLine()).toMatch(/copc\.laz: the LAZ decoder failed near point \d+ of 518863 .*truncated or damaged/);
    expect((await readCloud(ref('laspy/simple.laz'))).count).toBe(1065); // laspy test_reading_1_2.py
  });

  it('turns any truncation of a LAS file into the clear error or, past the points, the full count', async () => {
    const dir = tempDir();
    for (const name of ['laspy/simple.las', 'laspy/test1_4.las', 'liblas/TO_core_last_clip.las', 'laspy/1_4_w_evlr.las']) {
      const full = readFileSync(ref(name));
      const v = new DataView(full.buffer, full.byteOffset);
      const pointsEnd = v.getUint32(96, true) + headerCount(full) * v.getUint16(105, true);
      await fc.assert(
        fc.asyncProperty(fc.integer({ min: 0, max: full.length - 1 }), async (length) => {
          const r = await outcome(write(dir, 't.las', full.subarray(0, length)));
          if (length < pointsEnd) return r.error !== undefined;
          return r.count === headerCount(full);
        }),
        { numRuns: 60, seed: 42 },
      );
    }
  });

  it('never crashes, hangs or miscounts on randomly mutated LAS headers and VLRs', async () => {
    const dir = tempDir();
    for (const name of ['laspy/simple.las', 'laspy/test1_4.las', 'laspy/extrabytes.las', 'laspy/unregistered_extra_bytes.las']) {
      const original = readFileSync(ref(name));
      const prefix = new DataView(original.buffer, original.byteOffset).getUint32(96, true);
      const mutation = fc.array(fc.tuple(fc.integer({ min: 0, max: prefix - 1 }), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 4 });
      await fc.assert(
        fc.asyncProperty(mutation, async (edits) => {
          const b = Uint8Array.from(original);
          for (const [at, value] of edits) b[at] = value;
          const r = await outcome(write(dir, 'm.las', b));
          if (r.error) return r.error.oneLine().includes('m.las') && !r.error.oneLine().includes('\n');
          // A file that reads must yield exactly the count its header states.
          return r.count === headerCount(b);
        }),
        { numRuns: 80, seed: 7 },
      );
    }
  });
});
