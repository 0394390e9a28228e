/**
 * `inspectCloud`: bounds from the points, spacing of generated lattices with a known answer,
 * warnings on the odd reference files the las-reference README lists, CRS summaries per the
 * GeoTIFF 1.0 key ids (ProjectedCSTypeGeoKey 3072, §6.2) and the WKT VLR (LAS 1.4 §2.5.2).
 */
import { describe, expect, it } from 'vitest';
import { estimateSpacing, formatInspectTable, inspectCloud } from '../../core/io/inspect.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { wktHead } from '../../core/io/crs.js';
import { createPointCloud, type PointCloud } from '../../core/types/point-cloud.js';
import { ref } from './shared-data.js';

/** A regular nx × ny × nz lattice with step h: every nearest neighbour is exactly h away (analytic). */
function lattice(nx: number, ny: number, nz: number, h: number, origin = [0, 0, 0]): PointCloud {
  const n = nx * ny * nz;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const z = new Float64Array(n);
  let i = 0;
  for (let a = 0; a < nx; a++) for (let b = 0; b < ny; b++) for (let c = 0; c < nz; c++, i++) {
    x[i] = origin[0] + a * h;
    y[i] = origin[1] + b * h;
    z[i] = origin[2] + c * h;
  }
  return createPointCloud(x, y, z);
}

describe('estimateSpacing', () => {
  it('finds the lattice step as the median nearest-neighbour distance', () => {
    const r = estimateSpacing(lattice(20, 20, 50, 0.05), 2000, 1);
    expect(r.median).toBeCloseTo(0.05, 12);
    expect([r.sampled, r.duplicates]).toEqual([2000, 0]);
  });

  it('finds a coarse spacing on a thin vertical line, far below the volume-based first guess', () => {
    // 1 × 1 × 500 column of points 1 cm apart, spread over a 100 m wide box by two far outliers
    const c = lattice(1, 1, 500, 0.01);
    const x = Float64Array.from([...c.x, 100, -100]);
    const y = Float64Array.from([...c.y, 100, -100]);
    const z = Float64Array.from([...c.z, 0, 0]);
    expect(estimateSpacing(createPointCloud(x, y, z), 300, 3).median).toBeCloseTo(0.01, 12);
  });

  it('counts sampled points that have an exact duplicate', () => {
    const c = lattice(10, 10, 10, 1);
    const twice = createPointCloud(Float64Array.from([...c.x, ...c.x]), Float64Array.from([...c.y, ...c.y]), Float64Array.from([...c.z, ...c.z]));
    const r = estimateSpacing(twice, 500, 2);
    expect(r.duplicates).toBe(500);
    expect(r.median).toBe(0);
  });

  it('gives the same answer for the same seed', () => {
    const c = lattice(30, 30, 30, 0.1);
    c.x[5] += 0.013;
    expect(estimateSpacing(c, 100, 9)).toEqual(estimateSpacing(c, 100, 9));
  });
});

describe('inspectCloud', () => {
  it('reports bounds computed from the points of a LAS file whose header bounds are ×1000', async () => {
    // las-reference README, laspy/simple1_3.las: header bounds stored ×1000; real x −235434.519..−234935.841
    const r = inspectCloud(await readCloud(ref('laspy/simple1_3.las')));
    expect(r.bounds!.min[0]).toBe(-235434.519);
    expect(r.bounds!.max[0]).toBe(-234935.841);
    expect(r.warnings.some((w) => /header bounds disagree/.test(w))).toBe(true);
    expect(r.las_version).toBe('1.3');
  });

  it('does not warn about header bounds that differ only by float32 rounding', async () => {
    // README: laspy/plane.laz header min x 1423214.5200004578 vs decoded 1423214.52
    const r = inspectCloud(await readCloud(ref('laspy/plane.laz')));
    expect(r.warnings.filter((w) => /header bounds/.test(w))).toEqual([]);
  });

  it('prints the JSON keys the issue asks for, with null LAS fields for text files', () => {
    const r = inspectCloud(lattice(5, 5, 40, 0.1, [9, -1, 0]));
    const json = JSON.parse(JSON.stringify(r));
    expect(Object.keys(json)).toEqual(expect.arrayContaining(['point_count', 'las_version', 'point_format', 'scale', 'offset', 'bounds']));
    expect([json.point_count, json.las_version, json.point_format]).toEqual([1000, null, null]);
    expect(json.bounds.min[0]).toBe(9);
    expect(json.bounds.max[2]).toBeCloseTo(3.9, 12);
  });

  it('warns when the cloud is flat or much wider than tall, not for a tree-shaped one', () => {
    const warn = (c: PointCloud) => inspectCloud(c).warnings.filter((w) => /one tree/.test(w)).length;
    expect(warn(lattice(40, 40, 2, 0.1))).toBe(1); // 0.1 m tall
    expect(warn(lattice(60, 4, 10, 1))).toBe(1); // 59 m wide, 9 m tall
    expect(warn(lattice(8, 8, 40, 0.25))).toBe(0); // 1.75 m wide, 9.75 m tall
  });

  it('warns about a cloud with zero points', () => {
    const r = inspectCloud(createPointCloud(new Float64Array(0), new Float64Array(0), new Float64Array(0)));
    expect([r.point_count, r.bounds]).toEqual([0, null]);
    expect(r.warnings).toContain('the file holds zero points');
  });

  it('summarizes the GeoTIFF ProjectedCSType of Haystack_Rock.las', async () => {
    // las-reference README (header): GeoKeys ProjectedCSType 3645, vertical CS 5703
    const r = inspectCloud(await readCloud(ref('las-reader/Haystack_Rock.las')));
    expect([r.crs.projectedCsType, r.crs.verticalCsType]).toEqual([3645, 5703]);
    expect(r.crs.summary).toMatch(/EPSG:3645/);
  });

  it('histograms returns and classes of simple.las as laspy asserts them', async () => {
    // laspy tests/test_reading_1_2.py: 789 points of class 1 and 276 of class 2; returns 925/114/21/5
    const r = inspectCloud(await readCloud(ref('laspy/simple.las')));
    expect(r.classification).toEqual({ 1: 789, 2: 276 });
    expect(r.returns).toEqual({ 1: 925, 2: 114, 3: 21, 4: 5 });
    expect(formatInspectTable(r)).toMatch(/classification\s+1: 789, 2: 276/);
  });
});

describe('wktHead', () => {
  it('takes the first keyword and name of an OGC WKT string', () => {
    // OGC 01-009 WKT: PROJCS["name", GEOGCS[...], ...]
    expect(wktHead('PROJCS["ETRS89 / UTM zone 32N",GEOGCS["ETRS89"]]')).toEqual({ kind: 'PROJCS', name: 'ETRS89 / UTM zone 32N' });
    expect(wktHead('not wkt')).toBeNull();
  });
});
