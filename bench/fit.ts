/**
 * Cylinder-fit bench: fits per second for typical segments (50, 200, 1000 points) and radius
 * accuracy, side by side with scipy.optimize.least_squares on the same points and the same start
 * (python3 subprocess; skipped with a note when python3/scipy is missing). Also eigen solves per
 * second against numpy.linalg.eigh on the same matrices. Prints figures; asserts nothing.
 *
 * Run: npm run build && node dist/bench/fit.js   (about a minute; most of it is the scipy side)
 */
import { spawnSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { fitCylinder } from '../core/reconstruct/fit/cylinder-fit.js';
import { fitCircleTaubin } from '../core/reconstruct/fit/circle-fit.js';
import { eigenSymmetric3 } from '../core/reconstruct/fit/eigen3.js';
import { pca } from '../core/reconstruct/fit/pca.js';
import { assessReliability } from '../core/reconstruct/fit/reliability.js';
import { basis, sampleCylinder, unit } from '../core/reconstruct/fit/sample-cylinder.js';
import { createRandom } from '../core/util/random.js';
import type { Vec3 } from '../core/types/network.js';

interface Case {
  x: number[];
  y: number[];
  z: number[];
  radiusM: number;
  /** Start for both solvers: PCA axis, Taubin circle centre (3D) and radius. */
  axis: Vec3;
  centre: Vec3;
  r0: number;
}

function makeCases(n: number, count: number, outlierFraction: number, seed: number): Case[] {
  const rnd = createRandom(seed);
  const cases: Case[] = [];
  while (cases.length < count) {
    const radiusM = rnd.uniform(0.01, 0.2);
    const axis = unit([rnd.uniform(-0.5, 0.5), rnd.uniform(-0.5, 0.5), 1]);
    const s = sampleCylinder(
      {
        n,
        radiusM,
        lengthM: Math.max(4 * radiusM, 0.1),
        arcRad: rnd.uniform((2 * Math.PI) / 3, 2 * Math.PI),
        noiseM: 0.001,
        outlierFraction,
        axis,
      },
      rnd,
    );
    const p = pca(s.x, s.y, s.z, s.indices)!;
    const a = p.vectors[2];
    const [e1, e2] = basis(a);
    const u = new Float64Array(n);
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const dx = s.x[i] - p.centroid[0], dy = s.y[i] - p.centroid[1], dz = s.z[i] - p.centroid[2];
      u[i] = dx * e1[0] + dy * e1[1] + dz * e1[2];
      v[i] = dx * e2[0] + dy * e2[1] + dz * e2[2];
    }
    const c = fitCircleTaubin(u, v);
    if (!c) continue;
    const centre: Vec3 = [0, 1, 2].map((k) => p.centroid[k] + c.cu * e1[k] + c.cv * e2[k]) as Vec3;
    cases.push({ x: Array.from(s.x), y: Array.from(s.y), z: Array.from(s.z), radiusM, axis: a, centre, r0: c.radius });
  }
  return cases;
}

function timeTs(cases: Case[], robust: 'tukey' | 'none'): { fitsPerS: number; medianRelErr: number; p90RelErr: number } {
  const data = cases.map((c) => ({
    x: Float64Array.from(c.x),
    y: Float64Array.from(c.y),
    z: Float64Array.from(c.z),
    idx: Int32Array.from({ length: c.x.length }, (_, i) => i),
  }));
  const errs: number[] = [];
  for (let k = 0; k < cases.length; k++) {
    const d = data[k];
    const f = fitCylinder(d.x, d.y, d.z, d.idx, { robust, rangeNoiseM: 0.001 });
    errs.push(f ? Math.abs(f.radiusM / cases[k].radiusM - 1) : Infinity);
  }
  let fits = 0;
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  while (performance.now() - t0 < 700) {
    for (const d of data) fitCylinder(d.x, d.y, d.z, d.idx, { robust, rangeNoiseM: 0.001 });
    fits += data.length;
  }
  const cpuS = process.cpuUsage(cpu0).user / 1e6;
  errs.sort((a, b) => a - b);
  return { fitsPerS: fits / cpuS, medianRelErr: errs[errs.length >> 1], p90RelErr: errs[Math.floor(errs.length * 0.9)] };
}

