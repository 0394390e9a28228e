import { describe, expect, it } from 'vitest';
import { centreBreastHeight } from '../../core/reconstruct/breast-height.js';
import { createSegment, type Segment, type Vec3 } from '../../core/types/network.js';
import { createRandom } from '../../core/util/random.js';

function segment(id: number, parentId: number, start: Vec3, end: Vec3, radiusM: number): Segment {
  return createSegment({ segmentId: id, parentId, start, end, radiusM, radiusSeM: 0.001, fitRmseM: 0.001, radiusFitM: radiusM, radiusCorrection: '' });
}

/** Vertical stem: a 1 m base segment, a tapering segment from z = 1 to 2 m, one child above. */
function taperedStem() {
  // Geometry: linear taper r(z) = 0.10 − 0.04 (z − 1) m on 1 ≤ z ≤ 2, so r(1.3) = 0.088 m and the
  // mean over the segment (what a single cylinder fit measures) is r(1.5) = 0.080 m.
  const r = (z: number): number => 0.1 - 0.04 * (z - 1);
  const rnd = createRandom(5);
  const n = 20000;
  const px = new Float64Array(n), py = new Float64Array(n), pz = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const z = 1 + rnd.next();
    const a = 2 * Math.PI * rnd.next();
    const rr = r(z) + 0.0005 * rnd.normal();
    px[i] = rr * Math.cos(a);
    py[i] = rr * Math.sin(a);
    pz[i] = z;
  }
  const segments = [
    segment(0, -1, [0, 0, 0], [0, 0, 1], 0.1),
    segment(1, 0, [0, 0, 1], [0, 0, 2], 0.08),
    segment(2, 1, [0, 0, 2], [0, 0, 2.5], 0.05),
  ];
  const pts = Int32Array.from({ length: n }, (_, i) => i);
  return { segments, px, py, pz, pointsOf: (i: number) => (i === 1 ? pts : null) };
}

describe('centreBreastHeight', () => {
  it('gives the segment holding 1.3 m of path the radius at 1.3 m on a tapering stem', () => {
    const s = taperedStem();
    const out = centreBreastHeight(s.segments, s.pointsOf, s.px, s.py, s.pz, { range_noise_m: 0.0005, min_fit_points: 10 });
    // Path length from the base equals z on this vertical stem.
    const holder = out.find((g) => Math.min(g.start[2], g.end[2]) <= 1.3 && 1.3 < Math.max(g.start[2], g.end[2]))!;
    expect(Math.abs(holder.radiusM / 0.088 - 1)).toBeLessThan(0.01);
    // Its middle is at breast height (a slice centred on 1.3 m).
    expect((holder.start[2] + holder.end[2]) / 2).toBeCloseTo(1.3, 6);
  });

  it('keeps the total length and moves the children to the top part', () => {
    const s = taperedStem();
    const out = centreBreastHeight(s.segments, s.pointsOf, s.px, s.py, s.pz, { range_noise_m: 0.0005, min_fit_points: 10 });
    expect(out.length).toBe(5);
    const total = out.reduce((a, g) => a + g.lengthM, 0);
    expect(total).toBeCloseTo(2.5, 9);
    const child = out[2];
    const parent = out[child.parentId];
    expect(parent.end[2]).toBeCloseTo(2, 9);
    expect(child.start[2]).toBeCloseTo(parent.end[2], 9);
  });

  it('leaves a segment unchanged when 1.3 m lies within 2 cm of its end', () => {
    const s = taperedStem();
    s.segments[0].end = [0, 0, 1.29];
    s.segments[0].lengthM = 1.29;
    s.segments[1].start = [0, 0, 1.29];
    s.segments[1].lengthM = 0.71;
    const out = centreBreastHeight(s.segments, s.pointsOf, s.px, s.py, s.pz, { range_noise_m: 0.0005, min_fit_points: 10 });
    expect(out.length).toBe(3);
    expect(out[1].radiusM).toBe(0.08);
  });
});
