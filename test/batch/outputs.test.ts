import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../core/io/csv.js';
import { batchOptions } from '../../core/batch/options.js';
import { formatFailuresCsv, standOutputs } from '../../core/batch/outputs.js';
import { parseInventory } from '../../core/batch/upscale.js';
import { fakeStand } from './fixtures.js';

const o = { ...batchOptions.defaults(), permutation_replicates: 199, bootstrap_replicates: 200 };

describe('formatFailuresCsv', () => {
  it('lists failed trees in manifest order with their error, header only when none failed', () => {
    const text = formatFailuresCsv([
      { index: 5, treeId: 'b', species: 's', file: 'b.las', error: 'b.las: no stem, found' },
      { index: 1, treeId: 'a', species: 's', file: 'a.las', error: 'x' },
    ]);
    const { rows } = parseCsv(text);
    expect(rows.map((r) => r[0])).toEqual(['a', 'b']);
    expect(rows[1][3]).toBe('b.las: no stem, found');
    expect(formatFailuresCsv([])).toBe('tree_id,species,file,error\n');
  });
});

describe('standOutputs', () => {
  it('writes every stand table, and plots/stems only with an inventory', () => {
    const plain = standOutputs(fakeStand(), [], o);
    expect(Object.keys(plain.files).sort()).toEqual(['failures.csv', 'species-pairs.csv', 'species.csv', 'species.json', 'stand.csv', 'stand.json']);
    const inv = parseInventory('plot_id,plot_area_m2,species,dbh_m\nA,100,oak,0.3\n', 'i.csv', 5);
    const withInv = standOutputs(fakeStand(), [], o, inv);
    expect(withInv.files['plots.csv']).toBeDefined();
    expect(JSON.parse(withInv.files['stand.json']).upscaling.plots[0].plot_id).toBe('A');
  });
  it('turns an impossible upscaling into a warning instead of losing the other tables', () => {
    const inv = parseInventory('plot_id,plot_area_m2,species,dbh_m\nA,100,oak,0.3\n', 'i.csv', 5);
    const r = standOutputs(fakeStand().slice(0, 2), [], o, inv);
    expect(r.warnings[0]).toContain('inventory not upscaled');
    expect(r.files['plots.csv']).toBeUndefined();
    expect(JSON.parse(r.files['stand.json']).upscaling.error).toContain('fewer than 3');
  });
  it('depends only on the set of trees, not their order', () => {
    const a = standOutputs(fakeStand(), [], o).files;
    const b = standOutputs(fakeStand().reverse(), [], o).files;
    expect(b).toEqual(a);
  });
});
