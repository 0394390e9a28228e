import { describe, expect, it } from 'vitest';
import { theoryTable, theoryValues } from '../../core/scaling/theory.js';

describe('theoryValues', () => {
  it('lists da Vinci 2, Murray 3, 11/4, 7/4 and (m + n)/2', () => {
    // Murray 1926 (PNAS 12:207); da Vinci's rule (Eloy 2011, PRL 107:258101); 11/4 and 7/4 from memory.
    expect(theoryValues(4, 1.5).map((t) => t.value)).toEqual([2, 3, 2.75, 1.75, 2.75]);
  });
});

describe('theoryTable', () => {
  it('says which values lie inside the interval and how far each is from the estimate', () => {
    const rows = theoryTable(theoryValues(4, 2), 2.2, [1.9, 2.6], [null, null]);
    expect(rows.map((r) => r.inside_ci95)).toEqual([true, false, false, false, false]);
    expect(rows[1].difference).toBeCloseTo(0.8, 12);
    expect(rows[0].inside_pooled_ci95).toBeNull();
  });
});
