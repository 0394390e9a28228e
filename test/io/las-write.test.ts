/**
 * LAS writer: exact round trips through our reader, header fields as the ASPRS LAS 1.4 R15
 * specification lays them out (Table 3 and §2.4), extra bytes per §2.5.4, and 0.1 mm kept at
 * georeferenced offsets of 5 000 000 m.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultOffset, encodeLas, lasOptionsLike, writeLas } from '../../core/io/las-write.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { createPointCloud, type PointCloud } from '../../core/types/point-cloud.js';
import { createRandom } from '../../core/util/random.js';
import { XylemapError } from '../../core/util/errors.js';
import { differingArrays, ref, tempDir } from './shared-data.js';

async function roundTrip(cloud: PointCloud, options: Parameters<typeof encodeLas>[1]): Promise<PointCloud> {
  const path = join(tempDir(), 'out.las');
  writeLas(path, cloud, options);
  return readCloud(path, { allowEmpty: true });
}

/** A generated cloud on a 0.1 mm lattice around a georeferenced origin. */
function latticeCloud(n: number, origin: [number, number, number], seed: number): PointCloud {
  const rnd = createRandom(seed);
  const q = 1e4; // steps per metre
  const axis = (o: number) => Float64Array.from({ length: n }, () => (Math.round(o * q) + rnd.int(300_000)) / q);
  return createPointCloud(axis(origin[0]), axis(origin[1]), axis(origin[2]));
}

describe('encodeLas', () => {
  it('writes the header fields where LAS 1.4 R15 Table 3 puts them', () => {
    const cloud = latticeCloud(10, [500000, 5000000, 100], 1);
    const bytes = encodeLas(cloud, { version: '1.4', pointFormat: 6 });
    const v = new DataView(bytes.buffer);
    // LAS 1.4 R15 Table 3: signature, version 1.4, header size 375, pf 6, record length 30
    expect(new TextDecoder().decode(bytes.subarray(0, 4))).toBe('LASF');
    expect([bytes[24], bytes[25], v.getUint16(94, true), bytes[104], v.getUint16(105, true)]).toEqual([1, 4, 375, 6, 30]);
    // pf 6–10 require the legacy count to be 0 and the 64-bit count at byte 247 (§2.4)
    expect(v.getUint32(107, true)).toBe(0);
    expect(Number(v.getBigUint64(247, true))).toBe(10);
    // global encoding bit 4 (WKT) is required for pf 6–10
    expect(v.getUint16(6, true) & 16).toBe(16);
    expect(v.getUint32(96, true)).toBe(375);
    expect(bytes.length).toBe(375 + 10 * 30);
  });

  it('writes LAS 1.2 headers of 227 bytes with the legacy count and points by return', () => {
    const cloud = latticeCloud(7, [0, 0, 0], 2);
    cloud.attributes.returnNumber = Uint8Array.from([1, 1, 2, 1, 3, 2, 1]);
    cloud.attributes.numberOfReturns = Uint8Array.from([3, 3, 3, 3, 3, 3, 3]);
    const bytes = encodeLas(cloud, { version: '1.2', pointFormat: 1 });
    const v = new DataView(bytes.buffer);
    // LAS 1.2 header: 227 bytes, legacy point count at 107, points by return at 111 (5 × uint32)
    expect([bytes[25], v.getUint16(94, true), v.getUint32(107, true)]).toEqual([2, 227, 7]);
    expect([0, 1, 2, 3, 4].map((r) => v.getUint32(111 + 4 * r, true))).toEqual([4, 2, 1, 0, 0]);
  });

  it('uses scale 0.0001 m and the whole-metre floor of the data minimum when not told otherwise', () => {
    const cloud = createPointCloud(Float64Array.of(10.7, 12), Float64Array.of(-3.2, 5), Float64Array.of(0.5, 1));
    expect(defaultOffset(cloud)).toEqual([10, -4, 0]);
    const v = new DataView(encodeLas(cloud, { version: '1.2', pointFormat: 0 }).buffer);
    expect([0, 1, 2].map((k) => v.getFloat64(131 + 8 * k, true))).toEqual([0.0001, 0.0001, 0.0001]);
    expect([0, 1, 2].map((k) => v.getFloat64(155 + 8 * k, true))).toEqual([10, -4, 0]);
  });

  it('refuses coordinates that do not fit the int32 range with the chosen scale', () => {
    // 0.0001 m × 2^31 ≈ 214.7 km: a 300 km wide cloud cannot be stored at that scale
    const cloud = createPointCloud(Float64Array.of(0, 300_000), Float64Array.of(0, 0), Float64Array.of(0, 0));
    const error = (() => {
      try {
        encodeLas(cloud, { version: '1.2', pointFormat: 0 });
      } catch (e) {
        return e;
      }
    })();
    expect(error).toBeInstanceOf(XylemapError);
    expect((error as XylemapError).oneLine()).toMatch(/point 1: x = 300000 .*larger scale/);
  });

  it('refuses a NaN coordinate', () => {
    const cloud = createPointCloud(Float64Array.of(0, NaN), Float64Array.of(0, 0), Float64Array.of(0, 0));
    expect(() => encodeLas(cloud, { version: '1.4', pointFormat: 6, offset: [0, 0, 0] })).toThrow(/point 1: x = NaN/);
  });

  it('refuses classes above 31 in the legacy formats, which have 5 class bits (LAS 1.4 Table 7)', () => {
    const cloud = createPointCloud(Float64Array.of(0), Float64Array.of(0), Float64Array.of(0));
    cloud.attributes.classification = Uint8Array.of(64);
    expect(() => encodeLas(cloud, { version: '1.2', pointFormat: 0 })).toThrow(/classification 64/);
  });

  it('refuses a point format the LAS version does not have', () => {
    const cloud = latticeCloud(1, [0, 0, 0], 3);
    expect(() => encodeLas(cloud, { version: '1.2', pointFormat: 6 })).toThrow(/cannot be written as LAS 1.2/);
  });
});

