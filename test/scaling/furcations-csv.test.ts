import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../core/io/csv.js';
import { analyseScaling } from '../../core/scaling/analyse.js';
import { FURCATION_COLUMNS, formatFurcationsCsv } from '../../core/scaling/furcations-csv.js';
import { exactExponentNetwork } from '../../core/scaling/synthetic.js';

describe('formatFurcationsCsv', () => {
  it('writes one row per furcation with the documented columns, readable by the project CSV parser (RFC 4180)', () => {
    const { furcationRows } = analyseScaling(exactExponentNetwork({ exponent: 2.5, depth: 3 }), { bootstrap_replicates: 100, permutations: 99 });
    const { header, rows } = parseCsv(formatFurcationsCsv(furcationRows));
    expect(header).toEqual(FURCATION_COLUMNS);
    expect(rows.length).toBe(7);
    const e = header.indexOf('exponent');
    for (const r of rows) expect(Number(r[e])).toBeCloseTo(2.5, 12);
    expect(rows[0][header.indexOf('child_segment_ids')]).toMatch(/^\d+;\d+$/);
  });
});
