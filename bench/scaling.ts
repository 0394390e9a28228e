/**
 * Scaling benchmark (`node dist/bench/scaling.js [--quick]`): how well `analyseScaling` recovers
 * the known exponent of generated trees, and how often its 95 % interval covers it.
 *
 * 1. Scan-lab truth networks (core/simulate generator, exact exponent at every furcation, taper
 *    along internodes): error of the estimate with default options — should be ~0.
 * 2. The same networks with radius noise of known size (relative σ, and radiusSeM = σ·r):
 *    mean error, RMSE and coverage of the 95 % interval over seeded repetitions.
 * 3. Run time with the default 2000 bootstrap replicates.
 * Prints figures; asserts nothing.
 */
import { pathToFileURL } from 'node:url';
import { analyseScaling } from '../core/scaling/analyse.js';
import { withRadiusNoise } from '../core/scaling/synthetic.js';
import { simulateOptions } from '../core/simulate/options.js';
import { presetOptions } from '../core/simulate/presets.js';
import { generateTree } from '../core/simulate/tree.js';
import type { Network } from '../core/types/network.js';

interface Case {
  preset: string;
  exponent: number;
  seed: number;
}

const CASES: Case[] = [
  { preset: 'park-oak', exponent: 1.8, seed: 1 },
  { preset: 'park-oak', exponent: 2.2, seed: 2 },
  { preset: 'spire-spruce', exponent: 2.0, seed: 3 },
  { preset: 'spire-spruce', exponent: 2.6, seed: 4 },
  { preset: 'sapling', exponent: 2.4, seed: 5 },
  { preset: 'sapling', exponent: 3.0, seed: 6 },
  { preset: 'park-oak', exponent: 2.8, seed: 7 },
  { preset: 'spire-spruce', exponent: 2.2, seed: 8 },
];

function truth(c: Case): Network {
  const o = simulateOptions.resolve({ ...presetOptions(c.preset), exponent_a: c.exponent, seed: c.seed });
  return generateTree(o).network;
}

export async function main(argv = process.argv.slice(2)): Promise<void> {
  const quick = argv.includes('--quick');
  const reps = quick ? 10 : 40;
  const B = quick ? 300 : 500;
  console.log('# scaling benchmark');
  console.log('\n## 1. truth networks, default options (1000 replicates)');
  console.log('tree                 a_true  segments  used/furc  estimate  pooled    ci95                 ms');
  for (const c of CASES) {
    const net = truth(c);
    const t0 = performance.now();
    const s = analyseScaling(net).summary;
    const ms = performance.now() - t0;
    const e = s.exponent;
    console.log(
      `${`${c.preset}#${c.seed}`.padEnd(20)} ${c.exponent.toFixed(2).padStart(6)}  ${String(net.segments.length).padStart(8)}  ${`${e.n_used}/${e.n_furcations}`.padStart(9)}  ${f(e.estimate)}  ${f(s.pooled.estimate)}  [${f(e.ci95[0])}, ${f(e.ci95[1])}]  ${ms.toFixed(0).padStart(6)}`,
    );
  }
  for (const sigma of [0.02, 0.05, 0.1]) {
    console.log(`\n## 2. radius noise σ = ${sigma * 100} % (SE = σ·r), ${reps} repetitions per tree, ${B} replicates`);
    console.log('tree                 a_true  mean err  rmse    cover95  pooled err  pooled cover');
    let all = 0;
    let allCover = 0;
    let maxAbs = 0;
    for (const c of CASES) {
      const net = truth(c);
      let err = 0;
      let err2 = 0;
      let cover = 0;
      let perr = 0;
      let pcover = 0;
      for (let r = 0; r < reps; r++) {
        const s = analyseScaling(withRadiusNoise(net, sigma, 7919 * c.seed + r), { bootstrap_replicates: B, permutations: 99, seed: r }).summary;
        const d = (s.exponent.estimate ?? NaN) - c.exponent;
        err += d;
        err2 += d * d;
        if (inside(c.exponent, s.exponent.ci95)) cover++;
        perr += (s.pooled.estimate ?? NaN) - c.exponent;
        if (inside(c.exponent, s.pooled.ci95)) pcover++;
      }
      all += reps;
      allCover += cover;
      maxAbs = Math.max(maxAbs, Math.abs(err / reps));
      console.log(
        `${`${c.preset}#${c.seed}`.padEnd(20)} ${c.exponent.toFixed(2).padStart(6)}  ${(err / reps).toFixed(3).padStart(8)}  ${Math.sqrt(err2 / reps).toFixed(3).padStart(6)}  ${(cover / reps).toFixed(2).padStart(7)}  ${(perr / reps).toFixed(3).padStart(10)}  ${(pcover / reps).toFixed(2).padStart(12)}`,
      );
    }
    console.log(`all trees: coverage ${(allCover / all).toFixed(3)}; largest |mean error| ${maxAbs.toFixed(3)}`);
  }
}

function inside(v: number, ci: [number | null, number | null]): boolean {
  return ci[0] !== null && ci[1] !== null && ci[0] <= v && v <= ci[1];
}

function f(v: number | null): string {
  return v === null ? '   n/a  ' : v.toFixed(4).padStart(8);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await main();