const PY_FIT = String.raw`
import sys, json, time
import numpy as np
from scipy.optimize import least_squares
cfg = json.load(sys.stdin)
def frame(a):
    t = np.array([1.0,0,0]) if abs(a[0]) < 0.9 else np.array([0,1.0,0])
    e1 = t - t.dot(a)*a; e1 /= np.linalg.norm(e1); e2 = np.cross(a, e1); return e1, e2
out = []
for group in cfg['groups']:
    errs = []; t_total = 0.0
    for c in group['cases']:
        P = np.stack([c['x'], c['y'], c['z']], 1); a0 = np.array(c['axis']); c0 = np.array(c['centre'])
        e1, e2 = frame(a0)
        def res(p):
            a = a0 + p[0]*e1 + p[1]*e2; a /= np.linalg.norm(a)
            q = P - (c0 + p[2]*e1 + p[3]*e2)
            return np.linalg.norm(np.cross(q, a), axis=1) - p[4]
        x0 = np.array([0, 0, 0, 0, c['r0']])
        t0 = time.process_time()
        sol = least_squares(res, x0, loss=group['loss'], f_scale=0.001)
        t_total += time.process_time() - t0
        errs.append(abs(abs(sol.x[4]) / c['radiusM'] - 1))
    errs.sort()
    out.append({'fitsPerS': len(group['cases'])/t_total, 'medianRelErr': errs[len(errs)//2], 'p90RelErr': errs[int(len(errs)*0.9)]})
print(json.dumps(out))
`;

const PY_EIG = String.raw`
import sys, json, time
import numpy as np
m = np.array(json.load(sys.stdin))
A = np.empty((len(m),3,3))
A[:,0,0]=m[:,0]; A[:,0,1]=A[:,1,0]=m[:,1]; A[:,0,2]=A[:,2,0]=m[:,2]; A[:,1,1]=m[:,3]; A[:,1,2]=A[:,2,1]=m[:,4]; A[:,2,2]=m[:,5]
t0=time.process_time(); w,v=np.linalg.eigh(A); t1=time.process_time()
t2=time.process_time()
for i in range(20000): np.linalg.eigh(A[i])
t3=time.process_time()
print(json.dumps({'batchedPerS': len(m)/(t1-t0), 'singlePerS': 20000/(t3-t2)}))
`;

function python(script: string, input: unknown): unknown | null {
  const r = spawnSync('python3', ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 1 << 28 });
  if (r.status !== 0) {
    console.log(`  (python reference skipped: ${(r.stderr || r.error?.message || 'python3 not found').split('\n').filter(Boolean).pop()})`);
    return null;
  }
  return JSON.parse(r.stdout);
}

function fmt(x: number, digits = 0): string {
  return x.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits });
}

