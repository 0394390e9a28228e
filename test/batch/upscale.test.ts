import { describe, expect, it } from 'vitest';
import { batchOptions } from '../../core/batch/options.js';
import { compareSpecies } from '../../core/batch/species.js';
import { formatPlotsCsv, formatStemsCsv, parseInventory, upscaleInventory } from '../../core/batch/upscale.js';
import { XylemapError } from '../../core/util/errors.js';
import { createRandom } from '../../core/util/random.js';
import { fitPowerLaw } from '../../core/batch/power-law.js';
import { fakeStand } from './fixtures.js';

const o = { ...batchOptions.defaults(), permutation_replicates: 199, bootstrap_replicates: 300 };

describe('parseInventory', () => {
  it('reads one stem per row', () => {
    const s = parseInventory('plot_id,plot_area_m2,species,dbh_m\nP1,400,oak,0.3\nP1,400,pine,0.2\n', 'inv.csv', 5);
    expect(s).toEqual([
      { line: 2, plotId: 'P1', plotAreaM2: 400, species: 'oak', dbhM: 0.3 },
      { line: 3, plotId: 'P1', plotAreaM2: 400, species: 'pine', dbhM: 0.2 },
    ]);
  });
  it('detects DBH given in centimetres and non-positive or inconsistent plot areas, all rows in one error', () => {
    const text = 'plot_id,plot_area_m2,species,dbh_m\nP1,400,oak,31\nP1,400,oak,0.2\nP2,0,oak,0.3\nP3,100,oak,0.1\nP3,200,oak,-1\n';
    let err: XylemapError | undefined;
    try {
      parseInventory(text, 'inv.csv', 5);
    } catch (e) {
      err = e as XylemapError;
    }
    expect(err).toBeInstanceOf(XylemapError);
    const m = err!.oneLine();
    expect(m).toContain('4 problems');
    expect(m).toContain('line 2: dbh_m 31 is implausible');
    expect(m).toContain('line 4: plot_area_m2 must be > 0');
    expect(m).toContain('line 6: plot P3 has plot_area_m2 200 here but 100 on line 5');
    expect(m).toContain('line 6: dbh_m must be > 0 m');
    expect(m).toContain('centimetres');
  });
  it('names missing columns', () => {
    expect(() => parseInventory('plot,species,dbh_cm\n', 'inv.csv', 5)).toThrow(/plot_id, plot_area_m2, dbh_m/);
  });
});

