import type { Random } from '../util/random.js';
import { pearson, ranks } from './stats.js';

export interface TrendTest {
  variable: string;
  n: number;
  spearman_rho: number | null;
  /** Two-sided permutation p-value, (1 + #{|ρ*| ≥ |ρ|}) / (P + 1) (Phipson & Smyth 2010, Stat. Appl. Genet. Mol. Biol. 9:39). */
  p_value: number | null;
  permutations: number;
}

/**
 * Trend of per-furcation exponents across a variable (e.g. branching order): Spearman's ρ
 * (Spearman 1904) with a permutation test of ρ = 0.
 */
export function trendTest(variable: string, x: number[], y: number[], permutations: number, rng: Random): TrendTest {
  const n = x.length;
  // Spearman's ρ is Pearson's r of the ranks; permuting the ranks of y once ranked is the same test.
  const rx = ranks(x);
  const ry = ranks(y);
  const rho = n >= 3 ? pearson(rx, ry) : NaN;
  if (!Number.isFinite(rho)) return { variable, n, spearman_rho: null, p_value: null, permutations: 0 };
  const perm = Float64Array.from(ry);
  let extreme = 0;
  for (let p = 0; p < permutations; p++) {
    for (let i = n - 1; i > 0; i--) {
      const j = rng.int(i + 1);
      const t = perm[i];
      perm[i] = perm[j];
      perm[j] = t;
    }
    if (Math.abs(pearson(rx, perm)) >= Math.abs(rho) - 1e-12) extreme++;
  }
  return { variable, n, spearman_rho: rho, p_value: (1 + extreme) / (permutations + 1), permutations };
}