export async function main(): Promise<void> {
  const { loadavg } = await import('node:os');
  console.log('fit bench — cylinder fits (1 mm noise, arcs 120–360°, radii 1–20 cm), one core');
  console.log(`  rates are per CPU-second (user time) on both sides; load average now ${loadavg()[0].toFixed(1)}`);
  const sizes: [number, number][] = [
    [50, 150],
    [200, 80],
    [1000, 30],
  ];
  for (const outlierFraction of [0, 0.15]) {
    console.log(`\n  outliers ${outlierFraction * 100} %`);
    console.log('  points | xylemap fits/s | median / p90 radius error | scipy least_squares fits/s | median / p90 radius error | speed-up');
    const groups = sizes.map(([n, count]) => ({ n, cases: makeCases(n, count, outlierFraction, 1000 + n) }));
    const ts = groups.map((g) => timeTs(g.cases, outlierFraction > 0 ? 'tukey' : 'none'));
    const py = python(PY_FIT, {
      groups: groups.map((g) => ({ cases: g.cases, loss: outlierFraction > 0 ? 'huber' : 'linear' })),
    }) as { fitsPerS: number; medianRelErr: number; p90RelErr: number }[] | null;
    groups.forEach((g, k) => {
      const a = ts[k];
      const b = py?.[k];
      console.log(
        `  ${String(g.n).padStart(6)} | ${fmt(a.fitsPerS).padStart(14)} | ${fmt(a.medianRelErr * 100, 2)} % / ${fmt(a.p90RelErr * 100, 2)} %` +
          (b
            ? `   | ${fmt(b.fitsPerS).padStart(26)} | ${fmt(b.medianRelErr * 100, 2)} % / ${fmt(b.p90RelErr * 100, 2)} %   | ${fmt(a.fitsPerS / b.fitsPerS, 1)}×`
            : ''),
      );
    });
  }
  console.log('  (xylemap: Tukey IRLS + LM with outliers, plain LM without, no initial axis given;');
  console.log('   scipy: least_squares loss huber / linear, f_scale 1 mm, 2-point Jacobian, started from the same PCA axis + Taubin circle)');

  // reliability flag against known truth
  console.log('\n  reliability flag on known cylinders (radius 0.5–20 cm, 1 mm noise, arcs 120–360°, true axis given, 200 per row)');
  console.log('  points | outliers | converged | radius error > 10 % | flagged reliable | reliable but error > 10 %');
  for (const n of [12, 30, 50, 200, 1000]) {
    for (const fo of [0, 0.15, 0.3]) {
      const rnd = createRandom(77 + n);
      let conv = 0, bad = 0, rel = 0, relBad = 0;
      const K = 200;
      for (let k = 0; k < K; k++) {
        const radiusM = rnd.uniform(0.005, 0.2);
        const axis = unit([rnd.uniform(-0.5, 0.5), rnd.uniform(-0.5, 0.5), 1]);
        const s = sampleCylinder({ n, radiusM, lengthM: Math.max(4 * radiusM, 0.1), arcRad: rnd.uniform((2 * Math.PI) / 3, 2 * Math.PI), noiseM: 0.001, outlierFraction: fo, axis }, rnd);
        const f = fitCylinder(s.x, s.y, s.z, s.indices, { rangeNoiseM: 0.001, initialAxis: axis });
        const isBad = !f || Math.abs(f.radiusM / radiusM - 1) > 0.1;
        if (f?.converged) conv++;
        if (isBad) bad++;
        if (assessReliability(f, { rangeNoiseM: 0.001 }).reliable) {
          rel++;
          if (isBad) relBad++;
        }
      }
      const pc = (v: number) => `${fmt((100 * v) / K, 1)} %`;
      console.log(`  ${String(n).padStart(6)} | ${`${fo * 100} %`.padStart(8)} | ${pc(conv).padStart(9)} | ${pc(bad).padStart(19)} | ${pc(rel).padStart(16)} | ${pc(relBad).padStart(10)}`);
    }
  }

  await virtualScanCalibration();

  // eigen solver
  const rnd = createRandom(5);
  const N = 1_000_000;
  const m = new Float64Array(6 * N);
  for (let i = 0; i < m.length; i++) m[i] = rnd.normal();
  const out = new Float64Array(12);
  let sink = 0;
  for (let i = 0; i < N; i++) {
    eigenSymmetric3(m[6 * i], m[6 * i + 1], m[6 * i + 2], m[6 * i + 3], m[6 * i + 4], m[6 * i + 5], out);
    sink += out[0];
  }
  const cpu0 = process.cpuUsage();
  for (let i = 0; i < N; i++) {
    eigenSymmetric3(m[6 * i], m[6 * i + 1], m[6 * i + 2], m[6 * i + 3], m[6 * i + 4], m[6 * i + 5], out);
    sink += out[0];
  }
  const dt = process.cpuUsage(cpu0).user / 1000;
  console.log(`\n  eigenSymmetric3: ${fmt((N / dt) * 1000)} solves/s (${fmt((dt * 1e6) / N, 0)} ns each; checksum ${sink.toFixed(3)})`);
  const M = 200_000;
  const rows: number[][] = [];
  for (let i = 0; i < M; i++) rows.push(Array.from(m.subarray(6 * i, 6 * i + 6)));
  const pe = python(PY_EIG, rows) as { batchedPerS: number; singlePerS: number } | null;
  if (pe) {
    console.log(`  numpy.linalg.eigh: ${fmt(pe.batchedPerS)} solves/s batched (${fmt(M)} stacked 3×3), ${fmt(pe.singlePerS)} solves/s one call per matrix`);
  }
}

