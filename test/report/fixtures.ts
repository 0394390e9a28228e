import type { Network, Segment, Vec3 } from '../../core/types/network.js';
import { createRandom } from '../../core/util/random.js';
import type { ReportData } from '../../core/report/report-data.js';
import { reliabilityFromNetwork } from '../../core/report/report-data.js';
import { VERSION } from '../../core/version.js';

/**
 * A generated binary tree for report tests: every internode splits into two children whose radii
 * satisfy Σ r_child^a = r_parent^a exactly for the given exponent (so the per-furcation exponent is known),
 * each internode drawn as `segmentsPerInternode` collinear segments.
 */
export function binaryTreeNetwork(levels: number, segmentsPerInternode = 1, exponent = 2.5, seed = 7): Network {
  const rnd = createRandom(seed);
  const segments: Segment[] = [];
  let nextId = 0;
  const stack: { parentId: number; start: Vec3; dir: Vec3; radius: number; length: number; level: number; order: number; branchId: number }[] = [
    { parentId: -1, start: [500, 200, 10], dir: [0, 0, 1], radius: 0.25, length: 3, level: 0, order: 0, branchId: 0 },
  ];
  let nextBranch = 1;
  while (stack.length > 0) {
    const n = stack.pop()!;
    let start = n.start;
    let parentId = n.parentId;
    for (let k = 0; k < segmentsPerInternode; k++) {
      const l = n.length / segmentsPerInternode;
      const end: Vec3 = [start[0] + n.dir[0] * l, start[1] + n.dir[1] * l, start[2] + n.dir[2] * l];
      const id = nextId++;
      const flagged = rnd.next() < 0.05;
      segments.push({
        segmentId: id,
        parentId,
        branchId: n.branchId,
        branchOrder: n.order,
        strahlerOrder: levels - n.level + 1,
        start,
        end,
        radiusM: n.radius,
        radiusSeM: n.radius * 0.05,
        lengthM: l,
        fitRmseM: 0.002,
        arcCoverage: 0.8,
        pointCount: 100,
        reliable: !flagged,
        reliabilityReason: flagged ? (rnd.next() < 0.5 ? 'thin_arc' : 'few_points') : '',
      });
      parentId = id;
      start = end;
    }
    if (n.level >= levels) continue;
    // Split radius: share s and 1 − s of r^a between the children.
    const s = 0.35 + 0.3 * rnd.next();
    const ra = n.radius ** exponent;
    const radii = [(s * ra) ** (1 / exponent), ((1 - s) * ra) ** (1 / exponent)];
    const main = radii[0] >= radii[1] ? 0 : 1;
    const az = rnd.uniform(0, 2 * Math.PI);
    for (let c = 0; c < 2; c++) {
      const tilt = 0.35 + 0.25 * rnd.next();
      const a = az + c * Math.PI;
      const d: Vec3 = [
        n.dir[0] * Math.cos(tilt) + Math.sin(tilt) * Math.cos(a),
        n.dir[1] * Math.cos(tilt) + Math.sin(tilt) * Math.sin(a),
        n.dir[2] * Math.cos(tilt) + 0.15,
      ];
      const len = Math.hypot(...d);
      stack.push({
        parentId,
        start,
        dir: [d[0] / len, d[1] / len, d[2] / len],
        radius: radii[c],
        length: n.length * 0.8,
        level: n.level + 1,
        order: c === main ? n.order : n.order + 1,
        branchId: c === main ? n.branchId : nextBranch++,
      });
    }
  }
  return { segments };
}

/** ReportData around a generated network with made-up (but plausible) hydraulic columns. */
export function fixtureReportData(network: Network, withHydraulics = true): ReportData {
  const segs = network.segments;
  const n = segs.length;
  const conduit = new Float64Array(n);
  const psi = new Float64Array(n);
  const plc = new Float64Array(n);
  const maxZ = Math.max(...segs.map((s) => s.end[2]));
  for (let i = 0; i < n; i++) {
    conduit[i] = 20 + 200 * segs[i].radiusM;
    psi[i] = -0.3 - 1.5 * ((segs[i].end[2] - segs[0].start[2]) / (maxZ - segs[0].start[2]));
    plc[i] = 100 / (1 + Math.exp(2 * (psi[i] + 2.5)));
  }
  const exponents = Array.from({ length: 200 }, (_, k) => 2.2 + 0.8 * Math.sin(k * 1.7) ** 2);
  return {
    title: 'Generated binary tree',
    source: { file: 'generated.las', sha256: 'ab'.repeat(32), version: VERSION },
    network,
    layers: withHydraulics
      ? { conduitDiameterUm: conduit, waterPotentialMPa: psi, plcPercent: plc }
      : { conduitDiameterUm: null, waterPotentialMPa: null, plcPercent: null },
    exponent: { perFurcation: exponents, estimate: 2.5, interval: [2.35, 2.68], intervalLabel: '95 % bootstrap interval' },
    keyFigures: [
      { id: 'dbh', label: 'DBH', value: 0.5, unit: 'm', digits: 3 },
      { id: 'height', label: 'height', value: maxZ - segs[0].start[2], unit: 'm', digits: 3 },
      { id: 'exponent', label: 'exponent a', value: 2.5, unit: '', digits: 3, interval: [2.35, 2.68] },
    ],
    reliability: reliabilityFromNetwork(network, ['3 furcations excluded: a flagged child']),
    options: { report: { title: '', colour_by: 'branch_order' } },
    warnings: ['a test warning'],
  };
}
