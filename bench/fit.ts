/**
 * Cylinder-fit bench: fits per second for typical segments (50, 200, 1000 points) and radius
 * accuracy, side by side with scipy.optimize.least_squares on the same points and the same start
 * (python3 subprocess; skipped with a note when python3/scipy is missing). Also eigen solves per
 * second against numpy.linalg.eigh on the same matrices. Prints figures; asserts nothing.
 *
 * Run: npm run build && node dist/bench/fit.js   (or: npx vite-node bench/fit.ts)
 */
import { spawnSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { fitCylinder } from '../core/reconstruct/fit/cylinder-fit.js';
import { fitCircleTaubin } from '../core/reconstruct/fit/circle-fit.js';
import { eigenSymmetric3 } from '../core/reconstruct/fit/eigen3.js';
import { pca } from '../core/reconstruct/fit/pca.js';
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
  const t0 = performance.now();
  let t = t0;
  while (t - t0 < 700) {
    for (const d of data) fitCylinder(d.x, d.y, d.z, d.idx, { robust, rangeNoiseM: 0.001 });
    fits += data.length;
    t = performance.now();
  }
  errs.sort((a, b) => a - b);
  return { fitsPerS: (fits / (t - t0)) * 1000, medianRelErr: errs[errs.length >> 1], p90RelErr: errs[Math.floor(errs.length * 0.9)] };
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
        t0 = time.perf_counter()
        sol = least_squares(res, x0, loss=group['loss'], f_scale=0.001)
        t_total += time.perf_counter() - t0
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
t0=time.perf_counter(); w,v=np.linalg.eigh(A); t1=time.perf_counter()
t2=time.perf_counter()
for i in range(20000): np.linalg.eigh(A[i])
t3=time.perf_counter()
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
  console.log('fit bench — cylinder fits (1 mm noise, arcs 120–360°, radii 1–20 cm), one core');
  const sizes: [number, number][] = [
    [50, 200],
    [200, 120],
    [1000, 40],
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
  console.log(`  (xylemap: ${'tukey'} IRLS+LM with outliers, plain LM without; scipy: loss huber / linear, f_scale 1 mm, 2-point Jacobian; same PCA+Taubin start)`);

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
  const t0 = performance.now();
  for (let i = 0; i < N; i++) {
    eigenSymmetric3(m[6 * i], m[6 * i + 1], m[6 * i + 2], m[6 * i + 3], m[6 * i + 4], m[6 * i + 5], out);
    sink += out[0];
  }
  const dt = performance.now() - t0;
  console.log(`\n  eigenSymmetric3: ${fmt((N / dt) * 1000)} solves/s (${fmt((dt * 1e6) / N, 0)} ns each; checksum ${sink.toFixed(3)})`);
  const M = 200_000;
  const rows: number[][] = [];
  for (let i = 0; i < M; i++) rows.push(Array.from(m.subarray(6 * i, 6 * i + 6)));
  const pe = python(PY_EIG, rows) as { batchedPerS: number; singlePerS: number } | null;
  if (pe) {
    console.log(`  numpy.linalg.eigh: ${fmt(pe.batchedPerS)} solves/s batched (${fmt(M)} stacked 3×3), ${fmt(pe.singlePerS)} solves/s one call per matrix`);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  main().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
