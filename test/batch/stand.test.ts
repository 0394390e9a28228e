import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../core/io/csv.js';
import { cellNumber, formatStandCsv, inManifestOrder, numberAt, standRow, stringAt, STAND_COLUMNS } from '../../core/batch/stand.js';
import { fakeStand, fakeSummary } from './fixtures.js';

describe('numberAt', () => {
  it('follows a key path and gives NaN for anything missing or non-numeric', () => {
    const o = { a: { b: [1, 'x'] } };
    expect(numberAt(o, ['a', 'b', 0])).toBe(1);
    expect(numberAt(o, ['a', 'b', 1])).toBeNaN();
    expect(numberAt(o, ['a', 'c'])).toBeNaN();
    expect(numberAt(null, ['a'])).toBeNaN();
  });
});

describe('stringAt', () => {
  it('follows a key path and gives "" for anything missing or not a string', () => {
    expect(stringAt({ h: { preset: 'conifer' } }, ['h', 'preset'])).toBe('conifer');
    expect(stringAt({ h: { preset: 3 } }, ['h', 'preset'])).toBe('');
    expect(stringAt(undefined, ['h'])).toBe('');
  });
});

describe('standRow', () => {
  it('takes the key figures from the documented summary.json keys', () => {
    const r = standRow({ index: 0, treeId: 't', species: 's', file: 'f', plot: '', preset: '', fieldDbhM: NaN, summary: fakeSummary(0.3, 2.2, 0.5) });
    expect(r.dbhM).toBe(0.3);
    expect(r.exponent).toBe(2.2);
    expect(r.exponentCiLow).toBeCloseTo(2.0, 15);
    expect(r.treeConductanceKgPerSPerMPa).toBe(0.5);
    expect(r.warningCount).toBe(1);
    expect(r.preset).toBe('');
    const withPreset = standRow({ index: 0, treeId: 't', species: 's', file: 'f', plot: '', preset: '', fieldDbhM: NaN, summary: { hydraulics: { preset: 'conifer' } } });
    expect(withPreset.preset).toBe('conifer');
    expect(withPreset.dbhM).toBeNaN();
  });
});

describe('cellNumber', () => {
  it('writes missing values as empty cells and numbers as shortest round-trip decimals', () => {
    expect(cellNumber(NaN)).toBe('');
    expect(cellNumber(0.1 + 0.2)).toBe('0.30000000000000004');
    expect(Number(cellNumber(1 / 3))).toBe(1 / 3);
  });
});

describe('inManifestOrder', () => {
  it('sorts by manifest index', () => {
    const t = fakeStand();
    expect(inManifestOrder(t.slice().reverse()).map((r) => r.treeId)).toEqual(t.map((r) => r.treeId));
  });
});

describe('formatStandCsv', () => {
  it('writes one row per tree in manifest order with the documented columns, whatever the input order', () => {
    const t = fakeStand();
    const text = formatStandCsv(t.slice().reverse());
    expect(text).toBe(formatStandCsv(t));
    const { header, rows } = parseCsv(text);
    expect(header).toEqual([...STAND_COLUMNS]);
    expect(rows).toHaveLength(t.length);
    expect(rows[0][0]).toBe('oak-0');
    expect(rows[4][header.indexOf('field_dbh_m')]).toBe('0.15');
  });
});