describe('writeLas', () => {
  it('round-trips every reference LAS/LAZ file in a writable format exactly, attributes and extra bytes included', async () => {
    // Sources: the files of ../shared/data/las-reference; equality is with our own reading of the original.
    const names: string[] = [];
    for (const dir of ['laspy', 'laz-perf', 'liblas', 'loaders.gl', 'pdal', 'pdal/permutations', 'las-reader']) {
      for (const f of readdirSync(ref(dir))) if (/\.la[sz]$/.test(f)) names.push(`${dir}/${f}`);
    }
    let checked = 0;
    for (const name of names) {
      let original: PointCloud;
      try {
        original = await readCloud(ref(name), { allowEmpty: true });
      } catch {
        continue; // the refused LAZ variants (tested elsewhere)
      }
      const pf = original.source.pointFormat!;
      if ([4, 5, 9, 10].includes(pf) || original.count > 200_000) continue; // waveform formats are not writable; keep the test fast
      const back = await roundTrip(original, lasOptionsLike(original));
      expect([name, ...differingArrays(original, back)]).toEqual([name]);
      expect(back.source.extraBytesFields!.map((f) => f.name)).toEqual(original.source.extraBytesFields!.map((f) => f.name));
      checked++;
    }
    expect(checked).toBeGreaterThan(40);
  });

  it('keeps 0.1 mm exactly at offsets of 5 000 000 m with the default scale', async () => {
    const cloud = latticeCloud(5000, [5_000_000, 5_000_000, 5_000_000], 4);
    const back = await roundTrip(cloud, { version: '1.4', pointFormat: 6 });
    expect(differingArrays(cloud, back).filter((k) => 'xyz'.includes(k))).toEqual([]);
    // and a value off the lattice moves by at most half a step (0.05 mm)
    const off = createPointCloud(Float64Array.of(5_000_000.123456789), Float64Array.of(5_000_000), Float64Array.of(5_000_000));
    const b2 = await roundTrip(off, { version: '1.2', pointFormat: 0 });
    expect(Math.abs(b2.x[0] - 5_000_000.123456789)).toBeLessThanOrEqual(0.00005);
  });

  it('writes a per-point segment_id as a described Int32 extra-bytes field in LAS 1.4 pf 6', async () => {
    const cloud = latticeCloud(100, [478000, 5428000, 250], 5);
    cloud.extra.segment_id = Int32Array.from({ length: 100 }, (_, i) => (i % 7) - 1);
    cloud.extra.distance_m = Float32Array.from({ length: 100 }, (_, i) => i / 3);
    const back = await roundTrip(cloud, { version: '1.4', pointFormat: 6, extraBytes: ['segment_id', 'distance_m'] });
    // LAS 1.4 §2.5.4: data type 6 = long (int32), 9 = float
    expect(back.source.extraBytesFields!.map((f) => [f.name, f.dataType, f.byteSize])).toEqual([
      ['segment_id', 6, 4],
      ['distance_m', 9, 4],
    ]);
    expect(back.source.recordLength).toBe(30 + 8);
    expect([...back.extra.segment_id]).toEqual([...cloud.extra.segment_id]);
    expect([...back.extra.distance_m]).toEqual([...cloud.extra.distance_m]);
  });

  it('passes the CRS VLRs of the oak scan through byte for byte', async () => {
    const oak = await readCloud(join(process.cwd(), '..', 'shared', 'data', 'real-trees', 'QuePet_BR02_02_2020-04-01_q1_ULS-off.laz'));
    const back = await roundTrip(oak, { version: '1.4', pointFormat: 6, vlrs: oak.source.vlrs, scale: oak.source.scale, offset: oak.source.offset });
    const crs = (c: PointCloud) => c.source.vlrs!.filter((v) => v.userId === 'LASF_Projection').map((v) => [v.recordId, Buffer.from(v.data).toString('hex')]);
    expect(crs(back)).toEqual(crs(oak));
    expect(crs(back)).toHaveLength(4);
  });

  it('writes passed-through extended records as EVLRs in LAS 1.4', async () => {
    const src = await readCloud(ref('laspy/1_4_w_evlr.las'));
    const back = await roundTrip(src, lasOptionsLike(src));
    // laspy tests/test_append_mode.py: the EVLR is pylastest / 42 / "just a test evlr"
    expect(back.source.evlrs!.map((e) => [e.userId, e.recordId, e.description])).toEqual([['pylastest', 42, 'just a test evlr']]);
  });

  it('leaves no file behind when encoding fails', () => {
    const dir = tempDir();
    const path = join(dir, 'bad.las');
    const cloud = createPointCloud(Float64Array.of(Infinity), Float64Array.of(0), Float64Array.of(0));
    expect(() => writeLas(path, cloud, { version: '1.2', pointFormat: 0, offset: [0, 0, 0] })).toThrow(XylemapError);
    expect(existsSync(path)).toBe(false);
    expect(readdirSync(dir)).toEqual([]);
  });

  it('writes a file whose size is header + VLRs + records', () => {
    const path = join(tempDir(), 'size.las');
    writeLas(path, latticeCloud(12, [1, 2, 3], 6), { version: '1.2', pointFormat: 1 });
    expect(readFileSync(path).length).toBe(227 + 12 * 28);
  });
});
