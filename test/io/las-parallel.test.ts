/**
 * The range decoder the worker threads run, checked against the one-thread reader on a reference
 * file (laz-perf autzen_trim.las: 110 000 points, io_tests.cpp can_decode_large_files).
 */
import { describe, expect, it } from 'vitest';
import { decodeRangeFromFile, decodeThreads, PARALLEL_MIN_POINTS } from '../../core/io/las-parallel.js';
import { allocateLasCloud, buildLayout } from '../../core/io/las-points.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { differingArrays, ref } from './shared-data.js';

describe('decodeRangeFromFile', () => {
  it('decodes three uneven record ranges into shared arrays that equal the one-thread read', async () => {
    const path = ref('laz-perf/autzen_trim.las');
    const whole = await readCloud(path);
    const s = whole.source;
    const layout = buildLayout(s.pointFormat!, s.recordLength!, s.scale!, s.offset!, s.extraBytesFields!, false);
    const shared = allocateLasCloud(layout, whole.count, true);
    expect(shared.x.buffer).toBeInstanceOf(SharedArrayBuffer);
    const offsetToPointData = 227 + s.vlrs!.reduce((n, v) => n + 54 + v.data.length, 0);
    for (const [start, end] of [[0, 65_536], [65_536, 100_000], [100_000, 110_000]]) {
      decodeRangeFromFile({ path, offsetToPointData, layout, start, end, count: whole.count, x: shared.x, y: shared.y, z: shared.z, attributes: shared.attributes, extra: shared.extra });
    }
    shared.source = whole.source;
    expect(differingArrays(whole, shared)).toEqual([]);
  });
});

describe('decodeThreads', () => {
  it('uses one thread for small files and when told to', () => {
    expect(decodeThreads(PARALLEL_MIN_POINTS - 1)).toBe(1);
    expect(decodeThreads(10 * PARALLEL_MIN_POINTS, 1)).toBe(1);
  });
});
