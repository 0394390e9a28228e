import { describe, expect, it } from 'vitest';
import { ARC_SECTORS, cholSolve5, fitCylinder, type CylinderFit } from '../../../core/reconstruct/fit/cylinder-fit.js';
import { createRandom } from '../../../core/util/random.js';
import {
  basis,
  distanceToLine,
  lineAngle,
  sampleCylinder,
  unit,
  type CylinderSpec,
} from '../../../core/reconstruct/fit/sample-cylinder.js';
import type { Vec3 } from '../../../core/types/network.js';

function fitSample(spec: CylinderSpec, options: Parameters<typeof fitCylinder>[4] = {}): CylinderFit {
  const s = sampleCylinder(spec);
  const f = fitCylinder(s.x, s.y, s.z, s.indices, options);
  expect(f).not.toBeNull();
  return f!;
}

const TILTED: Vec3 = unit([0.6, -0.3, 0.74]);

describe('fitCylinder', () => {
  it('recovers radius and axis of exact points on full and half arcs, tilted, far from the origin', () => {
    // Analytic case: noise-free points lie on the true cylinder, where every residual is zero.
    // Offsets of 5e6 m limit the data themselves to ~1e-9 m (IEEE 754 spacing).
    const centre: Vec3 = [512345.6, 5123456.7, 312.3];
    for (const arcRad of [2 * Math.PI, Math.PI]) {
      const f = fitSample({ n: 300, radiusM: 0.08, lengthM: 0.5, arcRad, noiseM: 0, axis: TILTED, centre, seed: 3 });
      expect(Math.abs(f.radiusM - 0.08)).toBeLessThan(1e-7);
      expect(lineAngle(f.axisDir, TILTED)).toBeLessThan(1e-6);
      expect(distanceToLine(f.axisPoint, centre, TILTED)).toBeLessThan(1e-7);
      expect(f.converged).toBe(true);
      expect(f.inlierCount).toBe(300);
    }
  });

  it('has radius standard error σ/√n on a full arc, matching the spread over seeded replicates', () => {
    // For uniform angular coverage the radius column of the Jacobian is orthogonal to the others
    // (∂d/∂r = −1, Σcos θ = Σsin θ = 0), so var(r̂) = σ²/n (least-squares theory, e.g. Seber & Wild 1989).
    const sigma = 0.001;
    const n = 400;
    const radii: number[] = [];
    const ses: number[] = [];
    for (let seed = 1; seed <= 40; seed++) {
      const f = fitSample({ n, radiusM: 0.05, lengthM: 0.3, arcRad: 2 * Math.PI, noiseM: sigma, axis: TILTED, seed });
      radii.push(f.radiusM);
      ses.push(f.radiusSeM);
      expect(Math.abs(f.radiusM - 0.05)).toBeLessThan(4 * f.radiusSeM);
    }
    const mean = radii.reduce((a, b) => a + b, 0) / radii.length;
    const sd = Math.sqrt(radii.reduce((a, b) => a + (b - mean) ** 2, 0) / (radii.length - 1));
    const meanSe = ses.reduce((a, b) => a + b, 0) / ses.length;
    const theory = sigma / Math.sqrt(n);
    expect(Math.abs(meanSe / theory - 1)).toBeLessThan(0.15);
    // 40 replicates: the sample SD is within ±35 % of the truth with >99 % probability (χ² with 39 dof)
    expect(Math.abs(sd / theory - 1)).toBeLessThan(0.35);
    // bias well below σ (here below σ/10)
    expect(Math.abs(mean - 0.05)).toBeLessThan(0.1 * sigma);
  });

  it('keeps the radius unbiased on half arcs with 2 mm noise', () => {
    // Geometric least squares is consistent; its O(σ²/r) bias is 8e-5 m here (Chernov 2010, §6).
    let sum = 0;
    const reps = 30;
    for (let seed = 1; seed <= reps; seed++) {
      const f = fitSample({ n: 300, radiusM: 0.05, lengthM: 0.3, arcRad: Math.PI, noiseM: 0.002, axis: TILTED, seed: 100 + seed });
      expect(Math.abs(f.radiusM - 0.05)).toBeLessThan(5 * f.radiusSeM);
      expect(f.arcCoverage).toBeGreaterThanOrEqual(8 / ARC_SECTORS);
      expect(f.arcCoverage).toBeLessThanOrEqual(9 / ARC_SECTORS);
      sum += f.radiusM;
    }
    expect(Math.abs(sum / reps - 0.05)).toBeLessThan(0.0005);
  });

  it('fits a 90° arc of a 10 cm branch to within 5 % of the radius with 1 mm noise', () => {
    // One-sided scan of a thick branch; short arcs inflate the variance, not the bias (Chernov 2010, §6).
    const f = fitSample({ n: 400, radiusM: 0.1, lengthM: 0.4, arcRad: Math.PI / 2, noiseM: 0.001, axis: [0, 1, 0.2], seed: 5 });
    expect(Math.abs(f.radiusM - 0.1) / 0.1).toBeLessThan(0.05);
    expect(f.arcCoverage).toBeLessThanOrEqual(5 / ARC_SECTORS);
  });

  for (const fo of [0.1, 0.2]) {
    it(`keeps the radius within 2 % with ${fo * 100} % outliers under Tukey and Huber weights`, () => {
      // Redescending M-estimators resist gross errors (Huber 1981, Robust Statistics); plain least
      // squares on the same points is shown to be pulled further away.
      for (const robust of ['tukey', 'huber'] as const) {
        let worst = 0;
        let worstPlain = 0;
        for (let seed = 1; seed <= 10; seed++) {
          const spec: CylinderSpec = { n: 400, radiusM: 0.04, lengthM: 0.3, arcRad: 2 * Math.PI, noiseM: 0.001, outlierFraction: fo, axis: TILTED, seed };
          const f = fitSample(spec, { robust });
          worst = Math.max(worst, Math.abs(f.radiusM - 0.04) / 0.04);
          const p = fitSample(spec, { robust: 'none' });
          worstPlain = Math.max(worstPlain, Math.abs(p.radiusM - 0.04) / 0.04);
        }
        expect(worst).toBeLessThan(robust === 'tukey' ? 0.02 : 0.05);
        expect(worst).toBeLessThan(worstPlain);
      }
    });
  }

  it('gives a radius standard error that matches the replicate spread under Tukey weights with 15 % outliers', () => {
    // M-estimator sandwich covariance (Huber 1981, §7.6) is consistent for down-weighted fits.
    const radii: number[] = [];
    const ses: number[] = [];
    for (let seed = 1; seed <= 40; seed++) {
      const f = fitSample({ n: 300, radiusM: 0.05, lengthM: 0.3, arcRad: 2 * Math.PI, noiseM: 0.001, outlierFraction: 0.15, axis: TILTED, seed: 500 + seed });
      radii.push(f.radiusM);
      ses.push(f.radiusSeM);
    }
    const mean = radii.reduce((a, b) => a + b, 0) / radii.length;
    const sd = Math.sqrt(radii.reduce((a, b) => a + (b - mean) ** 2, 0) / (radii.length - 1));
    const meanSe = ses.reduce((a, b) => a + b, 0) / ses.length;
    // 40 replicates: sample SD within ±35 % of the truth with >99 % probability (χ², 39 dof)
    expect(Math.abs(meanSe / sd - 1)).toBeLessThan(0.35);
  });

  it('excludes outliers from the inlier count and the RMSE', () => {
    // Inliers are points within 3 robust σ of the surface (common practice, no source).
    const s = sampleCylinder({ n: 500, radiusM: 0.06, lengthM: 0.3, arcRad: 2 * Math.PI, noiseM: 0.001, outlierFraction: 0.15, seed: 21 });
    const f = fitCylinder(s.x, s.y, s.z, s.indices)!;
    const clean = s.outlier.reduce((a, b) => a + (b ? 0 : 1), 0);
    // some outliers fall by chance near the surface; almost all clean points are kept
    expect(f.inlierCount).toBeGreaterThan(0.97 * clean);
    expect(f.inlierCount).toBeLessThan(clean + 0.1 * (500 - clean));
    expect(f.rmseM).toBeLessThan(0.0015);
  });

  it('finds the axis of a stub shorter than its diameter without an initial axis', () => {
    // A short wide cylinder has its largest spread across the axis, not along it (PCA of a disc).
    const f = fitSample({ n: 300, radiusM: 0.2, lengthM: 0.1, arcRad: 2 * Math.PI, noiseM: 0.0005, axis: TILTED, seed: 8 });
    expect(lineAngle(f.axisDir, TILTED)).toBeLessThan(0.01);
    expect(Math.abs(f.radiusM - 0.2)).toBeLessThan(0.001);
  });

  it('converges from an initial axis 15° off', () => {
    // LM from a perturbed start reaches the same minimum (Marquardt 1963).
    const [e1] = basis(TILTED);
    const t = (15 * Math.PI) / 180;
    const axis0 = unit([0, 1, 2].map((k) => Math.cos(t) * TILTED[k] + Math.sin(t) * e1[k]) as Vec3);
    expect(lineAngle(axis0, TILTED)).toBeCloseTo(t, 12);
    const f = fitSample({ n: 300, radiusM: 0.05, lengthM: 0.4, arcRad: 2 * Math.PI, noiseM: 0.0005, axis: TILTED, seed: 9 }, { initialAxis: axis0 });
    expect(lineAngle(f.axisDir, TILTED)).toBeLessThan(0.01);
    expect(Math.abs(f.radiusM - 0.05)).toBeLessThan(0.0005);
    // orientation follows the given axis
    expect(f.axisDir[0] * axis0[0] + f.axisDir[1] * axis0[1] + f.axisDir[2] * axis0[2]).toBeGreaterThan(0);
  });

  it('puts start and end at the extreme projections of the points, one length apart', () => {
    // Uniform heights on [−L/2, L/2]: the sample range approaches L as n grows (E = L(n−1)/(n+1)).
    const f = fitSample({ n: 1000, radiusM: 0.03, lengthM: 0.25, arcRad: 2 * Math.PI, noiseM: 0.0003, axis: [0, 0, 1], centre: [1, 2, 3], seed: 10 });
    expect(f.lengthM).toBeGreaterThan(0.245);
    expect(f.lengthM).toBeLessThanOrEqual(0.2501);
    expect(Math.hypot(f.end[0] - f.start[0], f.end[1] - f.start[1], f.end[2] - f.start[2])).toBeCloseTo(f.lengthM, 10);
    expect(f.start[2]).toBeLessThan(f.end[2]); // axis points upwards by convention
    expect((f.start[2] + f.end[2]) / 2).toBeCloseTo(3, 2);
  });

  it('reports arc coverage of about 1/6 for a 60° arc', () => {
    // 60° of 360° spans 2.67 of 16 sectors, so 3 or 4 sectors hold points.
    const f = fitSample({ n: 300, radiusM: 0.05, lengthM: 0.3, arcRad: Math.PI / 3, noiseM: 0.0002, seed: 11 });
    expect(f.arcCoverage).toBeGreaterThanOrEqual(3 / ARC_SECTORS);
    expect(f.arcCoverage).toBeLessThanOrEqual(4 / ARC_SECTORS);
  });

  it('does not count a sector holding only a few stray surface points as covered', () => {
    // Coverage rule documented in cylinder-fit.ts: a sector needs a tenth of its even share of inliers.
    const s = sampleCylinder({ n: 800, radiusM: 0.05, lengthM: 0.3, arcRad: Math.PI, noiseM: 0.0005, seed: 14 });
    // three stray points exactly on the surface, on the far side (angles 200°–340°)
    for (const [k, deg] of [[0, 200], [1, 270], [2, 340]] as const) {
      const th = (deg * Math.PI) / 180;
      s.x[k] = 0.05 * Math.cos(th);
      s.y[k] = 0.05 * Math.sin(th);
    }
    const f = fitCylinder(s.x, s.y, s.z, s.indices, { initialAxis: [0, 0, 1] })!;
    expect(f.arcCoverage).toBeLessThanOrEqual(9 / ARC_SECTORS);
  });

  it('leaves out points of zero prior weight and fits the rest exactly', () => {
    // Prior weights multiply the robust weights; weight 0 removes a point (weighted least squares).
    const s = sampleCylinder({ n: 300, radiusM: 0.03, lengthM: 0.2, arcRad: Math.PI, noiseM: 0, outlierFraction: 0.3, axis: TILTED, seed: 15 });
    const w = Float64Array.from(s.outlier, (o) => (o ? 0 : 1));
    const f = fitCylinder(s.x, s.y, s.z, s.indices, { weights: w, robust: 'none' })!;
    expect(Math.abs(f.radiusM - 0.03)).toBeLessThan(1e-9);
    expect(f.pointCount).toBe(300 - s.outlier.reduce((a, b) => a + b, 0));
    expect(fitCylinder(s.x, s.y, s.z, s.indices, { weights: new Float64Array(300) })).toBeNull();
    w.fill(NaN);
    expect(fitCylinder(s.x, s.y, s.z, s.indices, { weights: w })).toBeNull();
  });

  it('returns identical results for identical input', () => {
    // Repeatability rule of the project: no hidden randomness.
    const a = fitSample({ n: 200, radiusM: 0.05, lengthM: 0.3, arcRad: 4, noiseM: 0.001, outlierFraction: 0.1, seed: 12 });
    const b = fitSample({ n: 200, radiusM: 0.05, lengthM: 0.3, arcRad: 4, noiseM: 0.001, outlierFraction: 0.1, seed: 12 });
    expect(b).toEqual(a);
  });

  it('returns null for too few, collinear, coincident or non-finite points, never NaN', () => {
    // Degenerate input rule of the fit module.
    const idx = (n: number) => Int32Array.from({ length: n }, (_, i) => i);
    expect(fitCylinder([0, 1, 0, 1, 0], [0, 0, 1, 1, 0], [0, 0, 0, 1, 1], idx(5))).toBeNull();
    const line = Array.from({ length: 20 }, (_, i) => i * 0.01);
    expect(fitCylinder(line, line, line, idx(20))).toBeNull();
    const same = new Array(20).fill(3);
    expect(fitCylinder(same, same, same, idx(20))).toBeNull();
    const s = sampleCylinder({ n: 50, radiusM: 0.05, lengthM: 0.3, arcRad: 2 * Math.PI, noiseM: 0, seed: 13 });
    s.x[7] = NaN;
    expect(fitCylinder(s.x, s.y, s.z, s.indices)).toBeNull();
    s.x[7] = 0;
    expect(fitCylinder(s.x, s.y, s.z, s.indices, { initialAxis: [0, 0, 0] })).toBeNull();
  });

  it('gives finite fields for a flat patch (plane) — a huge radius, not NaN', () => {
    // A plane is the limit of a cylinder as r → ∞; the fit must stay finite for the reliability rule.
    const n = 200;
    const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      x[i] = (i % 20) * 0.01;
      y[i] = Math.floor(i / 20) * 0.01 + 0.0001 * Math.sin(i * 12.9898);
      z[i] = 0.0002 * Math.sin(i * 78.233);
    }
    const f = fitCylinder(x, y, z, Int32Array.from({ length: n }, (_, i) => i));
    if (f) {
      for (const v of [f.radiusM, f.radiusSeM, f.rmseM, f.arcCoverage, ...f.axisDir, ...f.start, ...f.end]) {
        expect(Number.isNaN(v)).toBe(false);
      }
      expect(f.radiusM).toBeGreaterThan(0.1);
    }
  });
});

