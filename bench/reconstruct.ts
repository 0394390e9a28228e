/**
 * Speed and memory of the reconstruction (figures printed, no assertions):
 * 1. all-16-NN of a 2 M-point tree cloud with our kd-tree, side by side with scipy.spatial.cKDTree
 *    (python3 subprocess, same points, 1 core: workers=1);
 * 2. end to end (reconstructTree + encoding of all outputs) per stage and peak RSS for generated trees
 *    of 1, 2, 4, 8 M points (each size in its own process so peak memory is its own), and the
 *    growth ratio time(8 M)/time(1 M).
 * Run: `npm run build && node --expose-gc dist/bench/reconstruct.js [--sizes=1,2,4,8] [--knn-only] [--knn-repeat=3]`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generateTree } from '../core/simulate/tree.js';
import { simulateOptions } from '../core/simulate/options.js';
import { presetOptions } from '../core/simulate/presets.js';
import { createPointCloud, type PointCloud } from '../core/types/point-cloud.js';
import { createRandom } from '../core/util/random.js';
import { buildKdTree, knnAllPoints } from '../core/graph/kdtree.js';
import { allKnn } from '../core/graph/neighbour-graph.js';
import { reconstructTree } from '../core/reconstruct/reconstruct-tree.js';
import { cleanOptions } from '../core/clean/options.js';
import { reconstructOptions } from '../core/reconstruct/options.js';
import { reconstructOutputs } from '../core/io/reconstruct-outputs.js';

/**
 * A park-oak-like generated tree with `count` points sampled directly on its cylinder surfaces
 * (2 mm radial noise) plus 10 % ground points — no ray casting, so large sizes are quick to make.
 */
