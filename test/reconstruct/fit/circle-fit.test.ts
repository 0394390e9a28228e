import { describe, expect, it } from 'vitest';
import {
  fitCircleLmeds,
  fitCirclePratt,
  fitCircleTaubin,
  fitCircleTaubinWeighted,
  medianAbsResidual,
  refineCircleGeometric,
} from '../../../core/reconstruct/fit/circle-fit.js';
import { createRandom } from '../../../core/util/random.js';

/** n points on an arc of a circle (cu, cv, r) from angle 0 to arcRad, radial noise σ. */
function arc(n: number, cu: number, cv: number, r: number, arcRad: number, sigma: number, seed: number) {
  const rnd = createRandom(seed);
  const u = new Float64Array(n);
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const th = rnd.uniform(0, arcRad);
    const rr = r + sigma * rnd.normal();
    u[i] = cu + rr * Math.cos(th);
    v[i] = cv + rr * Math.sin(th);
  }
  return { u, v };
}

const ARCS: [string, number][] = [
  ['full', 2 * Math.PI],
  ['half', Math.PI],
  ['60°', Math.PI / 3],
];

/** Mean radius over seeded replicates, relative to the truth. */
function meanRelError(circleFit: typeof fitCircleTaubin, arcRad: number, sigmaRel: number, n: number): number {
  let sum = 0;
  const reps = 200;
  for (let s = 0; s < reps; s++) {
    const { u, v } = arc(n, 0.3, -0.1, 0.05, arcRad, sigmaRel * 0.05, 100 + s);
    sum += circleFit(u, v)!.radius;
  }
  return sum / reps / 0.05 - 1;
}

describe('fitCircleTaubin', () => {
  it('recovers an exact circle from full, half, 60° and 10° arcs to 1e-10 relative', () => {
    // Analytic case: noise-free points on a circle are an exact zero of the algebraic distance.
    for (const a of [2 * Math.PI, Math.PI, Math.PI / 3, Math.PI / 18]) {
      const { u, v } = arc(50, 0.2, -0.7, 0.031, a, 0, 1);
      const c = fitCircleTaubin(u, v)!;
      expect(Math.abs(c.radius - 0.031) / 0.031).toBeLessThan(1e-10);
      expect(Math.abs(c.cu - 0.2)).toBeLessThan(1e-11);
      expect(Math.abs(c.cv + 0.7)).toBeLessThan(1e-11);
    }
  });

  it('stays within 0.1 µm at projected-frame offsets of 5e6 m', () => {
    // Input spacing of doubles near 5e6 is ~1e-9 m (IEEE 754), so this is the precision the data allow.
    for (const a of [2 * Math.PI, Math.PI / 18]) {
      const { u, v } = arc(50, 412345.2, 5312345.7, 0.031, a, 0, 1);
      const c = fitCircleTaubin(u, v)!;
      expect(Math.abs(c.radius - 0.031)).toBeLessThan(1e-7);
      expect(Math.abs(c.cu - 412345.2)).toBeLessThan(1e-7);
    }
  });

  for (const [name, a] of ARCS) {
    it(`has mean radius bias under 0.5 % on a ${name} arc with 2 % noise`, () => {
      // Taubin's fit is essentially unbiased to O(σ²/r) (Al-Sharadqah & Chernov 2009, Electron. J. Stat. 3:886);
      // 200 replicates × 100 points keep the Monte Carlo error far below the tolerance.
      expect(Math.abs(meanRelError(fitCircleTaubin, a, 0.02, 100))).toBeLessThan(0.005);
    });
  }

  it('does not shrink a 60° arc the way the Kåsa fit does', () => {
    // The Kåsa (1976) fit is known to underestimate radii on short arcs (Chernov 2010, §5.3);
    // compare the same data with a Kåsa fit computed inline.
    const { u, v } = arc(200, 0, 0, 1, Math.PI / 3, 0.03, 9);
    // Kåsa: least squares for u² + v² = A u + B v + C, with A = 2a, B = 2b, C = r² − a² − b²
    let s = [0, 0, 0, 0, 0, 0, 0, 0, 0];
    for (let i = 0; i < u.length; i++) {
      const zz = u[i] * u[i] + v[i] * v[i];
      s = [s[0] + u[i] * u[i], s[1] + u[i] * v[i], s[2] + u[i], s[3] + v[i] * v[i], s[4] + v[i], s[5] + 1, s[6] + zz * u[i], s[7] + zz * v[i], s[8] + zz];
    }
    const m = [[s[0], s[1], s[2]], [s[1], s[3], s[4]], [s[2], s[4], s[5]]];
    const b = [s[6], s[7], s[8]];
    const det = (q: number[][]) => q[0][0] * (q[1][1] * q[2][2] - q[1][2] * q[2][1]) - q[0][1] * (q[1][0] * q[2][2] - q[1][2] * q[2][0]) + q[0][2] * (q[1][0] * q[2][1] - q[1][1] * q[2][0]);
    const D = det(m);
    const sol = [0, 1, 2].map((k) => det(m.map((row, i) => row.map((val, j) => (j === k ? b[i] : val)))) / D);
    const kasaRadius = Math.sqrt(sol[2] + (sol[0] / 2) ** 2 + (sol[1] / 2) ** 2);
    const t = fitCircleTaubin(u, v)!;
    expect(Math.abs(t.radius - 1)).toBeLessThan(Math.abs(kasaRadius - 1));
  });

  it('returns null for fewer than 3 points, collinear points, coincident points and NaN', () => {
    // Degenerate input rule: null, never NaN.
    expect(fitCircleTaubin([0, 1], [0, 1])).toBeNull();
    expect(fitCircleTaubin([0, 1, 2, 3], [0, 2, 4, 6])).toBeNull();
    expect(fitCircleTaubin([1, 1, 1], [2, 2, 2])).toBeNull();
    expect(fitCircleTaubin([0, 1, NaN], [0, 1, 0])).toBeNull();
  });

  it('uses only the first n points when n is given', () => {
    // API contract: n limits the points read.
    const { u, v } = arc(30, 0, 0, 2, 2 * Math.PI, 0, 4);
    u[20] = 99;
    expect(fitCircleTaubin(u, v, 20)!.radius).toBeCloseTo(2, 9);
  });
});

