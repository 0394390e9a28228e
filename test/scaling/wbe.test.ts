import { describe, expect, it } from 'vitest';
import { wbeRatios } from '../../core/scaling/wbe.js';

describe('wbeRatios', () => {
  it('returns nulls, not NaN, without furcations', () => {
    const w = wbeRatios([]);
    expect(w.n_furcations).toBe(0);
    expect(w.theta).toBeNull();
  });
});