describe('upscaleInventory', () => {
  const { fits } = compareSpecies(fakeStand(), o);
  const stems = parseInventory(
    'plot_id,plot_area_m2,species,dbh_m\nA,500,oak,0.3\nA,500,oak,0.5\nA,500,birch,0.3\nB,250,pine,0.2\nB,250,pine,1.2\n',
    'inv.csv',
    5,
  );
  const u = upscaleInventory(stems, fits, o);
  it('sums K = c·DBH^d per plot over ground area with the species fit (exact data: oak 2·DBH^2.5, pine DBH^2)', () => {
    const a = u.plots[0];
    // birch is unscanned: pooled fit, whose residual sd s > 0 brings the lognormal mean factor exp(s²/2)
    const s = fits.pooled!.logResidualSd;
    const birch = fits.pooled!.c * Math.pow(0.3, fits.pooled!.d) * Math.exp((s * s) / 2);
    expect(a.conductancePerAreaKgPerSPerMPaPerM2).toBeCloseTo((2 * Math.pow(0.3, 2.5) + 2 * Math.pow(0.5, 2.5) + birch) / 500, 12);
    expect(u.plots[1].conductancePerAreaKgPerSPerMPaPerM2).toBeCloseTo((0.04 + 1.44) / 250, 12);
  });
  it('says per stem which fit was used: species when fitted, pooled for unscanned species', () => {
    expect(u.stems.map((s) => s.fit)).toEqual(['species', 'species', 'pooled', 'species', 'species']);
    expect(u.plots[0].stemsPooledFit).toBe(1);
  });
  it('flags stems outside the scanned DBH range of their fit (pine scanned 0.15–0.4 m)', () => {
    expect(u.stems.map((s) => s.outsideScannedRange)).toEqual([false, false, false, false, true]);
    expect(u.plots[1].stemsOutsideScannedRange).toBe(1);
  });
  it('gives an interval that contains the estimate, and collapses for a plot of exactly-fitted species', () => {
    const a = u.plots[0];
    expect(a.ci[0]).toBeLessThanOrEqual(a.conductancePerAreaKgPerSPerMPaPerM2);
    expect(a.ci[1]).toBeGreaterThan(a.conductancePerAreaKgPerSPerMPaPerM2);
    const b = u.plots[1];
    expect(b.ci[1] - b.ci[0]).toBeLessThan(1e-9 * b.conductancePerAreaKgPerSPerMPaPerM2 + 1e-15);
  });
  it('applies the lognormal bias correction exp(s²/2) only when asked (Baskerville 1972; Sprugel 1983)', () => {
    const raw = upscaleInventory(stems, fits, { ...o, upscale_bias_correction: false });
    const s = fits.pooled!.logResidualSd;
    expect(u.stems[2].conductanceKgPerSPerMPa / raw.stems[2].conductanceKgPerSPerMPa).toBeCloseTo(Math.exp((s * s) / 2), 12);
    // exact species fits (s = 0) are unchanged
    expect(u.stems[0].conductanceKgPerSPerMPa).toBeCloseTo(raw.stems[0].conductanceKgPerSPerMPa, 14);
  });
  it('gives a prediction interval at least as wide as the fit-only interval for a plot with scatter', () => {
    const fitOnly = upscaleInventory(stems, fits, { ...o, upscale_interval: 'fit' });
    const w = (p: { ci: [number, number] }): number => p.ci[1] - p.ci[0];
    expect(w(u.plots[0])).toBeGreaterThan(w(fitOnly.plots[0]));
    expect(fitOnly.plots[0].ci[0]).toBeLessThanOrEqual(fitOnly.plots[0].conductancePerAreaKgPerSPerMPaPerM2);
    expect(fitOnly.plots[0].ci[1]).toBeGreaterThanOrEqual(fitOnly.plots[0].conductancePerAreaKgPerSPerMPaPerM2);
  });
  it('covers the true plot total in about 95 % of seeded repetitions (lognormal power law with known truth)', () => {
    // Truth: ln K = ln 2 + 2.5 ln DBH + ε, ε ~ N(0, 0.3²); 15 scanned trees, a 20-stem plot. The
    // prediction interval must cover the plot's actual total, the fit interval its expected total
    // Σ 2·DBH^2.5·exp(σ²/2) (lognormal mean). Percentile bootstraps under-cover a little at small n
    // (Efron & Tibshirani 1993, ch. 14), hence the lower bound 0.85 (common practice, no source).
    const rng = createRandom(42);
    const R = 100;
    const sigma = 0.3;
    let covP = 0;
    let covF = 0;
    for (let r = 0; r < R; r++) {
      const dbh: number[] = [];
      const k: number[] = [];
      for (let i = 0; i < 15; i++) {
        const d = rng.uniform(0.1, 0.8);
        dbh.push(d);
        k.push(2 * d ** 2.5 * Math.exp(sigma * rng.normal()));
      }
      const fit = fitPowerLaw(dbh, k, 0.95)!;
      const f = { bySpecies: new Map([['oak', fit]]), pooled: fit, data: new Map([['oak', { dbhM: dbh, conductance: k }]]) };
      const plot = Array.from({ length: 20 }, (_, i) => ({ line: i + 2, plotId: 'A', plotAreaM2: 100, species: 'oak', dbhM: rng.uniform(0.15, 0.7) }));
      const actual = plot.reduce((a, s) => a + 2 * s.dbhM ** 2.5 * Math.exp(sigma * rng.normal()), 0) / 100;
      const expected = plot.reduce((a, s) => a + 2 * s.dbhM ** 2.5 * Math.exp((sigma * sigma) / 2), 0) / 100;
      const base = { ...o, bootstrap_replicates: 200, seed: r };
      const p = upscaleInventory(plot, f, { ...base, upscale_interval: 'prediction' }).plots[0];
      const e = upscaleInventory(plot, f, { ...base, upscale_interval: 'fit' }).plots[0];
      if (actual >= p.ci[0] && actual <= p.ci[1]) covP++;
      if (expected >= e.ci[0] && expected <= e.ci[1]) covF++;
    }
    expect(covP / R).toBeGreaterThanOrEqual(0.85);
    expect(covP / R).toBeLessThanOrEqual(0.995);
    expect(covF / R).toBeGreaterThanOrEqual(0.85);
    expect(covF / R).toBeLessThanOrEqual(0.995);
  });
  it('throws a XylemapError when no fit exists at all', () => {
    expect(() => upscaleInventory(stems, { bySpecies: new Map(), pooled: undefined, data: new Map() }, o)).toThrow(XylemapError);
  });
});

describe('formatPlotsCsv', () => {
  it('writes one row per plot with the interval columns', () => {
    const { fits } = compareSpecies(fakeStand(), o);
    const u = upscaleInventory(parseInventory('plot_id,plot_area_m2,species,dbh_m\nA,100,oak,0.3\n', 'i', 5), fits, o);
    const lines = formatPlotsCsv(u).trim().split('\n');
    expect(lines[0]).toContain('conductance_per_ground_area_kg_s_mpa_m2,ci95_low_kg_s_mpa_m2');
    expect(lines).toHaveLength(2);
  });
});

describe('formatStemsCsv', () => {
  it('writes every stem with its fit and range flag', () => {
    const { fits } = compareSpecies(fakeStand(), o);
    const u = upscaleInventory(parseInventory('plot_id,plot_area_m2,species,dbh_m\nA,100,oak,0.9\n', 'i', 5), fits, o);
    expect(formatStemsCsv(u).trim().split('\n')[1]).toMatch(/^2,A,oak,0\.9,species,[0-9.e-]+,true$/);
  });
});