describe('fitCirclePratt', () => {
  it('recovers an exact circle from a half arc to 1e-9', () => {
    // Analytic case, as for Taubin.
    const { u, v } = arc(40, -3, 8, 0.2, Math.PI, 0, 2);
    const c = fitCirclePratt(u, v)!;
    expect(Math.abs(c.radius - 0.2)).toBeLessThan(1e-9);
    expect(Math.abs(c.cu + 3)).toBeLessThan(1e-9);
  });

  it('agrees with Taubin to within the noise on a noisy 60° arc', () => {
    // Pratt and Taubin differ only at O(σ²/r) (Chernov 2010, §5.10).
    const { u, v } = arc(200, 0, 0, 1, Math.PI / 3, 0.01, 5);
    expect(Math.abs(fitCirclePratt(u, v)!.radius - fitCircleTaubin(u, v)!.radius)).toBeLessThan(0.01);
    expect(Math.abs(meanRelError(fitCirclePratt, Math.PI, 0.02, 100))).toBeLessThan(0.005);
  });

  it('returns null for collinear points', () => {
    // Degenerate input rule.
    expect(fitCirclePratt([0, 1, 2], [1, 1, 1])).toBeNull();
  });
});

describe('fitCircleTaubinWeighted', () => {
  it('ignores points of zero weight', () => {
    // Weighted moments: a zero weight removes the point from every sum.
    const { u, v } = arc(40, 1, 1, 0.5, 2 * Math.PI, 0, 6);
    const w = new Float64Array(40).fill(1);
    for (let i = 0; i < 8; i++) {
      u[i] = 5 + i;
      w[i] = 0;
    }
    expect(fitCircleTaubinWeighted(u, v, w)!.radius).toBeCloseTo(0.5, 9);
  });
});

describe('refineCircleGeometric', () => {
  it('lowers the sum of squared geometric distances of the algebraic start', () => {
    // The geometric fit is by definition the minimiser of Σ(|p−c|−r)² (Chernov 2010, §4).
    const { u, v } = arc(100, 0, 0, 1, Math.PI / 2, 0.05, 8);
    const start = fitCircleTaubin(u, v)!;
    const ref = refineCircleGeometric(u, v, start);
    const cost = (c: { cu: number; cv: number; radius: number }) => {
      let s = 0;
      for (let i = 0; i < u.length; i++) s += (Math.hypot(u[i] - c.cu, v[i] - c.cv) - c.radius) ** 2;
      return s;
    };
    expect(cost(ref)).toBeLessThanOrEqual(cost(start));
    // at the minimum the gradient ∂/∂r = −2Σ(ρ−r) vanishes: r is the mean distance to the centre
    let meanRho = 0;
    for (let i = 0; i < u.length; i++) meanRho += Math.hypot(u[i] - ref.cu, v[i] - ref.cv);
    expect(ref.radius).toBeCloseTo(meanRho / u.length, 8);
  });
});

describe('fitCircleLmeds', () => {
  it('recovers a half-arc circle with 40 % gross outliers where Taubin fails', () => {
    // Least median of squares has a 50 % breakdown point (Rousseeuw 1984, JASA 79:871);
    // algebraic fits have breakdown point 0.
    const rnd = createRandom(31);
    const n = 200;
    const u = new Float64Array(n);
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const th = rnd.uniform(0, Math.PI);
      const rr = i % 5 < 2 ? rnd.uniform(0, 3) : 1 + 0.002 * rnd.normal();
      u[i] = rr * Math.cos(th);
      v[i] = rr * Math.sin(th);
    }
    const l = fitCircleLmeds(u, v)!;
    expect(Math.abs(l.circle.radius - 1)).toBeLessThan(0.02);
    expect(Math.hypot(l.circle.cu, l.circle.cv)).toBeLessThan(0.02);
    expect(Math.abs(fitCircleTaubin(u, v)!.radius - 1)).toBeGreaterThan(0.05);
    // repeatable: the triples come from a fixed seed
    expect(fitCircleLmeds(u, v)).toEqual(l);
  });

  it('returns null with fewer than 3 points or only collinear points', () => {
    // Degenerate input rule.
    expect(fitCircleLmeds([0, 1], [0, 1])).toBeNull();
    expect(fitCircleLmeds([0, 1, 2, 3], [0, 1, 2, 3])).toBeNull();
  });
});

describe('medianAbsResidual', () => {
  it('is the median distance of the points from the circle line', () => {
    // Points at radii 1, 2, 4 around the origin: |ρ − 2| = 1, 0, 2 → median 1.
    const u = [1, 0, -4];
    const v = [0, 2, 0];
    expect(medianAbsResidual(u, v, 3, { cu: 0, cv: 0, radius: 2 }, new Float64Array(3))).toBe(1);
  });
});
