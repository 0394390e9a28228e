import { describe, expect, it } from 'vitest';
import { formatSegmentsCsv, parseSegmentsCsv, SEGMENT_COLUMNS } from '../../core/io/segments-csv.js';
import { parseCsv, formatCsv } from '../../core/io/csv.js';
import type { Segment } from '../../core/types/network.js';
import { XylemapError } from '../../core/util/errors.js';

function segment(id: number, parentId: number, radiusM: number): Segment {
  return {
    segmentId: id,
    parentId,
    branchId: 0,
    branchOrder: 0,
    strahlerOrder: 1,
    start: [478176.091 + id * 0.1, 5428828.773, 256.0725 + id],
    end: [478176.091 + id * 0.1, 5428828.773, 256.0725 + id + 1],
    radiusM,
    radiusSeM: 0.0004,
    lengthM: 1,
    fitRmseM: 0.0011,
    arcCoverage: 0.8125,
    pointCount: 311,
    reliable: id !== 2,
    reliabilityReason: id === 2 ? 'thin_arc' : '',
    radiusFitM: radiusM * 1.1,
    radiusCorrection: id === 2 ? 'taper_model' : '',
    extra: { conduit_diameter_um: 41.5 + id },
  };
}

describe('formatSegmentsCsv', () => {
  it('writes the documented columns first, in order', () => {
    const text = formatSegmentsCsv([segment(0, -1, 0.2)]);
    const header = text.split('\n')[0].split(',');
    expect(header.slice(0, SEGMENT_COLUMNS.length)).toEqual([...SEGMENT_COLUMNS]);
    expect(header).toContain('conduit_diameter_um');
  });
});

describe('parseSegmentsCsv', () => {
  it('round-trips every field exactly, including georeferenced coordinates and extra columns', () => {
    const segments = [segment(0, -1, 0.21), segment(1, 0, 0.15), segment(2, 1, 0.011)];
    const back = parseSegmentsCsv(formatSegmentsCsv(segments)).segments;
    expect(back).toEqual(segments);
  });

  it('reads back an unknown radius standard error written as Inf', () => {
    const s = { ...segment(0, -1, 0.2), radiusSeM: Infinity };
    expect(parseSegmentsCsv(formatSegmentsCsv([s])).segments[0].radiusSeM).toBe(Infinity);
  });

  it('fills defaults for optional columns of a minimal table', () => {
    const text = 'segment_id,parent_id,start_x,start_y,start_z,end_x,end_y,end_z,radius_m\n0,-1,0,0,0,0,0,2,0.1\n';
    const [s] = parseSegmentsCsv(text).segments;
    expect(s.lengthM).toBe(2);
    expect(s.reliable).toBe(true);
    expect(s.radiusSeM).toBe(0);
  });

  it('rejects a table without the required columns, naming them', () => {
    expect(() => parseSegmentsCsv('a,b\n1,2\n', 'x.csv')).toThrowError(/missing column\(s\) segment_id/);
  });

  it('rejects a non-numeric and a non-positive radius with the line number', () => {
    const head = 'segment_id,parent_id,start_x,start_y,start_z,end_x,end_y,end_z,radius_m\n';
    expect(() => parseSegmentsCsv(head + '0,-1,0,0,0,0,0,1,abc\n')).toThrowError(/line 2: radius_m is not a finite number/);
    expect(() => parseSegmentsCsv(head + '0,-1,0,0,0,0,0,1,0\n')).toThrowError(XylemapError);
  });
});

describe('parseCsv', () => {
  it('reads quoted fields with commas, quotes and CRLF line ends (RFC 4180 §2)', () => {
    const { header, rows } = parseCsv('a,b\r\n"x, y","say ""hi"""\r\n');
    expect(header).toEqual(['a', 'b']);
    expect(rows).toEqual([['x, y', 'say "hi"']]);
    expect(parseCsv(formatCsv(header, rows)).rows).toEqual(rows);
  });
});
