/**
 * The real single-tree scans in ../shared/data/real-trees load with the facts their README states
 * (source assertions named; the rest is the README's header/helper description of the files).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { inspectCloud } from '../../core/io/inspect.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { counts, range, SHARED } from './shared-data.js';

const OAK = join(SHARED, 'real-trees', 'QuePet_BR02_02_2020-04-01_q1_ULS-off.laz');
const RTLS = join(SHARED, 'real-trees', 'rTLS_pc_tree.txt');

describe('readCloud', () => {
  it('reads the QuePet oak ".laz" as the uncompressed LAS 1.4 pf 6 it really is, with 56 534 points', async () => {
    const c = await readCloud(OAK);
    // pytreedb data/geojson/trees/QuePet_BR02_02.geojson: point_count 56 534 (asserted by source)
    expect(c.count).toBe(56534);
    // README "Odd": no compression bit, no LASzip VLR; header: LAS 1.4, pf 6, record length 36, legacy count 0
    expect([c.source.format, c.source.compressed, c.source.lasVersion, c.source.pointFormat, c.source.recordLength]).toEqual(['las', false, '1.4', 6, 36]);
    expect(c.source.scale).toEqual([0.00025, 0.00025, 0.00025]);
    expect(c.source.offset).toEqual([477995, 5428886, 266]);
  });

  it('reads the three described extra bytes of the oak with their types', async () => {
    const c = await readCloud(OAK);
    // README header: Amplitude uint16, Reflectance int16, Deviation uint16
    expect(c.source.extraBytesFields!.map((f) => [f.name, f.dataType])).toEqual([
      ['Amplitude', 3],
      ['Reflectance', 4],
      ['Deviation', 3],
    ]);
    // Amplitude and Reflectance declare a scale (0.01 dB) in their descriptors, so they decode to
    // Float64 in dB (LAS 1.4 §2.5.4: value = raw × scale + offset); Deviation stays uint16.
    expect(c.source.extraBytesFields!.map((f) => f.scale?.[0])).toEqual([0.01, 0.01, undefined]);
    expect(c.extra.Amplitude).toBeInstanceOf(Float64Array);
    expect(c.extra.Reflectance).toBeInstanceOf(Float64Array);
    expect(c.extra.Deviation).toBeInstanceOf(Uint16Array);
    expect(c.rawExtraBytes).toBeUndefined();
  });

  it('gives the oak the bounds, returns and classes the README states', async () => {
    const c = await readCloud(OAK);
    // README header/helper check: bounds; the point bounds equal the header bounds
    expect(range(c.x)).toEqual([478176.09275, 478183.55]);
    expect(range(c.y)).toEqual([5428828.773, 5428839.53925]);
    expect(range(c.z)).toEqual([256.07275, 286.86325]);
    const byReturn = counts(c.attributes.returnNumber as Uint8Array);
    expect([1, 2, 3, 4, 5, 6].map((r) => byReturn.get(r))).toEqual([39299, 14608, 2374, 238, 14, 1]);
    const cls = counts(c.attributes.classification as Uint8Array);
    expect([cls.get(4), cls.get(2)]).toEqual([53769, 2765]);
    expect([c.x[0], c.y[0], c.z[0], c.attributes.returnNumber![0], c.attributes.numberOfReturns![0]]).toEqual([478179.79875, 5428837.71175, 276.85425, 2, 3]);
  });

  it('keeps the oak CRS records so they can be passed through', async () => {
    const c = await readCloud(OAK);
    // README header: GeoTIFF keys (34735, 34736, 34737), a WKT VLR (2112); pytreedb states EPSG:25832 (ETRS89 / UTM 32N)
    const ids = c.source.vlrs!.filter((v) => v.userId === 'LASF_Projection').map((v) => v.recordId);
    expect(ids.sort()).toEqual([2112, 34735, 34736, 34737]);
    expect(inspectCloud(c).crs.wktName).toMatch(/UTM zone 32N/);
  });

  it('reads the rTLS tab-separated tree with 75 848 points and the stated bounds', async () => {
    const c = await readCloud(RTLS);
    // rTLS R/pc_tree-data.R: three columns X, Y, Z; README helper check: 75 848 rows, bounds
    expect(c.source.format).toBe('ascii');
    expect(c.count).toBe(75848);
    expect(Object.keys(c.extra)).toEqual([]);
    expect(range(c.x)).toEqual([6.63574982, 12.97999954]);
    expect(range(c.y)).toEqual([-3.53375006, 2.53574991]);
    expect(range(c.z)).toEqual([0.0, 6.03649998]);
  });

  it('finds the 21 rTLS points of the 1.25–1.35 m slice around the stem the rTLS test fits', async () => {
    const c = await readCloud(RTLS);
    // rTLS tests/testthat/test-circleRANSAC.R: slice 1.25 ≤ Z ≤ 1.35, circle centre (9.25, −1.02), radius 0.10 m;
    // README helper check: 21 points in the slice. Here: the slice's centroid lies within 0.1 m of the centre.
    let n = 0;
    let sx = 0;
    let sy = 0;
    for (let i = 0; i < c.count; i++) {
      if (c.z[i] >= 1.25 && c.z[i] <= 1.35) {
        n++;
        sx += c.x[i];
        sy += c.y[i];
      }
    }
    expect(n).toBe(21);
    expect(Math.hypot(sx / n - 9.25, sy / n + 1.02)).toBeLessThan(0.1);
  });
});
