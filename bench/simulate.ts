/**
 * Scan-lab benchmark (`node dist/bench/simulate.js`, also part of `npm run bench`): time of a
 * ~3-million-point virtual scan of a 15 m tree (target ≤ 30 s) in one thread and with the
 * positions on 2 worker threads (checking both give the same points), and a small scan-design table
 * (positions × distance × angular step → points and coverage by radius class). Prints figures;
 * asserts nothing. XYLEMAP_BENCH_SIM_POINTS changes the point target; XYLEMAP_BENCH_SIM_DESIGN=0
 * skips the design table.
 */
import { pathToFileURL } from 'node:url';
import { simulateOptions, type SimulateOptions } from '../core/simulate/options.js';
import { presetOptions } from '../core/simulate/presets.js';
import { simulate, simulateParallel } from '../core/simulate/simulate.js';

const TARGET_POINTS = Number(process.env.XYLEMAP_BENCH_SIM_POINTS ?? 3_000_000);

function timed(o: SimulateOptions): { seconds: number; cpuSeconds: number; run: ReturnType<typeof simulate> } {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const run = simulate(o);
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  return { seconds, cpuSeconds: (cpu.user + cpu.system) / 1e6, run };
}

export async function main(): Promise<void> {
  // The default options describe a 15 m tree (trunk radius 0.2 m) scanned from 4 positions at 8 m.
  const base = simulateOptions.resolve({ tree_height_m: 15 });
  // Point count scales with 1 / step²: calibrate the step on a coarse trial scan.
  const trialStep = 0.25;
  const trial = simulate({ ...base, angular_step_deg: trialStep });
  const step = trialStep * Math.sqrt(trial.cloud.count / TARGET_POINTS);
  const big = timed({ ...base, angular_step_deg: step });
  const s = big.run.stats;
  const t0 = performance.now();
  const par = await simulateParallel({ ...base, angular_step_deg: step }, null, 2);
  const parSeconds = (performance.now() - t0) / 1000;
  const same = par.cloud.count === big.run.cloud.count && par.cloud.x.every((v, i) => v === big.run.cloud.x[i]);
  console.log('scan lab: virtual scan of a 15 m tree');
  console.log(`  tree: ${big.run.tree.network.segments.length} segments, height ${big.run.truth.tree.height_m.toFixed(2)} m, DBH ${big.run.truth.tree.dbh_m?.toFixed(3)} m`);
  console.log(`  angular step ${step.toFixed(4)}°, ${s.perPosition.length} positions at ${base.scan_distance_m} m`);
  console.log(`  ${s.rays} rays → ${s.points} points (${Object.entries(s.pointsPerLabel).map(([k, n]) => `${k} ${n}`).join(', ')})`);
  console.log(`  1 thread:  ${big.seconds.toFixed(2)} s wall, ${big.cpuSeconds.toFixed(2)} s CPU (target ≤ 30 s); ${(s.rays / big.cpuSeconds / 1e6).toFixed(2)} M rays per CPU second`);
  console.log(`  2 threads: ${parSeconds.toFixed(2)} s wall; same points as 1 thread: ${same ? 'yes' : 'NO'}`);
  const os = await import('node:os');
  console.log(`  machine load average at the end: ${os.loadavg()[0].toFixed(1)} on ${os.availableParallelism()} cores`);

  if (process.env.XYLEMAP_BENCH_SIM_DESIGN === '0') return;
  console.log('\nscan design on park-oak (seed 1): per radius class "covered / arc" = share of true axis length (5 cm bins)');
  console.log('with ≥ 1 return / mean share of the circumference (8 sectors) with returns');
  const header = ['positions', 'distance m', 'step °', 'points', 'wood+mixed', 'mixed share', '<1cm', '1-2.5cm', '2.5-5cm', '5-10cm', '>10cm', 'CPU s'];
  console.log(header.join('\t'));
  const oak = presetOptions('park-oak');
  for (const [positions, distance, stepDeg] of [
    [2, 10, 0.08],
    [4, 10, 0.08],
    [8, 10, 0.08],
    [4, 5, 0.08],
    [4, 20, 0.08],
    [4, 10, 0.04],
    [4, 10, 0.16],
  ] as const) {
    const o = simulateOptions.resolve({ ...oak, scan_positions: positions, scan_distance_m: distance, angular_step_deg: stepDeg });
    const r = timed(o);
    const l = r.run.stats.pointsPerLabel;
    const pc = (v: number | null): string => (v === null ? 'n/a' : (100 * v).toFixed(0));
    const cov = r.run.truth.scan.coverage_by_radius_class.map((c) => `${pc(c.covered_fraction)}/${pc(c.arc_fraction)} %`);
    console.log([positions, distance, stepDeg, r.run.stats.points, l.wood + l.mixed, `${((100 * l.mixed) / Math.max(1, l.wood + l.mixed)).toFixed(0)} %`, ...cov, r.cpuSeconds.toFixed(1)].join('\t'));
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await main();
