import { describe, expect, it } from 'vitest';
import { clusteredFit } from '../../core/scaling/taper.js';
import { createRandom } from '../../core/util/random.js';

describe('clusteredFit', () => {
  it('recovers an exact power law with a zero-width interval', () => {
    const x = [1, 2, 3, 4, 5, 6].map(Math.log);
    const y = x.map((v) => Math.log(0.3) + 0.75 * v);
    const f = clusteredFit(x, y, [0, 0, 1, 1, 2, 2], 200, 0.95, createRandom(2));
    expect(f.exponent).toBeCloseTo(0.75, 12);
    expect(f.prefactor).toBeCloseTo(0.3, 12);
    expect(f.ci95[0]).toBeCloseTo(0.75, 9);
    expect(f.ci95[1]).toBeCloseTo(0.75, 9);
    expect(f.n_branches).toBe(3);
  });
});