export function benchCloud(count: number, seed = 1): PointCloud {
  const tree = generateTree(simulateOptions.resolve({ ...presetOptions('park-oak'), seed, twig_radius_m: 0.01 }));
  const segs = tree.network.segments;
  const area = segs.map((s) => 2 * Math.PI * s.radiusM * s.lengthM);
  const total = area.reduce((a, b) => a + b, 0);
  const wood = Math.round(count * 0.9);
  const x = new Float64Array(count), y = new Float64Array(count), z = new Float64Array(count);
  const rnd = createRandom(seed);
  let k = 0;
  segs.forEach((s, i) => {
    const m = i === segs.length - 1 ? wood - k : Math.round((wood * area[i]) / total);
    const a = [s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]];
    const len = Math.hypot(a[0], a[1], a[2]) || 1;
    const u = a.map((v) => v / len);
    const h = Math.abs(u[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
    let e1 = [u[1] * h[2] - u[2] * h[1], u[2] * h[0] - u[0] * h[2], u[0] * h[1] - u[1] * h[0]];
    const l1 = Math.hypot(e1[0], e1[1], e1[2]);
    e1 = e1.map((v) => v / l1);
    const e2 = [u[1] * e1[2] - u[2] * e1[1], u[2] * e1[0] - u[0] * e1[2], u[0] * e1[1] - u[1] * e1[0]];
    for (let j = 0; j < m && k < wood; j++, k++) {
      const t = rnd.next() * len, th = rnd.next() * 2 * Math.PI, r = s.radiusM + 0.002 * rnd.normal();
      const c = Math.cos(th) * r, d = Math.sin(th) * r;
      x[k] = s.start[0] + u[0] * t + e1[0] * c + e2[0] * d;
      y[k] = s.start[1] + u[1] * t + e1[1] * c + e2[1] * d;
      z[k] = s.start[2] + u[2] * t + e1[2] * c + e2[2] * d;
    }
  });
  const base = segs[0].start;
  for (; k < count; k++) {
    x[k] = base[0] + rnd.uniform(-8, 8);
    y[k] = base[1] + rnd.uniform(-8, 8);
    z[k] = base[2] + 0.002 * rnd.normal();
  }
  return createPointCloud(x, y, z);
}

/** Seconds of CPU time used by this process so far (user + system; steadier than wall time on a shared machine). */
function cpuS(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

/**
 * All-points 16-NN on the same cloud, ours and scipy's in alternation, `repeat` rounds. Ours is timed
 * both through `allKnn` (queries in input order, the path neighbour-graph.ts uses today) and through
 * `knnAllPoints` (queries in tree order); the two must agree on every distance.
 */
function knnSideBySide(count: number, repeat: number): void {
  const k = 16;
  const cloud = benchCloud(count, 2);
  const dir = mkdtempSync(join(tmpdir(), 'xylemap-knn-'));
  try {
    const xyz = new Float64Array(3 * count);
    for (let i = 0; i < count; i++) {
      xyz[3 * i] = cloud.x[i];
      xyz[3 * i + 1] = cloud.y[i];
      xyz[3 * i + 2] = cloud.z[i];
    }
    writeFileSync(join(dir, 'xyz.bin'), xyz);
    // k + 1 because cKDTree returns the point itself first; ours excludes it.
    const py = [
      'import numpy as np, time, sys',
      'from scipy.spatial import cKDTree',
      `p = np.fromfile(${JSON.stringify(join(dir, 'xyz.bin'))}, dtype='<f8').reshape(-1, 3)`,
      't = time.perf_counter(); c = time.process_time(); tr = cKDTree(p); b = time.perf_counter() - t; bc = time.process_time() - c',
      `t = time.perf_counter(); c = time.process_time(); tr.query(p, k=${k + 1}, workers=1); q = time.perf_counter() - t; qc = time.process_time() - c`,
      'print(f"{b:.2f} {q:.2f} {bc:.2f} {qc:.2f}")',
    ].join('\n');
    const line = (who: string, b: number, q: number, bc: number, qc: number, how: string): void =>
      console.log(`kNN, ${count} points, k = ${k}: ${who} build ${b.toFixed(2)} s + queries ${q.toFixed(2)} s = ${(b + q).toFixed(2)} s wall (CPU ${(bc + qc).toFixed(2)} s) ${how}`);
    for (let round = 1; round <= repeat; round++) {
      console.log(`round ${round}/${repeat}`);
      let t0 = performance.now(), c0 = cpuS();
      const tree = buildKdTree(cloud.x, cloud.y, cloud.z);
      const b = (performance.now() - t0) / 1000, bc = cpuS() - c0;
      t0 = performance.now();
      c0 = cpuS();
      const byInput = allKnn(tree, cloud.x, cloud.y, cloud.z, k);
      const q1 = (performance.now() - t0) / 1000, q1c = cpuS() - c0;
      line('xylemap allKnn      ', b, q1, bc, q1c, '(queries in input order, 1 thread)');
      t0 = performance.now();
      c0 = cpuS();
      const byTree = knnAllPoints(tree, k);
      const q2 = (performance.now() - t0) / 1000, q2c = cpuS() - c0;
      line('xylemap knnAllPoints', b, q2, bc, q2c, '(queries in tree order, 1 thread)');
      let differ = 0;
      for (let a = 0; a < byTree.dist.length; a++) if (byTree.dist[a] !== byInput.dist[a]) differ++;
      if (differ > 0) console.log(`WARNING: allKnn and knnAllPoints disagree on ${differ} distances`);
      const r = spawnSync('python3', ['-c', py], { encoding: 'utf8' });
      if (r.status === 0) {
        const [sb, sq, sbc, sqc] = r.stdout.trim().split(' ').map(Number);
        line('scipy cKDTree       ', sb, sq, sbc, sqc, '(workers = 1)');
      } else console.log(`scipy reference not run: ${r.stderr.split('\n').filter(Boolean).pop() ?? 'python3 failed'}`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** One size end to end, in this process: prints one JSON line. */
function endToEnd(count: number): void {
  const cloud = benchCloud(count, 3);
  const t0 = performance.now();
  const result = reconstructTree(cloud, { clean: cleanOptions.defaults(), reconstruct: reconstructOptions.defaults() });
  const t1 = performance.now();
  reconstructOutputs(cloud, result, { command: 'bench', input: { path: 'generated', sha256: '', bytes: 0 }, options: {}, timingsMs: result.timingsMs, startedAt: '' });
  const t2 = performance.now();
  const peakMb = process.resourceUsage().maxRSS / 1024;
  console.log(JSON.stringify({ points: count, total_s: (t2 - t0) / 1000, reconstruct_s: (t1 - t0) / 1000, encode_s: (t2 - t1) / 1000, stages_ms: result.timingsMs, peak_rss_mb: Math.round(peakMb), segments: result.network.segments.length }));
}

export async function main(argv: string[] = process.argv.slice(2)): Promise<void> {
  const one = argv.find((a) => a.startsWith('--one='));
  if (one) return endToEnd(Number(one.slice(6)));
  const sizes = (argv.find((a) => a.startsWith('--sizes='))?.slice(8) ?? '1,2,4,8').split(',').map((s) => Number(s) * 1e6);
  const repeat = Number(argv.find((a) => a.startsWith('--knn-repeat='))?.slice(13) ?? '1');
  if (!argv.includes('--e2e-only')) knnSideBySide(2_000_000, repeat > 0 ? repeat : 1);
  if (argv.includes('--knn-only')) return;
  const self = fileURLToPath(import.meta.url);
  const times: Record<number, number> = {};
  for (const n of sizes) {
    const r = spawnSync(process.execPath, ['--max-old-space-size=6144', self, `--one=${n}`], { encoding: 'utf8' });
    const line = r.stdout.trim().split('\n').pop() ?? '';
    if (r.status !== 0 || !line.startsWith('{')) {
      console.log(`${n} points: failed (${(r.stderr || r.stdout).split('\n').filter(Boolean).pop()})`);
      continue;
    }
    const o = JSON.parse(line);
    times[n] = o.total_s;
    console.log(`${String(n).padStart(9)} points: ${o.total_s.toFixed(1)} s end to end (reconstruct ${o.reconstruct_s.toFixed(1)} s, encode outputs ${o.encode_s.toFixed(1)} s), peak RSS ${o.peak_rss_mb} MB, ${o.segments} segments; stages ms ${JSON.stringify(o.stages_ms)}`);
  }
  const lo = times[sizes[0]];
  const hi = times[sizes[sizes.length - 1]];
  if (lo && hi && sizes.length > 1) console.log(`growth time(${sizes[sizes.length - 1] / 1e6} M)/time(${sizes[0] / 1e6} M) = ${(hi / lo).toFixed(2)}`);
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((e) => {
    console.error(e instanceof Error ? e.stack : String(e));
    process.exitCode = 1;
  });
}
