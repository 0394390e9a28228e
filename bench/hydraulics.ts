/**
 * Hydraulics benchmark (`node dist/bench/hydraulics.js`): run time of `analyseHydraulics` on
 * scan-lab trees and on symmetric binary trees of growing size, the agreement of series–parallel
 * reduction with the Kirchhoff solve, a side-by-side check of the whole-tree conductance against
 * scipy's sparse direct solver (python3 + scipy, if present), and the conductance against the
 * Yang & Tyree 1993 whole-shoot regression K ≈ 6.0·10⁻² D^1.40. Prints figures; asserts nothing.
 */
import { spawnSync } from 'node:child_process';
import { rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { analyseHydraulics } from '../core/hydraulics/analyse.js';
import { conduitLayout } from '../core/hydraulics/conduits.js';
import { segmentConductanceKgPerSPerPa } from '../core/hydraulics/conductance.js';
import { pathGeometry } from '../core/hydraulics/geometry.js';
import { treeConductanceByKirchhoff } from '../core/hydraulics/kirchhoff.js';
import { treeConductanceByReduction } from '../core/hydraulics/reduction.js';
import { waterProperties } from '../core/hydraulics/water.js';
import { loadPreset } from '../core/io/presets.js';
import { generateTree } from '../core/simulate/tree.js';
import { simulateOptions } from '../core/simulate/options.js';
import { presetOptions } from '../core/simulate/presets.js';
import { SegmentTree } from '../core/topology/node-tree.js';
import type { Network, Segment, Vec3 } from '../core/types/network.js';

/** Symmetric binary tree, `per` cylinders per internode, da Vinci radii, WBE length ratio. */
function binary(levels: number, per: number): Network {
  const segments: Segment[] = [];
  const stack: { parent: number; start: Vec3; level: number; angle: number }[] = [{ parent: -1, start: [0, 0, 0], level: 0, angle: 0 }];
  while (stack.length) {
    const w = stack.pop()!;
    const r = 0.1 * 2 ** (-w.level / 2);
    const l = (3 * 2 ** (-w.level / 3)) / per;
    const dir: Vec3 = w.level === 0 ? [0, 0, 1] : [Math.sin(w.angle) * 0.5, Math.cos(w.angle) * 0.5, 0.85];
    let p = w.start;
    let parent = w.parent;
    for (let c = 0; c < per; c++) {
      const end: Vec3 = [p[0] + dir[0] * l, p[1] + dir[1] * l, p[2] + dir[2] * l];
      const id = segments.length;
      segments.push({
        segmentId: id, parentId: parent, branchId: 0, branchOrder: 0, strahlerOrder: 0, start: p, end, radiusM: r, radiusSeM: 0,
        lengthM: Math.hypot(dir[0], dir[1], dir[2]) * l, fitRmseM: 0, arcCoverage: 1, pointCount: 0, reliable: true, reliabilityReason: '',
      });
      parent = id;
      p = end;
    }
    if (w.level + 1 < levels) for (const s of [-1, 1]) stack.push({ parent, start: p, level: w.level + 1, angle: w.angle + s * 1.2 + 0.7 });
  }
  return { segments };
}

function timed<T>(fn: () => T): { value: T; ms: number } {
  const t0 = performance.now();
  const value = fn();
  return { value, ms: performance.now() - t0 };
}

/** Whole-tree conductance of the same network by scipy.sparse.linalg.spsolve, or null without scipy. */
function scipyConductance(tree: SegmentTree, g: Float64Array): number | null {
  const file = join(tmpdir(), `xylemap-bench-hydraulics-${process.pid}.json`);
  const n = tree.size;
  const from = Array.from({ length: n }, (_, i) => (tree.parent[i] >= 0 ? tree.parent[i] + 1 : 0));
  const tips = Array.from({ length: n }, (_, i) => (tree.isTip(i) ? i + 1 : -1)).filter((v) => v >= 0);
  writeFileSync(file, JSON.stringify({ n: n + 1, from, to: Array.from({ length: n }, (_, i) => i + 1), g: Array.from(g), tips }));
  const script = `
import json, sys, numpy as np, scipy.sparse as sp, scipy.sparse.linalg as sl
d = json.load(open(sys.argv[1]))
n = d['n']; f = np.array(d['from']); t = np.array(d['to']); g = np.array(d['g'])
L = sp.coo_matrix((np.concatenate([g, g, -g, -g]), (np.concatenate([f, t, f, t]), np.concatenate([f, t, t, f]))), shape=(n, n)).tocsr()
fixed = np.zeros(n, bool); fixed[0] = True; fixed[d['tips']] = True
H = np.zeros(n); H[0] = 1.0
free = ~fixed
b = -L[free][:, fixed] @ H[fixed]
H[free] = sl.spsolve(L[free][:, free].tocsc(), b)
print(repr(float(np.sum(g[f == 0] * (H[0] - H[t[f == 0]])))))
`;
  try {
    const r = spawnSync('python3', ['-c', script, file], { encoding: 'utf8' });
    if (r.status !== 0) return null;
    return Number(r.stdout.trim());
  } finally {
    rmSync(file, { force: true });
  }
}

export async function main(): Promise<void> {
  const preset = loadPreset('diffuse-porous');
  const water = waterProperties(20);
  process.stdout.write('hydraulics benchmark (diffuse-porous preset, 20 °C, default options)\n\n');
  process.stdout.write('tree                segments  analyse_ms  K_kg_s_MPa   K/YangTyree  reduction_vs_kirchhoff  scipy_vs_reduction  E_crit_kg_s  min_psi_MPa\n');
  const cases: { name: string; network: Network }[] = [];
  for (const name of ['sapling', 'spire-spruce', 'park-oak']) {
    cases.push({ name, network: generateTree(simulateOptions.resolve({ ...presetOptions(name), seed: 1 })).network });
  }
  for (const [levels, per] of [[8, 4], [10, 4], [12, 4], [14, 3]] as const) cases.push({ name: `binary-${levels}x${per}`, network: binary(levels, per) });
  for (const c of cases) {
    const tree = SegmentTree.fromNetwork(c.network);
    const radii = c.network.segments.map((s) => s.radiusM);
    const geometry = pathGeometry(tree);
    const layout = conduitLayout(tree, radii, geometry, preset, { conduit: 'apex_widening', count: 'conduit_density', sapwood: 'sapwood_depth' });
    const g = Float64Array.from(layout.diameterM, (d, i) =>
      1e6 * segmentConductanceKgPerSPerPa(d, layout.count[i], geometry.lengthM[i], preset.conduit.end_wall_resistance_fraction, water),
    );
    const kRed = treeConductanceByReduction(tree, g);
    const kKir = treeConductanceByKirchhoff(tree, g).conductance;
    const kPy = tree.size <= 60000 ? scipyConductance(tree, g) : null;
    const { value, ms } = timed(() => analyseHydraulics(c.network, {}, preset));
    const s = value.summary as Record<string, number>;
    const d = 2 * tree.segments[tree.root].radiusM;
    const yt = 6.0e-2 * d ** 1.4;
    const rel = (a: number, b: number): string => (Math.abs(a - b) / Math.abs(b)).toExponential(1);
    process.stdout.write(
      `${c.name.padEnd(18)}  ${String(tree.size).padStart(8)}  ${ms.toFixed(0).padStart(10)}  ${s.tree_conductance_kg_s_mpa.toExponential(3).padStart(10)}  ${(s.tree_conductance_kg_s_mpa / yt).toFixed(2).padStart(11)}  ${rel(kKir, kRed).padStart(22)}  ${(kPy === null ? 'n/a' : rel(kPy, kRed)).padStart(18)}  ${s.critical_transpiration_kg_s.toExponential(3).padStart(11)}  ${(s.min_water_potential_mpa ?? NaN).toFixed(3).padStart(11)}\n`,
    );
  }
}

const direct = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (direct) await main();
