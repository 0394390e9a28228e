import { describe, expect, it } from 'vitest';
import { createRandom } from '../../core/util/random.js';

describe('createRandom', () => {
  it('gives the same sequence for the same seed and a different one for another seed', () => {
    const a = createRandom(42);
    const b = createRandom(42);
    const c = createRandom(43);
    const sa = Array.from({ length: 100 }, () => a.next());
    const sb = Array.from({ length: 100 }, () => b.next());
    const sc = Array.from({ length: 100 }, () => c.next());
    expect(sa).toEqual(sb);
    expect(sa).not.toEqual(sc);
  });

  it('draws uniforms in [0, 1) with mean 1/2 and variance 1/12', () => {
    // Moments of the standard uniform distribution (textbook values).
    const r = createRandom(7);
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    let outside = 0;
    for (let i = 0; i < n; i++) {
      const u = r.next();
      if (!(u >= 0 && u < 1)) outside++;
      s += u;
      s2 += u * u;
    }
    const mean = s / n;
    expect(outside).toBe(0);
    expect(mean).toBeCloseTo(0.5, 2);
    expect(s2 / n - mean * mean).toBeCloseTo(1 / 12, 3);
  });

  it('draws standard normals with mean 0, variance 1 and 95.45 % inside ±2', () => {
    // P(|Z| < 2) = 0.9545 for the standard normal (standard tables).
    const r = createRandom(11);
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    let inside = 0;
    for (let i = 0; i < n; i++) {
      const z = r.normal();
      s += z;
      s2 += z * z;
      if (Math.abs(z) < 2) inside++;
    }
    expect(s / n).toBeCloseTo(0, 2);
    expect(s2 / n).toBeCloseTo(1, 1);
    expect(inside / n).toBeCloseTo(0.9545, 2);
  });

  it('draws integers covering [0, n) evenly', () => {
    const r = createRandom(3);
    const counts = new Array(5).fill(0);
    for (let i = 0; i < 50_000; i++) counts[r.int(5)]++;
    for (const c of counts) expect(Math.abs(c - 10_000)).toBeLessThan(500);
  });
});