describe('cholSolve5', () => {
  it('solves M x = b for seeded random symmetric positive definite 5×5 matrices to 1e-10', () => {
    // M = Gᵀ G + I is symmetric positive definite; check the residual M x − b (Golub & Van Loan §4.2).
    const rnd = createRandom(19);
    for (let t = 0; t < 100; t++) {
      const G = Array.from({ length: 5 }, () => Array.from({ length: 5 }, () => rnd.normal()));
      const M = Array.from({ length: 5 }, (_, i) => Array.from({ length: 5 }, (_, j) => G.reduce((s, row) => s + row[i] * row[j], 0) + (i === j ? 1 : 0)));
      const b = Array.from({ length: 5 }, () => rnd.normal());
      const m = Float64Array.from(M.flat());
      const x = Float64Array.from(b);
      expect(cholSolve5(m, x)).toBe(true);
      for (let i = 0; i < 5; i++) {
        const r = M[i].reduce((s, v, j) => s + v * x[j], 0) - b[i];
        expect(Math.abs(r)).toBeLessThan(1e-10);
      }
    }
  });

  it('reports a matrix that is not positive definite', () => {
    const m = new Float64Array(25);
    m[0] = -1;
    expect(cholSolve5(m, new Float64Array(5))).toBe(false);
  });
});
