import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { approach, footprintCoverage, rayAxisApproach, rayCylinder, rayDisc } from '../../core/simulate/intersect.js';
import { createRandom } from '../../core/util/random.js';

// Analytic cases: a ray o + t·d against the cylinder x² + y² = r², 0 ≤ z − z0 ≤ L. The expected
// distances follow from Pythagoras (chord geometry), worked out by hand in each comment.

describe('rayCylinder', () => {
  it('hits a vertical unit cylinder head-on at range 4 from 5 m away', () => {
    // Ray from (-5, 0, 0) along +x meets x = -1 at t = 4.
    expect(rayCylinder(-5, 0, 0, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBeCloseTo(4, 12);
  });

  it('hits off-centre at t = 5 − √(r² − y²)', () => {
    // y = 0.6: the surface is at x = −√(1 − 0.36) = −0.8, so t = 5 − 0.8 = 4.2.
    expect(rayCylinder(-5, 0.6, 0, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBeCloseTo(4.2, 12);
  });

  it('touches tangentially at y = r and misses just beyond it', () => {
    expect(rayCylinder(-5, 1, 0, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBeCloseTo(5, 6);
    expect(rayCylinder(-5, 1.000001, 0, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBe(Infinity);
  });

  it('misses above the finite extent of the cylinder', () => {
    // The axis spans z ∈ [−1, 1]; a ray at z = 1.5 passes over the top.
    expect(rayCylinder(-5, 0, 1.5, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBe(Infinity);
  });

  it('returns the far wall for a ray starting inside', () => {
    expect(rayCylinder(0, 0, 0, 1, 0, 0, 0, 0, -1, 0, 0, 1, 2, 1)).toBeCloseTo(1, 12);
  });

  it('never hits for a ray parallel to the axis', () => {
    expect(rayCylinder(0.5, 0, -5, 0, 0, 1, 0, 0, -1, 0, 0, 1, 2, 1)).toBe(Infinity);
  });

  it('sees the inner wall through an open end (no caps)', () => {
    // d = (0.6, 0, −0.8): x grows monotonically, so the only wall crossing is at t = 1/0.6.
    // From (0, 0, 3) that point has z = 3 − 0.8/0.6 = 1.667 > 1, outside the extent: a miss.
    expect(rayCylinder(0, 0, 3, 0.6, 0, -0.8, 0, 0, -1, 0, 0, 1, 2, 1)).toBe(Infinity);
    // From (0, 0, 1.5) with d = (0.6, 0, −0.8): wall at t = 1/0.6, z = 1.5 − 1.333 = 0.167 ∈ [−1, 1]: inner-wall hit.
    expect(rayCylinder(0, 0, 1.5, 0.6, 0, -0.8, 0, 0, -1, 0, 0, 1, 2, 1)).toBeCloseTo(1 / 0.6, 12);
  });

  it('gives the same distance after any rotation and translation of ray and cylinder', () => {
    // Property: distance is invariant under rigid motions (Euclidean geometry).
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const rng = createRandom(seed);
        const rot = randomRotation(rng);
        const shift = [rng.uniform(-50, 50), rng.uniform(-50, 50), rng.uniform(-50, 50)];
        const y = rng.uniform(-0.99, 0.99);
        const expected = 5 - Math.sqrt(1 - y * y);
        const o = apply(rot, [-5, y, 0.3], shift);
        const d = apply(rot, [1, 0, 0], [0, 0, 0]);
        const a = apply(rot, [0, 0, -1], shift);
        const u = apply(rot, [0, 0, 1], [0, 0, 0]);
        const t = rayCylinder(o[0], o[1], o[2], d[0], d[1], d[2], a[0], a[1], a[2], u[0], u[1], u[2], 2, 1);
        return Math.abs(t - expected) < 1e-9;
      }),
      { numRuns: 200 },
    );
  });
});

describe('rayDisc', () => {
  it('hits a disc facing the ray at the plane distance and misses outside its radius', () => {
    expect(rayDisc(0, 0, 0, 0, 0, 1, 0.01, 0, 2, 0, 0, 1, 0.05)).toBeCloseTo(2, 12);
    expect(rayDisc(0, 0, 0, 0, 0, 1, 0.06, 0, 2, 0, 0, 1, 0.05)).toBe(Infinity);
  });

  it('hits a disc tilted 60° at the same plane distance along the ray', () => {
    // Plane through (0, 0, 2) with normal (sin 60°, 0, cos 60°): the ray along z meets it at z = 2.
    const s = Math.sin(Math.PI / 3);
    expect(rayDisc(0, 0, 0, 0, 0, 1, 0, 0, 2, s, 0, 0.5, 0.05)).toBeCloseTo(2, 12);
  });
});

describe('rayAxisApproach', () => {
  it('finds the closest approach of a ray passing 2 m beside a vertical axis', () => {
    rayAxisApproach(-5, 2, 0.5, 1, 0, 0, 0, 0, 0, 0, 0, 1, 1);
    expect(approach[0]).toBeCloseTo(5, 12);
    expect(approach[1]).toBeCloseTo(2, 12);
  });

  it('measures to the nearer end point when the closest line point lies beyond the segment', () => {
    // Axis z ∈ [0, 1]; ray at z = 3 along x through x = 0: nearest axis point is the top (0, 0, 1), distance 2.
    rayAxisApproach(-5, 0, 3, 1, 0, 0, 0, 0, 0, 0, 0, 1, 1);
    expect(approach[1]).toBeCloseTo(2, 12);
  });
});

describe('footprintCoverage', () => {
  it('is 1 for a footprint inside the strip and 0 for one clear of it', () => {
    expect(footprintCoverage(0, 0.01, 0.005)).toBe(1);
    expect(footprintCoverage(0.02, 0.01, 0.005)).toBe(0);
  });

  it('is one half when the beam centre sits on the edge of a wide strip', () => {
    // Symmetry: a half-plane through the disc centre covers half of it.
    expect(footprintCoverage(1, 1, 0.001)).toBeCloseTo(0.5, 9);
  });

  it('matches a Monte Carlo estimate of the disc–strip overlap', () => {
    // Independent numerical integration: uniform points in the disc, share inside |x − d| ≤ r.
    const rng = createRandom(7);
    for (const [d, r, w] of [
      [0, 0.002, 0.005],
      [0.004, 0.003, 0.005],
      [0.006, 0.005, 0.004],
    ]) {
      let inside = 0;
      let total = 0;
      while (total < 200_000) {
        const x = rng.uniform(-w, w);
        const y = rng.uniform(-w, w);
        if (x * x + y * y > w * w) continue;
        total++;
        if (Math.abs(x - d) <= r) inside++;
      }
      expect(Math.abs(footprintCoverage(d, r, w) - inside / total)).toBeLessThan(0.005);
    }
  });
});

type M = number[][];
function randomRotation(rng: ReturnType<typeof createRandom>): M {
  // Rotation from a random unit quaternion (Shoemake 1992, Graphics Gems III).
  const u1 = rng.next();
  const u2 = rng.next() * 2 * Math.PI;
  const u3 = rng.next() * 2 * Math.PI;
  const a = Math.sqrt(1 - u1) * Math.sin(u2);
  const b = Math.sqrt(1 - u1) * Math.cos(u2);
  const c = Math.sqrt(u1) * Math.sin(u3);
  const w = Math.sqrt(u1) * Math.cos(u3);
  return [
    [1 - 2 * (b * b + c * c), 2 * (a * b - c * w), 2 * (a * c + b * w)],
    [2 * (a * b + c * w), 1 - 2 * (a * a + c * c), 2 * (b * c - a * w)],
    [2 * (a * c - b * w), 2 * (b * c + a * w), 1 - 2 * (a * a + b * b)],
  ];
}
function apply(m: M, v: number[], t: number[]): number[] {
  return [0, 1, 2].map((i) => m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2] + t[i]);
}
