import { createPointCloud, type PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { createRandom, type Random } from '../util/random.js';
import { buildBvh, type Bvh } from './bvh.js';
import { approach, footprintCoverage, rayAxisApproach, rayCylinder, rayDisc } from './intersect.js';
import type { SimulateOptions } from './options.js';
import { CYLINDER, type Scene } from './scene.js';
import { DEG } from './vec.js';

/** Per-point truth labels written as the `label` extra byte. */
export const LABEL = { wood: 0, ground: 1, clutter: 2, mixed: 3, leaf: 4 } as const;

export interface ScanPosition {
  /** 1-based, written as the LAS point source id. */
  id: number;
  x: number;
  y: number;
  z: number;
  /** Registration error applied to this position's points: rotation about the vertical (deg) and shift (m). */
  registrationRotationDeg: number;
  registrationShiftM: [number, number, number];
}

export interface ScanStats {
  rays: number;
  points: number;
  pointsPerLabel: Record<keyof typeof LABEL, number>;
  perPosition: { id: number; rays: number; points: number; azimuthRangeDeg: [number, number]; elevationRangeDeg: [number, number] }[];
}

/** Lowest elevation a terrestrial scanner sees: a blind cone below the head (typical instrument, from memory). */
const MIN_ELEVATION_DEG = -60;
/** Reflectance used for intensity; invented values of a plausible order (common practice, no source). */
const REFLECTANCE = { wood: 0.45, ground: 0.3, leaf: 0.55 };
/** Range at which intensity saturates; intensity ∝ ρ cos(incidence) / R² beyond it (lidar equation for extended targets, from memory). */
const INTENSITY_REFERENCE_RANGE_M = 2;

/**
 * Scan positions: `scan_positions` on a ring of radius `scan_distance_m` around the stem base at
 * `scanner_height_m` (the first due east of the stem, then evenly spaced), plus one under the
 * crown 1 m (or 3 trunk radii) beside the stem when `scan_under_crown`. Registration errors are drawn here.
 * @throws XylemapError without positions, or with a ring inside the stem
 */
export function scanPositions(o: SimulateOptions, rng: Random): ScanPosition[] {
  if (o.scan_positions === 0 && !o.scan_under_crown) {
    throw new XylemapError('no scan positions', { stage: 'simulate', option: 'simulate.scan_positions', hint: 'set scan_positions ≥ 1 or scan_under_crown true' });
  }
  if (o.scan_positions > 0 && !(o.scan_distance_m > o.trunk_base_radius_m + 0.2)) {
    throw new XylemapError(`scan_distance_m must be > trunk radius + 0.2 m (${(o.trunk_base_radius_m + 0.2).toFixed(2)} m), got ${o.scan_distance_m}`, {
      stage: 'simulate',
      option: 'simulate.scan_distance_m',
      hint: 'the scanner would stand inside the stem',
    });
  }
  const out: ScanPosition[] = [];
  const push = (x: number, y: number): void => {
    const first = out.length === 0;
    out.push({
      id: out.length + 1,
      x,
      y,
      z: o.scanner_height_m,
      registrationRotationDeg: first ? 0 : o.registration_error_deg * rng.normal(),
      registrationShiftM: first ? [0, 0, 0] : [o.registration_error_m * rng.normal(), o.registration_error_m * rng.normal(), o.registration_error_m * rng.normal()],
    });
  };
  for (let i = 0; i < o.scan_positions; i++) {
    const phi = (2 * Math.PI * i) / o.scan_positions;
    push(o.scan_distance_m * Math.cos(phi), o.scan_distance_m * Math.sin(phi));
  }
  // Under the crown: 1 m from the stem axis, or 3 trunk radii for thick stems.
  const under = Math.max(1, 3 * o.trunk_base_radius_m);
  if (o.scan_under_crown) push(under * Math.cos(Math.PI / 4), under * Math.sin(Math.PI / 4));
  return out;
}

/**
 * Scan a scene from every position: a spherical scan with `angular_step_deg` in azimuth and
 * elevation over the window that covers the scene box, nearest hit per ray through a BVH.
 *
 * Beam model: footprint radius w(R) = exit/2 + R·divergence/2. A cylinder registers when the
 * footprint share it covers (strip–disc overlap) is ≥ `min_return_fraction`. A full-footprint hit
 * lies on the surface (label wood). A partial hit is an edge return (label mixed pixel): with
 * something behind it, its range is the coverage-weighted mean of the two ranges (the classic
 * mixed-pixel artefact of averaging rangefinders); with nothing behind, the return keeps the
 * foreground range although the beam centre passes beside the branch — which is what makes thin
 * branches look thicker. Leaves and ground are hard targets (no edge model).
 * Gaussian range noise `range_noise_m` is added along the ray.
 *
 * Each position draws noise and clutter from its own stream seeded by (`seed`, position id).
 *
 * @returns the cloud (pointSourceId = position id, intensity; extra `segment_id` Int32, `label` Uint8)
 */
export function scanScene(scene: Scene, o: SimulateOptions, positions: ScanPosition[]): { cloud: PointCloud; stats: ScanStats } {
  const ctx = prepareScan(scene, o, positions);
  return assembleScan(positions.map((p) => scanOnePosition(ctx, p)));
}

/** Everything one position's scan needs; plain data and typed arrays, so it can go to a worker thread. */
export interface ScanContext {
  scene: Scene;
  bvh: Bvh | null;
  options: SimulateOptions;
  box: { min: number[]; max: number[] };
}

/** The returns of one scan position, as trimmed columns. */
export interface PositionScan {
  id: number;
  rays: number;
  count: number;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  intensity: Uint16Array;
  segment: Int32Array;
  label: Uint8Array;
  azimuthRangeDeg: [number, number];
  elevationRangeDeg: [number, number];
}

/**
 * Build the BVH over the primitives' boxes padded by the largest footprint radius any position
 * can see (so near misses that still clip the beam are found).
 */
export function prepareScan(scene: Scene, o: SimulateOptions, positions: ScanPosition[]): ScanContext {
  const box = windowBox(scene, o);
  let maxDist = 0;
  for (const p of positions) maxDist = Math.max(maxDist, farthestCornerDistance(box, p));
  const reach = Math.min(maxDist, o.max_range_m);
  const pad = o.beam_exit_diameter_m / 2 + (reach * o.beam_divergence_mrad * 1e-3) / 2 + 1e-6;
  const padded = scene.boxes.slice();
  for (let i = 0; i < scene.count; i++) {
    for (let a = 0; a < 3; a++) {
      padded[6 * i + a] -= pad;
      padded[6 * i + 3 + a] += pad;
    }
  }
  return { scene, bvh: scene.count > 0 ? buildBvh(padded) : null, options: o, box };
}

/**
 * Scan from one position. Noise and clutter come from the position's own random stream, seeded
 * by (`seed`, position id), so the result does not depend on the other positions or on the order
 * (or thread) in which positions are scanned.
 */
export function scanOnePosition(ctx: ScanContext, pos: ScanPosition): PositionScan {
  const o = ctx.options;
  const win = angularWindow(ctx.box, pos, o.angular_step_deg);
  const rng = createRandom((Math.imul(o.seed ^ 0x27d4eb2d, 0x9e3779b1) + pos.id * 0x85ebca6b) >>> 0);
  const sink = new PointSink(1 << 14);
  const halfDiv = (o.beam_divergence_mrad * 1e-3) / 2;
  const rays = scanPosition(ctx.scene, ctx.bvh, o, pos, win, o.beam_exit_diameter_m / 2, halfDiv, farthestCornerDistance(ctx.box, pos), rng, sink);
  return {
    id: pos.id,
    rays,
    ...sink.columns(),
    azimuthRangeDeg: [win.az0 / DEG, (win.az0 + (win.nAz - 1) * win.step) / DEG],
    elevationRangeDeg: [win.el0 / DEG, (win.el0 + (win.nEl - 1) * win.step) / DEG],
  };
}

/** Concatenate position scans (in the given order) into one cloud with its statistics. */
export function assembleScan(parts: PositionScan[]): { cloud: PointCloud; stats: ScanStats } {
  const n = parts.reduce((a, p) => a + p.count, 0);
  const cloud = createPointCloud(new Float64Array(n), new Float64Array(n), new Float64Array(n));
  const intensity = new Uint16Array(n);
  const source = new Uint16Array(n);
  const segment = new Int32Array(n);
  const label = new Uint8Array(n);
  const stats: ScanStats = { rays: 0, points: n, pointsPerLabel: { wood: 0, ground: 0, clutter: 0, mixed: 0, leaf: 0 }, perPosition: [] };
  let at = 0;
  for (const p of parts) {
    cloud.x.set(p.x, at);
    cloud.y.set(p.y, at);
    cloud.z.set(p.z, at);
    intensity.set(p.intensity, at);
    source.fill(p.id, at, at + p.count);
    segment.set(p.segment, at);
    label.set(p.label, at);
    at += p.count;
    stats.rays += p.rays;
    stats.perPosition.push({ id: p.id, rays: p.rays, points: p.count, azimuthRangeDeg: p.azimuthRangeDeg, elevationRangeDeg: p.elevationRangeDeg });
  }
  cloud.attributes.intensity = intensity;
  cloud.attributes.pointSourceId = source;
  cloud.attributes.returnNumber = new Uint8Array(n).fill(1);
  cloud.attributes.numberOfReturns = new Uint8Array(n).fill(1);
  cloud.extra.segment_id = segment;
  cloud.extra.label = label;
  const names = Object.keys(LABEL) as (keyof typeof LABEL)[];
  for (let i = 0; i < n; i++) stats.pointsPerLabel[names[label[i]]]++;
  return { cloud, stats };
}

interface Window {
  az0: number;
  nAz: number;
  el0: number;
  nEl: number;
  step: number;
}

/** The box the scan window must cover: the scene padded by 0.3 m, down to the ground. */
function windowBox(scene: Scene, o: SimulateOptions): { min: number[]; max: number[] } {
  const min = scene.count > 0 ? scene.min.map((v) => v - 0.3) : [-1, -1, 0];
  const max = scene.count > 0 ? scene.max.map((v) => v + 0.3) : [1, 1, 1];
  if (o.ground) min[2] = Math.min(min[2], 0);
  return { min, max };
}

function farthestCornerDistance(box: { min: number[]; max: number[] }, p: ScanPosition): number {
  let d = 0;
  for (let c = 0; c < 8; c++) {
    const x = c & 1 ? box.max[0] : box.min[0];
    const y = c & 2 ? box.max[1] : box.min[1];
    const z = c & 4 ? box.max[2] : box.min[2];
    d = Math.max(d, Math.hypot(x - p.x, y - p.y, z - p.z));
  }
  return d;
}

/**
 * Azimuth/elevation window covering the box from the position, on the instrument's global
 * angular grid (multiples of the step). A position inside the box footprint scans all azimuths
 * and up to the zenith.
 */
function angularWindow(box: { min: number[]; max: number[] }, p: ScanPosition, stepDeg: number): Window {
  const step = stepDeg * DEG;
  const inside = p.x >= box.min[0] && p.x <= box.max[0] && p.y >= box.min[1] && p.y <= box.max[1];
  let azLo = 0;
  let azHi = 2 * Math.PI - step;
  let elLo = Infinity;
  let elHi = -Infinity;
  const centre = Math.atan2((box.min[1] + box.max[1]) / 2 - p.y, (box.min[0] + box.max[0]) / 2 - p.x);
  let dLo = Infinity;
  let dHi = -Infinity;
  for (let c = 0; c < 8; c++) {
    const x = (c & 1 ? box.max[0] : box.min[0]) - p.x;
    const y = (c & 2 ? box.max[1] : box.min[1]) - p.y;
    const z = (c & 4 ? box.max[2] : box.min[2]) - p.z;
    const el = Math.atan2(z, Math.hypot(x, y));
    elLo = Math.min(elLo, el);
    elHi = Math.max(elHi, el);
    let da = Math.atan2(y, x) - centre;
    while (da > Math.PI) da -= 2 * Math.PI;
    while (da < -Math.PI) da += 2 * Math.PI;
    dLo = Math.min(dLo, da);
    dHi = Math.max(dHi, da);
  }
  if (inside) {
    elLo = MIN_ELEVATION_DEG * DEG;
    elHi = Math.PI / 2;
  } else {
    azLo = centre + dLo;
    azHi = centre + dHi;
  }
  elLo = Math.max(elLo, MIN_ELEVATION_DEG * DEG);
  elHi = Math.min(elHi, Math.PI / 2);
  const az0 = Math.ceil(azLo / step) * step;
  const el0 = Math.ceil(elLo / step) * step;
  return {
    az0,
    nAz: Math.max(0, Math.floor((azHi - az0) / step + 1e-9) + 1),
    el0,
    nEl: Math.max(0, Math.floor((elHi - el0) / step + 1e-9) + 1),
    step,
  };
}

/** Cast all rays of one position; returns the number of rays. `clutterReachM` bounds clutter ranges (farthest corner of the scene box). */
function scanPosition(
  scene: Scene,
  bvh: Bvh | null,
  o: SimulateOptions,
  pos: ScanPosition,
  win: Window,
  w0: number,
  halfDiv: number,
  clutterReachM: number,
  rng: Random,
  sink: PointSink,
): number {
  const { kind, px, py, pz, ux, uy, uz, lengthM, radiusM, segmentId } = scene;
  const fMin = o.min_return_fraction;
  const fClean = 1 - fMin;
  const maxRange = o.max_range_m;
  const sigma = o.range_noise_m;
  const groundR2 = o.ground_radius_m * o.ground_radius_m;
  // Options copied to locals: the resolved options object has many keys and property reads on it
  // inside the ray loop cost several times the whole traversal (measured: 200 k → see bench).
  const ground = o.ground;
  const clutter = o.clutter_fraction;
  const ox = pos.x, oy = pos.y, oz = pos.z;
  const rot = pos.registrationRotationDeg * DEG;
  const cr = Math.cos(rot), sr = Math.sin(rot);
  const [sx, sy, sz] = pos.registrationShiftM;
  const cosEl = new Float64Array(win.nEl);
  const sinEl = new Float64Array(win.nEl);
  for (let j = 0; j < win.nEl; j++) {
    cosEl[j] = Math.cos(win.el0 + j * win.step);
    sinEl[j] = Math.sin(win.el0 + j * win.step);
  }
  const stack = new Int32Array(128);
  const stackNear = new Float64Array(128);
  const nb = bvh ? bvh.bounds : new Float64Array(0);
  const nFirst = bvh ? bvh.first : new Int32Array(0);
  const nCount = bvh ? bvh.count : new Int32Array(0);
  const nOrder = bvh ? bvh.order : new Int32Array(0);

  for (let i = 0; i < win.nAz; i++) {
    const az = win.az0 + i * win.step;
    const ca = Math.cos(az), sa = Math.sin(az);
    for (let j = 0; j < win.nEl; j++) {
      const dx = cosEl[j] * ca, dy = cosEl[j] * sa, dz = sinEl[j];
      // Two nearest registering targets: t, footprint share, primitive (-2 = ground).
      let t1 = Infinity, f1 = 0, p1 = -1;
      let t2 = Infinity;
      if (ground && dz < 0) {
        const tg = -oz / dz;
        const gx = ox + tg * dx, gy = oy + tg * dy;
        if (gx * gx + gy * gy <= groundR2) {
          t1 = tg;
          f1 = 1;
          p1 = -2;
        }
      }
      if (bvh) {
        const ix = 1 / dx, iy = 1 / dy, iz = 1 / dz;
        // Stack of nodes with their entry distance, so a popped node is tested against the
        // current limit without a second slab test.
        let sp = 0;
        const rootNear = slab(nb, 0, ox, oy, oz, ix, iy, iz);
        if (rootNear < Infinity) {
          stack[sp] = 0;
          stackNear[sp++] = rootNear;
        }
        while (sp > 0) {
          --sp;
          const node = stack[sp];
          // Finite limit, so boxes the ray misses (entry Infinity) are always culled.
          const limit = f1 >= fClean ? Math.min(t1, maxRange) : Math.min(t2, maxRange);
          if (stackNear[sp] > limit) continue;
          const cnt = nCount[node];
          if (cnt === 0) {
            const l = nFirst[node];
            const tl = slab(nb, 6 * l, ox, oy, oz, ix, iy, iz);
            const tr = slab(nb, 6 * (l + 1), ox, oy, oz, ix, iy, iz);
            // Push the farther child first so the nearer one is visited first.
            if (tl <= tr) {
              if (tr <= limit) {
                stack[sp] = l + 1;
                stackNear[sp++] = tr;
              }
              if (tl <= limit) {
                stack[sp] = l;
                stackNear[sp++] = tl;
              }
            } else {
              if (tl <= limit) {
                stack[sp] = l;
                stackNear[sp++] = tl;
              }
              if (tr <= limit) {
                stack[sp] = l + 1;
                stackNear[sp++] = tr;
              }
            }
            continue;
          }
          const start = nFirst[node];
          for (let k = start; k < start + cnt; k++) {
            const p = nOrder[k];
            let t: number;
            let f: number;
            if (kind[p] === CYLINDER) {
              rayAxisApproach(ox, oy, oz, dx, dy, dz, px[p], py[p], pz[p], ux[p], uy[p], uz[p], lengthM[p]);
              const tca = approach[0];
              const dist = approach[1];
              const r = radiusM[p];
              const w = w0 + tca * halfDiv;
              if (dist >= r + w) continue;
              f = footprintCoverage(dist, r, w);
              if (f < fMin) continue;
              t = dist < r ? rayCylinder(ox, oy, oz, dx, dy, dz, px[p], py[p], pz[p], ux[p], uy[p], uz[p], lengthM[p], r) : tca;
              if (t === Infinity) {
                // The beam centre passes beyond an end of the cylinder: an edge return at best.
                t = tca;
                if (f >= fClean) f = 0.5 * (fMin + fClean);
              }
            } else {
              t = rayDisc(ox, oy, oz, dx, dy, dz, px[p], py[p], pz[p], ux[p], uy[p], uz[p], radiusM[p]);
              if (t === Infinity) continue;
              f = 1;
            }
            if (t < t1) {
              t2 = t1;
              t1 = t;
              f1 = f;
              p1 = p;
            } else if (t < t2) {
              t2 = t;
            }
          }
        }
      }
      let range = Infinity;
      let label: number = LABEL.wood;
      let seg = -1;
      let intensity = 0;
      if (p1 !== -1 && t1 <= maxRange) {
        if (f1 >= fClean) {
          range = t1;
          if (p1 === -2) {
            label = LABEL.ground;
            intensity = REFLECTANCE.ground * -dz;
          } else if (kind[p1] === CYLINDER) {
            label = LABEL.wood;
            seg = segmentId[p1];
            intensity = REFLECTANCE.wood * cylinderIncidence(scene, p1, ox, oy, oz, dx, dy, dz, t1);
          } else {
            label = LABEL.leaf;
            intensity = REFLECTANCE.leaf * Math.abs(dx * ux[p1] + dy * uy[p1] + dz * uz[p1]);
          }
        } else {
          label = LABEL.mixed;
          seg = segmentId[p1];
          range = t2 <= maxRange ? f1 * t1 + (1 - f1) * t2 : t1;
          intensity = REFLECTANCE.wood * f1 * 0.7;
        }
      }
      if (clutter > 0 && rng.next() < clutter) {
        // Spurious returns (dust, insects, understory) in front of the target, within the scene
        // box's reach and above the ground plane.
        const below = dz < 0 ? -oz / dz : Infinity;
        range = rng.uniform(Math.min(1, 0.5 * below), Math.min(range, clutterReachM, below));
        label = LABEL.clutter;
        seg = -1;
        intensity = rng.uniform(0.02, 0.3);
      }
      if (range === Infinity) continue;
      if (sigma > 0) range += sigma * rng.normal();
      const rx = dx * range, ry = dy * range;
      // Registration error: rotate about the vertical through the scanner, then shift.
      const x = ox + cr * rx - sr * ry + sx;
      const y = oy + sr * rx + cr * ry + sy;
      const z = oz + dz * range + sz;
      const rel = INTENSITY_REFERENCE_RANGE_M / Math.max(range, INTENSITY_REFERENCE_RANGE_M);
      sink.push(x, y, z, Math.min(65535, Math.round(65535 * intensity * rel * rel)), seg, label);
    }
  }
  return win.nAz * win.nEl;
}

/** Entry distance of a ray into node box b (Infinity when it misses), the slab test (Kay & Kajiya 1986). */
function slab(nb: Float64Array, b: number, ox: number, oy: number, oz: number, ix: number, iy: number, iz: number): number {
  let lo = (nb[b] - ox) * ix;
  let hi = (nb[b + 3] - ox) * ix;
  if (lo > hi) {
    const s = lo;
    lo = hi;
    hi = s;
  }
  let a = (nb[b + 1] - oy) * iy;
  let c = (nb[b + 4] - oy) * iy;
  if (a > c) {
    const s = a;
    a = c;
    c = s;
  }
  if (a > lo) lo = a;
  if (c < hi) hi = c;
  a = (nb[b + 2] - oz) * iz;
  c = (nb[b + 5] - oz) * iz;
  if (a > c) {
    const s = a;
    a = c;
    c = s;
  }
  if (a > lo) lo = a;
  if (c < hi) hi = c;
  if (hi < 0 || lo > hi) return Infinity;
  return lo > 0 ? lo : 0;
}

/** |cos| of the angle between the ray and the cylinder's surface normal at the hit. */
function cylinderIncidence(scene: Scene, p: number, ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, t: number): number {
  const hx = ox + t * dx - scene.px[p];
  const hy = oy + t * dy - scene.py[p];
  const hz = oz + t * dz - scene.pz[p];
  const s = hx * scene.ux[p] + hy * scene.uy[p] + hz * scene.uz[p];
  const nx = hx - s * scene.ux[p];
  const ny = hy - s * scene.uy[p];
  const nz = hz - s * scene.uz[p];
  const n = Math.hypot(nx, ny, nz);
  return n > 0 ? Math.abs(dx * nx + dy * ny + dz * nz) / n : 1;
}

/** Growable columns for one position's returns. */
class PointSink {
  count = 0;
  private x: Float64Array;
  private y: Float64Array;
  private z: Float64Array;
  private intensity: Uint16Array;
  private segment: Int32Array;
  private label: Uint8Array;

  constructor(capacity: number) {
    this.x = new Float64Array(capacity);
    this.y = new Float64Array(capacity);
    this.z = new Float64Array(capacity);
    this.intensity = new Uint16Array(capacity);
    this.segment = new Int32Array(capacity);
    this.label = new Uint8Array(capacity);
  }

  push(x: number, y: number, z: number, intensity: number, segment: number, label: number): void {
    if (this.count === this.x.length) this.grow();
    const i = this.count++;
    this.x[i] = x;
    this.y[i] = y;
    this.z[i] = z;
    this.intensity[i] = intensity;
    this.segment[i] = segment;
    this.label[i] = label;
  }

  private grow(): void {
    const n = this.x.length * 2;
    const g = <T extends Float64Array | Uint16Array | Int32Array | Uint8Array>(a: T, make: (n: number) => T): T => {
      const b = make(n);
      b.set(a);
      return b;
    };
    this.x = g(this.x, (k) => new Float64Array(k));
    this.y = g(this.y, (k) => new Float64Array(k));
    this.z = g(this.z, (k) => new Float64Array(k));
    this.intensity = g(this.intensity, (k) => new Uint16Array(k));
    this.segment = g(this.segment, (k) => new Int32Array(k));
    this.label = g(this.label, (k) => new Uint8Array(k));
  }

  columns(): Pick<PositionScan, 'count' | 'x' | 'y' | 'z' | 'intensity' | 'segment' | 'label'> {
    const n = this.count;
    return {
      count: n,
      x: this.x.slice(0, n),
      y: this.y.slice(0, n),
      z: this.z.slice(0, n),
      intensity: this.intensity.slice(0, n),
      segment: this.segment.slice(0, n),
      label: this.label.slice(0, n),
    };
  }
}

/** Random stream of the scan, independent of the tree's so scan settings never change the tree. */
export function scanRandom(seed: number): Random {
  return createRandom((seed ^ 0x5bd1e995) >>> 0);
}
