import { describe, expect, it } from 'vitest';
import { fitPowerLaw, predictConductance } from '../../core/batch/power-law.js';

// Anscombe (1973) data set I, used through exp(): ln of the data gives back the published line
// y = 3.0001 + 0.5001 x with SEs 1.1247 / 0.1179 (see stats.test.ts for the source).
const AX = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
const AY = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];

describe('fitPowerLaw', () => {
  it('recovers c and d exactly from data on an exact power law K = 12·DBH^2.4 (analytic)', () => {
    const dbh = [0.1, 0.2, 0.35, 0.5, 0.8];
    const k = dbh.map((d) => 12 * Math.pow(d, 2.4));
    const f = fitPowerLaw(dbh, k, 0.95)!;
    expect(f.c).toBeCloseTo(12, 10);
    expect(f.d).toBeCloseTo(2.4, 12);
    expect(f.dbhMinM).toBe(0.1);
    expect(f.dbhMaxM).toBe(0.8);
  });
  it('gives the log-log t-intervals of a published regression (Anscombe I through exp)', () => {
    const f = fitPowerLaw(AX.map(Math.exp), AY.map(Math.exp), 0.95)!;
    expect(f.d).toBeCloseTo(0.5001, 4);
    expect(Math.log(f.c)).toBeCloseTo(3.0001, 4);
    // 9 df, t(0.975, 9) = 2.262 (NIST t table)
    expect(f.dCi95[1] - f.d).toBeCloseTo(2.262 * 0.1179, 3);
    expect(Math.log(f.cCi95[1]) - Math.log(f.c)).toBeCloseTo(2.262 * 1.1247, 2);
  });
  it('leaves out non-positive pairs and refuses fewer than three usable trees', () => {
    expect(fitPowerLaw([0.1, 0.2, -1, 0.3], [1, 2, 3, NaN], 0.95)).toBeUndefined();
    expect(fitPowerLaw([0.2, 0.2, 0.2], [1, 2, 3], 0.95)).toBeUndefined();
  });
});

describe('predictConductance', () => {
  it('evaluates c·DBH^d', () => {
    expect(predictConductance({ c: 3, d: 2 }, 0.5)).toBeCloseTo(0.75, 15);
  });
});
