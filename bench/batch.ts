/**
 * Batch throughput and overhead (issue 8, item 6). Prints figures; asserts nothing.
 *   node dist/bench/batch.js [--trees 20] [--step 0.35]
 * 1. Generates N small scan-lab trees (sapling preset, different seeds) as LAS in os.tmpdir().
 * 2. Runs the full pipeline over them with `xylemap batch` machinery at 1 and 2 workers and
 *    prints trees/min and the speed-up (target ≥ 1.8× with 2 workers on 2 cores).
 * 3. Measures the batch machinery's own cost per tree with a no-op task (pool hop + bookkeeping)
 *    and a no-op in-process processor (bookkeeping only: manifest, resume checks, tables).
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createTreePool } from '../core/batch/pool.js';
import { runBatch, type TreeJob } from '../core/batch/run-batch.js';
import { runBatchFolder } from '../core/io/batch-driver.js';
import { writeLas } from '../core/io/las-write.js';
import { simulateOptions } from '../core/simulate/options.js';
import { presetOptions } from '../core/simulate/presets.js';
import { simulate } from '../core/simulate/simulate.js';

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : fallback;
}

/** Write N sapling scans and a manifest; returns the manifest path and point counts. */
function makeTrees(dir: string, n: number, stepDeg: number): { manifest: string; points: number[] } {
  mkdirSync(join(dir, 'clouds'), { recursive: true });
  const rows = ['tree_id,species,file'];
  const points: number[] = [];
  for (let i = 0; i < n; i++) {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), seed: 100 + i, angular_step_deg: stepDeg });
    const scan = simulate(o, 'sapling');
    const file = join(dir, 'clouds', `sap-${i}.las`);
    writeLas(file, scan.cloud, { version: '1.4', pointFormat: 6 });
    points.push(scan.cloud.count);
    rows.push(`sap-${String(i).padStart(2, '0')},${i % 2 ? 'sapling-a' : 'sapling-b'},clouds/sap-${i}.las`);
  }
  const manifest = join(dir, 'manifest.csv');
  writeFileSync(manifest, rows.join('\n') + '\n');
  return { manifest, points };
}

async function timedBatch(
  manifest: string,
  out: string,
  workers: number,
): Promise<{ seconds: number; failed: number; meanTreeSeconds: number; coresBusy: number; cpuSecondsPerTree: number }> {
  const pool = createTreePool(workers);
  try {
    // Warm the threads (module loading) so the figure is the steady per-tree cost.
    await Promise.all(Array.from({ length: workers }, () => pool.noop()));
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    const r = await runBatchFolder({ manifestPath: manifest, outDir: out, workers, processTree: pool.processTree });
    const cpu = process.cpuUsage(cpu0);
    const meanTreeSeconds = r.trees.reduce((a, t) => a + t.seconds, 0) / Math.max(1, r.trees.length);
    const seconds = (performance.now() - t0) / 1000;
    // CPU time of all threads of this process over wall time: how many cores the batch kept busy.
    const cpuSeconds = (cpu.user + cpu.system) / 1e6;
    return { seconds, failed: r.counts.failed, meanTreeSeconds, coresBusy: cpuSeconds / seconds, cpuSecondsPerTree: cpuSeconds / Math.max(1, r.trees.length) };
  } finally {
    await pool.close();
  }
}

export async function main(): Promise<void> {
  const n = arg('trees', 20);
  const step = arg('step', 0.35);
  const dir = mkdtempSync(join(tmpdir(), 'xylemap-bench-batch-'));
  try {
    // Other processes on the machine make the speed-up meaningless; print the load so it can be judged.
    console.log(`load average at start: ${loadavg().map((v) => v.toFixed(2)).join(' ')} on ${availableParallelism()} CPUs`);
    const t0 = performance.now();
    const { manifest, points } = makeTrees(dir, n, step);
    const mean = points.reduce((a, b) => a + b, 0) / points.length;
    console.log(`batch bench: ${n} sapling trees, ${Math.round(mean)} points each on average (${Math.min(...points)}–${Math.max(...points)}), generated in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

    const one = await timedBatch(manifest, join(dir, 'out-1'), 1);
    const two = await timedBatch(manifest, join(dir, 'out-2'), 2);
    const rate = (s: number): string => ((n / s) * 60).toFixed(1);
    const line = (w: number, r: typeof one): string =>
      `  ${w} worker${w > 1 ? 's' : ' '}: ${r.seconds.toFixed(1)} s, ${rate(r.seconds)} trees/min, ${r.meanTreeSeconds.toFixed(2)} s per tree in flight, ${r.coresBusy.toFixed(2)} cores busy, ${r.cpuSecondsPerTree.toFixed(2)} CPU s per tree, ${r.failed} failed`;
    console.log(line(1, one));
    console.log(line(2, two));
    console.log(`load average after the runs: ${loadavg().map((v) => v.toFixed(2)).join(' ')}`);
    console.log(`  speed-up with 2 workers: ${(one.seconds / two.seconds).toFixed(2)}× (target ≥ 1.8×)`);

    // Overhead: pool hop per task (no-op worker task), measured over many tasks.
    const pool = createTreePool(2);
    const tasks = 2000;
    await Promise.all([pool.noop(), pool.noop()]);
    const jobs: TreeJob[] = Array.from({ length: tasks }, (_, i) => ({ index: i, treeId: `t${i}`, path: '', outDir: '', config: {} }));
    let t = performance.now();
    await runBatch(jobs, { concurrency: 2, processTree: () => pool.noop() });
    const hopMs = (performance.now() - t) / tasks;
    await pool.close();
    // Bookkeeping of a whole batch (manifest check, resume check with sha256, batch.json, tables)
    // with an in-process processor that returns at once; second run = all trees skipped.
    t = performance.now();
    await runBatchFolder({ manifestPath: manifest, outDir: join(dir, 'out-2'), workers: 2, processTree: async () => ({ ok: true }) });
    const resumeMs = (performance.now() - t) / n;
    console.log(`  overhead: pool round trip ${hopMs.toFixed(3)} ms per task (2 threads, ${tasks} no-op tasks)`);
    console.log(`  overhead: batch bookkeeping ${resumeMs.toFixed(1)} ms per tree (resume check incl. sha256, tables, batch.json)`);
    console.log(`  per-tree pipeline time at 1 worker: ${((one.seconds / n) * 1000).toFixed(0)} ms → overhead share ${(((hopMs + resumeMs) / ((one.seconds / n) * 1000)) * 100).toFixed(2)} %`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await main();
