import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../core/io/csv.js';
import { batchOptions } from '../../core/batch/options.js';
import { compareSpecies, fitDbh, formatSpeciesCsv, formatSpeciesPairsCsv, speciesNames, wbeQuantities } from '../../core/batch/species.js';
import { sampleSd, studentTQuantile } from '../../core/batch/stats.js';
import { fakeStand, fakeSummary } from './fixtures.js';

const o = { ...batchOptions.defaults(), permutation_replicates: 999, bootstrap_replicates: 500 };

describe('fitDbh', () => {
  it('takes scan, field, or field-when-given DBH as the option says', () => {
    const t = { index: 0, treeId: 't', species: 's', file: '', plot: '', preset: '', fieldDbhM: 0.5, summary: fakeSummary(0.4, 2, 1) };
    expect(fitDbh(t, 'scan')).toBe(0.4);
    expect(fitDbh(t, 'field')).toBe(0.5);
    expect(fitDbh({ ...t, fieldDbhM: NaN }, 'field_if_given')).toBe(0.4);
  });
});

describe('wbeQuantities', () => {
  it('flattens the numeric WBE quantities one level deep, the pooled block without prefix', () => {
    expect(wbeQuantities(fakeSummary(0.3, 2, 1))).toEqual({ beta: 0.7, gamma: 0.8, theta: 0.75 });
    expect(wbeQuantities({ scaling: { wbe: { other: { x: 1 }, by_order: [{ x: 2 }] } } })).toEqual({ other_x: 1 });
    expect(wbeQuantities({})).toEqual({});
  });
});

describe('speciesNames', () => {
  it('sorts species by code unit, independent of locale', () => {
    expect(speciesNames(fakeStand().reverse())).toEqual(['oak', 'pine']);
  });
});

describe('compareSpecies', () => {
  const { comparison, fits } = compareSpecies(fakeStand(), o);
  it('gives per-species mean, sd and the Student t-interval of the exponent (t table value for df = 3)', () => {
    const oak = comparison.species.find((s) => s.species === 'oak')!;
    const exps = [2.0, 2.1, 2.2, 2.3];
    expect(oak.exponent.mean).toBeCloseTo(2.15, 12);
    expect(oak.exponent.sd).toBeCloseTo(sampleSd(exps), 12);
    // t(0.975, 3) = 3.182 (NIST/SEMATECH t table)
    expect(oak.exponent.ci[1]! - 2.15).toBeCloseTo((3.182 * sampleSd(exps)) / 2, 3);
    expect(studentTQuantile(0.975, 3)).toBeCloseTo(3.182, 3);
  });
  it('recovers each species power law K = c·DBH^d exactly from exact data, and flags that the pooled fit is not exact', () => {
    expect(fits.bySpecies.get('oak')!.c).toBeCloseTo(2, 10);
    expect(fits.bySpecies.get('oak')!.d).toBeCloseTo(2.5, 10);
    expect(fits.bySpecies.get('pine')!.d).toBeCloseTo(2, 10);
    expect(fits.pooled!.n).toBe(7);
    expect(fits.pooled!.logResidualSd).toBeGreaterThan(0.01);
  });
  it('tests the pairwise exponent difference with a permutation p-value and a bootstrap interval', () => {
    const p = comparison.pairwise[0];
    expect(p.species_a).toBe('oak');
    expect(p.exponent_difference).toBeCloseTo(2.15 - 2.7, 12);
    // all 4 oak exponents lie below all 3 pine ones: only the observed split of the C(7,4) = 35 is as
    // extreme, so the exact two-sided permutation p is 1/35 (enumeration)
    const exact = compareSpecies(fakeStand(), { ...o, permutation_replicates: 9999 }).comparison.pairwise[0];
    // binomial sd of the estimate √(p(1−p)/9999) ≈ 0.0017; 4 sd tolerance
    expect(Math.abs(exact.p_value_permutation! - 1 / 35)).toBeLessThan(0.007);
    expect(p.ci_bootstrap[1]!).toBeLessThan(0);
  });
  it('gives the same numbers for the same seed and trees in any order', () => {
    const again = compareSpecies(fakeStand().reverse(), o).comparison;
    expect(JSON.stringify(again)).toBe(JSON.stringify(comparison));
  });
  it('leaves a species with too few trees without its own fit', () => {
    const few = compareSpecies(fakeStand().filter((t) => t.treeId !== 'pine-2'), o);
    expect(few.fits.bySpecies.has('pine')).toBe(false);
    expect(few.comparison.species.find((s) => s.species === 'pine')!.conductance_fit).toBeNull();
  });
});

describe('formatSpeciesCsv', () => {
  it('writes one row per species plus a pooled row with the WBE means and K–DBH fit columns', () => {
    const { header, rows } = parseCsv(formatSpeciesCsv(compareSpecies(fakeStand(), o).comparison));
    expect(rows.map((r) => r[0])).toEqual(['oak', 'pine', 'pooled']);
    expect(header).toContain('wbe_beta_mean');
    expect(Number(rows[0][header.indexOf('k_d')])).toBeCloseTo(2.5, 10);
  });
});

describe('formatSpeciesPairsCsv', () => {
  it('writes one row per pair of species', () => {
    const { rows } = parseCsv(formatSpeciesPairsCsv(compareSpecies(fakeStand(), o).comparison));
    expect(rows).toHaveLength(1);
    expect(rows[0].slice(0, 4)).toEqual(['oak', 'pine', '4', '3']);
  });
});
