import { describe, expect, it } from 'vitest';
import { basis, distanceToLine, lineAngle, sampleCylinder, unit } from '../../../core/reconstruct/fit/sample-cylinder.js';

describe('sampleCylinder', () => {
  it('puts noise-free points exactly at the radius from the axis and within the length', () => {
    // Definition of a right circular cylinder.
    const axis = unit([1, 2, 3]);
    const s = sampleCylinder({ n: 500, radiusM: 0.07, lengthM: 0.4, arcRad: 2 * Math.PI, noiseM: 0, axis, centre: [1, 2, 3], seed: 1 });
    for (let i = 0; i < 500; i++) {
      const p: [number, number, number] = [s.x[i], s.y[i], s.z[i]];
      expect(distanceToLine(p, [1, 2, 3], axis)).toBeCloseTo(0.07, 12);
      const t = (p[0] - 1) * axis[0] + (p[1] - 2) * axis[1] + (p[2] - 3) * axis[2];
      expect(Math.abs(t)).toBeLessThanOrEqual(0.2 + 1e-12);
    }
  });

  it('is repeatable for a seed and marks the requested share of outliers', () => {
    // Repeatability rule of the project; outlier share is binomial (n = 2000, p = 0.2 → ±2.7 % at 3σ).
    const spec = { n: 2000, radiusM: 0.05, lengthM: 0.3, arcRad: 3, noiseM: 0.001, outlierFraction: 0.2, seed: 4 };
    const a = sampleCylinder(spec);
    const b = sampleCylinder(spec);
    expect(Array.from(b.x)).toEqual(Array.from(a.x));
    const share = a.outlier.reduce((s, v) => s + v, 0) / 2000;
    expect(Math.abs(share - 0.2)).toBeLessThan(0.027);
  });
});

describe('basis', () => {
  it('completes a unit vector to a right-handed orthonormal basis', () => {
    for (const a of [unit([0, 0, 1]), unit([1, 0, 0]), unit([0.3, -0.8, 0.2])]) {
      const [e1, e2] = basis(a);
      const dot = (p: number[], q: number[]) => p[0] * q[0] + p[1] * q[1] + p[2] * q[2];
      expect(dot(e1, a)).toBeCloseTo(0, 15);
      expect(dot(e2, a)).toBeCloseTo(0, 15);
      expect(dot(e1, e2)).toBeCloseTo(0, 15);
      expect(dot(e1, e1)).toBeCloseTo(1, 15);
      // a × e1 = e2
      expect(a[1] * e1[2] - a[2] * e1[1]).toBeCloseTo(e2[0], 15);
    }
  });
});

describe('unit', () => {
  it('scales a vector to length 1', () => {
    expect(Math.hypot(...unit([3, 4, 12]))).toBeCloseTo(1, 15);
    expect(unit([3, 4, 12])[2]).toBeCloseTo(12 / 13, 15);
  });
});

describe('lineAngle', () => {
  it('ignores the direction sign', () => {
    expect(lineAngle([0, 0, 1], [0, 0, -1])).toBe(0);
    expect(lineAngle([1, 0, 0], [0, 1, 0])).toBeCloseTo(Math.PI / 2, 15);
  });
});

describe('distanceToLine', () => {
  it('gives the perpendicular distance', () => {
    expect(distanceToLine([3, 4, 9], [0, 0, 0], [0, 0, 2])).toBeCloseTo(5, 15);
  });
});