/**
 * Radius bias of the fit on a virtual scan, per radius class, given each segment's true axis and
 * true points (so only the fit and the scan artefacts are measured, not the skeleton): raw, on
 * wood-labelled points only (mixed pixels removed), and after the noise_bias rule r − σ²/(2r).
 */
async function virtualScanCalibration(): Promise<void> {
  const { simulate } = await import('../core/simulate/simulate.js');
  const { simulateOptions } = await import('../core/simulate/options.js');
  const o = simulateOptions.resolve({
    seed: 3,
    tree_height_m: 7,
    trunk_base_radius_m: 0.1,
    scan_distance_m: 6,
    angular_step_deg: 0.06,
    twig_radius_m: 0.004,
    cylinders_per_internode: 2,
  });
  const vs = simulate(o);
  const seg = vs.cloud.extra.segment_id as Int32Array;
  const label = vs.cloud.extra.label as Uint8Array;
  const bySeg = new Map<number, number[]>();
  for (let i = 0; i < vs.cloud.count; i++) {
    if (seg[i] < 0) continue;
    let l = bySeg.get(seg[i]);
    if (!l) bySeg.set(seg[i], (l = []));
    l.push(i);
  }
  const classes: [number, number][] = [
    [0.002, 0.005],
    [0.005, 0.01],
    [0.01, 0.025],
    [0.025, 0.05],
    [0.05, 0.5],
  ];
  const rows = classes.map(() => ({ raw: [] as number[], wood: [] as number[], corrected: [] as number[], mixed: [] as number[] }));
  const sigma = o.range_noise_m;
  for (const s of vs.tree.network.segments) {
    const pts = bySeg.get(s.segmentId);
    if (!pts || pts.length < 12) continue;
    const k = classes.findIndex(([lo, hi]) => s.radiusM >= lo && s.radiusM < hi);
    if (k < 0) continue;
    const axis: Vec3 = [s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]];
    const f = fitCylinder(vs.cloud.x, vs.cloud.y, vs.cloud.z, pts, { initialAxis: axis, rangeNoiseM: sigma });
    if (!f) continue;
    rows[k].raw.push(f.radiusM / s.radiusM - 1);
    rows[k].corrected.push(Math.max(f.radiusM - (sigma * sigma) / (2 * f.radiusM), 0.5 * f.radiusM) / s.radiusM - 1);
    const wood = pts.filter((i) => label[i] === 0);
    rows[k].mixed.push(1 - wood.length / pts.length);
    const g = wood.length >= 12 ? fitCylinder(vs.cloud.x, vs.cloud.y, vs.cloud.z, wood, { initialAxis: axis, rangeNoiseM: sigma }) : null;
    if (g) rows[k].wood.push(g.radiusM / s.radiusM - 1);
  }
  const med = (a: number[]) => {
    const b = [...a].sort((x, y) => x - y);
    return b.length ? b[b.length >> 1] : NaN;
  };
  console.log(
    `\n  virtual scan (seed 3, 7 m tree, ${o.scan_positions} positions at ${o.scan_distance_m} m, range noise ${sigma * 1000} mm, ${vs.cloud.count.toLocaleString('en-US')} points):`,
  );
  console.log('  fit per true segment with its true axis and points — median radius error');
  console.log('  radius class | segments | mixed-pixel share | raw fit | wood points only | after noise_bias rule');
  classes.forEach(([lo, hi], k) => {
    const r = rows[k];
    const pc = (v: number) => `${v >= 0 ? '+' : ''}${fmt(100 * v, 1)} %`;
    console.log(
      `  ${`${lo * 100}–${hi * 100} cm`.padEnd(12)} | ${String(r.raw.length).padStart(8)} | ${`${fmt(100 * med(r.mixed), 0)} %`.padStart(17)} | ${pc(med(r.raw)).padStart(7)} | ${pc(med(r.wood)).padStart(16)} | ${pc(med(r.corrected)).padStart(8)}`,
    );
  });
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
