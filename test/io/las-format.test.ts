/**
 * Low-level LAS pieces against the ASPRS LAS 1.4 R15 specification: header sizes (§2.4, Table 3),
 * record sizes (Tables 7–17), the Extra Bytes descriptor (§2.5.4, Table 24), and the LASzip VLR
 * fields laz-perf's io_tests.cpp asserts for point10.las.laz.
 */
import { closeSync, openSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { minimumHeaderSize, parseLasHeader, POINT_FORMAT_SIZES } from '../../core/io/las-header.js';
import { encodeExtraBytesVlr, extraBytesShape, parseExtraBytesFields } from '../../core/io/las-extra-bytes.js';
import { exactDivisor } from '../../core/io/las-points.js';
import { refuseUnsupportedLaz, type LaszipInfo } from '../../core/io/laszip-vlr.js';
import { geoKeys } from '../../core/io/crs.js';
import { countNewlines, readLines } from '../../core/io/line-reader.js';
import { XylemapError } from '../../core/util/errors.js';
import { ref, tempDir } from './shared-data.js';

describe('minimumHeaderSize', () => {
  it('is 227 bytes up to LAS 1.2, 235 in 1.3 and 375 in 1.4 (LAS 1.4 R15 §2.4)', () => {
    expect([0, 1, 2, 3, 4].map(minimumHeaderSize)).toEqual([227, 227, 227, 235, 375]);
  });
});

describe('POINT_FORMAT_SIZES', () => {
  it('lists the record sizes of formats 0–10 from LAS 1.4 R15 Tables 7–17', () => {
    expect([...POINT_FORMAT_SIZES]).toEqual([20, 28, 26, 34, 57, 63, 30, 36, 38, 59, 67]);
  });
});

describe('parseLasHeader', () => {
  const bytes = readFileSync(ref('laspy/simple.las'));
  it('parses the simple.las header laspy asserts (1.2, pf 3, 34 B, 1065 points, offset to data 227)', () => {
    // laspy tests/test_reading_1_2.py::test_header
    const h = parseLasHeader(bytes.subarray(0, 375), bytes.length, 'simple.las');
    expect([h.versionMinor, h.pointFormat, h.recordLength, h.pointCount, h.offsetToPointData]).toEqual([2, 3, 34, 1065, 227]);
  });

  it('refuses a header cut before 227 bytes', () => {
    expect(() => parseLasHeader(bytes.subarray(0, 200), bytes.length, 'cut.las')).toThrow(/truncated LAS header: 200 bytes/);
  });

  it('refuses a zero or NaN scale factor', () => {
    const b = Uint8Array.from(bytes.subarray(0, 375));
    new DataView(b.buffer).setFloat64(139, NaN, true);
    expect(() => parseLasHeader(b, bytes.length, 'nan.las')).toThrow(XylemapError);
    new DataView(b.buffer).setFloat64(139, 0, true);
    expect(() => parseLasHeader(b, bytes.length, 'zero.las')).toThrow(/scale factor y is 0/);
  });
});

describe('extraBytesShape', () => {
  it('maps data types 1–10 to scalars, 11–20 to pairs and 21–30 to triples (LAS 1.4 Table 24)', () => {
    expect(extraBytesShape(3)).toEqual({ scalar: 3, elements: 1 });
    expect(extraBytesShape(12)).toEqual({ scalar: 2, elements: 2 });
    expect(extraBytesShape(23)).toEqual({ scalar: 3, elements: 3 });
    expect(extraBytesShape(0)).toBeNull();
    expect(extraBytesShape(31)).toBeNull();
  });
});

describe('parseExtraBytesFields', () => {
  it('reads back what encodeExtraBytesVlr writes, offsets laid out in order', () => {
    const data = encodeExtraBytesVlr([
      { name: 'segment_id', dataType: 6 },
      { name: 'gap', dataType: 0, size: 3 },
      { name: 'distance_m', dataType: 9, scale: 0.001, offset: 2 },
    ]);
    expect(data.length).toBe(3 * 192); // 192 bytes per descriptor (Table 24)
    const fields = parseExtraBytesFields([{ userId: 'LASF_Spec', recordId: 4, description: '', data, extended: false }]);
    expect(fields.map((f) => [f.name, f.dataType, f.byteOffset, f.byteSize])).toEqual([
      ['segment_id', 6, 0, 4],
      ['gap', 0, 4, 3],
      ['distance_m', 9, 7, 4],
    ]);
    expect([fields[2].scale, fields[2].offset]).toEqual([[0.001], [2]]);
  });

  it('merges the two Extra Bytes VLRs of append-bug.laz in file order', async () => {
    // PDAL LasReaderTest.cpp multi_eb (same layout): Deviation uint16 then confidence uint8
    const { readCloud } = await import('../../core/io/read-cloud.js');
    const c = await readCloud(ref('laspy/append-bug.laz'));
    expect(c.source.extraBytesFields!.map((f) => [f.name, f.dataType, f.byteOffset])).toEqual([
      ['Deviation', 3, 0],
      ['confidence', 1, 2],
    ]);
  });
});

describe('exactDivisor', () => {
  it('uses an exact division for decimal scales and whole-step offsets, and gives up otherwise', () => {
    expect(exactDivisor(0.01, 0)).toEqual({ divisor: 100, shift: 0 });
    expect(exactDivisor(0.00025, 477995)).toEqual({ divisor: 4000, shift: 1911980000 });
    expect(exactDivisor(1.16451354e-6, 1692500.352)).toBeNull(); // test1_4.las scale (laspy README header)
    // the point: 84889970 / 100 is the double nearest 848899.70, unlike 84889970 × 0.01
    expect(84889970 / 100).toBe(848899.7);
    expect(84889970 * 0.01).not.toBe(848899.7);
  });
});

describe('refuseUnsupportedLaz', () => {
  const base: LaszipInfo = { compressor: 2, coder: 0, version: '2.2r0', options: 0, chunkSize: 50000, items: [{ type: 6, size: 20, version: 2 }] };
  it('accepts the chunked POINT10 v2 layout io_tests.cpp asserts for point10.las.laz', () => {
    expect(() => refuseUnsupportedLaz(base, 0, 'ok.laz')).not.toThrow();
  });
  it('refuses compressor 1, waveform formats and item version 4 with a conversion hint', () => {
    const cases: [LaszipInfo, number, RegExp][] = [
      [{ ...base, compressor: 1 }, 3, /compressor 1/],
      [base, 9, /point format 9/],
      [{ ...base, items: [{ type: 10, size: 30, version: 4 }] }, 6, /item version 4/],
      [{ ...base, items: [{ type: 99, size: 1, version: 1 }] }, 0, /item type 99/],
    ];
    for (const [info, pf, re] of cases) {
      try {
        refuseUnsupportedLaz(info, pf, 'x.laz');
        expect.unreachable();
      } catch (e) {
        expect((e as XylemapError).oneLine()).toMatch(re);
        expect((e as XylemapError).hint).toMatch(/uncompressed LAS/);
      }
    }
  });
});

describe('geoKeys', () => {
  it('reads short keys and ASCII citations of a GeoTIFF key directory (GeoTIFF 1.0 §2.4)', () => {
    // header 1,1,0,2 then key 3072 (ProjectedCSType) = 25832 inline, key 3073 (PCSCitation) in 34737 at 0, 5 chars
    const dir = new Uint8Array(new Uint16Array([1, 1, 0, 2, 3072, 0, 1, 25832, 3073, 34737, 5, 0]).buffer);
    const ascii = new TextEncoder().encode('UTM32|');
    const keys = geoKeys(dir, ascii);
    expect(keys.get(3072)).toBe(25832);
    expect(keys.get(3073)).toBe('UTM32');
  });
});

describe('readLines', () => {
  it('yields lines across 1 MB chunk borders without their CR LF endings', () => {
    const path = join(tempDir(), 'lines.txt');
    const long = 'x'.repeat(700_000);
    writeFileSync(path, `${long}\r\n${long}b\nlast`);
    const fd = openSync(path, 'r');
    try {
      const lines = [...readLines(fd)];
      expect(lines.map((l) => l.length)).toEqual([700_000, 700_001, 4]);
      expect(lines[1].endsWith('b')).toBe(true);
      expect(countNewlines(fd)).toBe(2);
    } finally {
      closeSync(fd);
    }
  });
});
