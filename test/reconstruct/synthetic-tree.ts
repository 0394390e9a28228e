import { createPointCloud, type PointCloud } from '../../core/types/point-cloud.js';
import type { Vec3 } from '../../core/types/network.js';
import { createRandom, type Random } from '../../core/util/random.js';

/** A cylinder of a synthetic test tree, in the cloud's own frame. */
export interface TestCylinder {
  start: Vec3;
  end: Vec3;
  radiusM: number;
}

export interface SyntheticTreeSpec {
  cylinders: TestCylinder[];
  /** Points per m² of bark surface. */
  density: number;
  noiseM: number;
  seed: number;
  /** Ground: z = g0 + gx·x + gy·y over a square of half-width `groundHalfM` around `groundCentre`. */
  ground?: { g0: number; gx: number; gy: number; halfM: number; centre: [number, number]; density: number };
  /** Extra uniform clutter points in a box. */
  clutter?: { count: number; min: Vec3; max: Vec3 };
}

/** Points sampled uniformly on the lateral surfaces of the cylinders, with Gaussian radial noise. */
export function syntheticTree(spec: SyntheticTreeSpec): PointCloud {
  const rnd = createRandom(spec.seed);
  const xs: number[] = [];
  const ys: number[] = [];
  const zs: number[] = [];
  for (const c of spec.cylinders) sampleCylinder(c, spec.density, spec.noiseM, rnd, xs, ys, zs);
  if (spec.ground) {
    const g = spec.ground;
    const count = Math.round(g.density * 4 * g.halfM * g.halfM);
    for (let i = 0; i < count; i++) {
      const x = g.centre[0] + rnd.uniform(-g.halfM, g.halfM);
      const y = g.centre[1] + rnd.uniform(-g.halfM, g.halfM);
      xs.push(x);
      ys.push(y);
      zs.push(g.g0 + g.gx * x + g.gy * y + spec.noiseM * rnd.normal());
    }
  }
  if (spec.clutter) {
    const { count, min, max } = spec.clutter;
    for (let i = 0; i < count; i++) {
      xs.push(rnd.uniform(min[0], max[0]));
      ys.push(rnd.uniform(min[1], max[1]));
      zs.push(rnd.uniform(min[2], max[2]));
    }
  }
  return createPointCloud(Float64Array.from(xs), Float64Array.from(ys), Float64Array.from(zs));
}

function sampleCylinder(c: TestCylinder, density: number, noise: number, rnd: Random, xs: number[], ys: number[], zs: number[]): void {
  const a: Vec3 = [c.end[0] - c.start[0], c.end[1] - c.start[1], c.end[2] - c.start[2]];
  const len = Math.hypot(a[0], a[1], a[2]);
  const u: Vec3 = [a[0] / len, a[1] / len, a[2] / len];
  const helper: Vec3 = Math.abs(u[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
  const e1 = unit(cross(u, helper));
  const e2 = cross(u, e1);
  const count = Math.max(8, Math.round(density * 2 * Math.PI * c.radiusM * len));
  for (let i = 0; i < count; i++) {
    const t = rnd.uniform(0, len);
    const th = rnd.uniform(0, 2 * Math.PI);
    const r = c.radiusM + noise * rnd.normal();
    const ct = Math.cos(th) * r;
    const st = Math.sin(th) * r;
    xs.push(c.start[0] + u[0] * t + e1[0] * ct + e2[0] * st);
    ys.push(c.start[1] + u[1] * t + e1[1] * ct + e2[1] * st);
    zs.push(c.start[2] + u[2] * t + e1[2] * ct + e2[2] * st);
  }
}

function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function unit(a: Vec3): Vec3 {
  const l = Math.hypot(a[0], a[1], a[2]);
  return [a[0] / l, a[1] / l, a[2] / l];
}

/**
 * A Y-shaped tree standing at `base` (in a projected-like frame): trunk 3 m of radius 0.15 m, then
 * two branches of radius 0.1 m and 2 m length leaning ±35° in x, then on each two twigs of 4 cm radius.
 */
export function yTree(base: Vec3 = [500010, 4000020, 120]): TestCylinder[] {
  const [bx, by, bz] = base;
  const top: Vec3 = [bx, by, bz + 3];
  const lean = (35 * Math.PI) / 180;
  const left: Vec3 = [bx - 2 * Math.sin(lean), by, bz + 3 + 2 * Math.cos(lean)];
  const right: Vec3 = [bx + 2 * Math.sin(lean), by, bz + 3 + 2 * Math.cos(lean)];
  const twig = (from: Vec3, dx: number, dy: number): TestCylinder => ({ start: from, end: [from[0] + dx, from[1] + dy, from[2] + 1.0], radiusM: 0.04 });
  return [
    { start: [bx, by, bz], end: top, radiusM: 0.15 },
    { start: top, end: left, radiusM: 0.1 },
    { start: top, end: right, radiusM: 0.1 },
    twig(left, -0.5, 0.3),
    twig(left, -0.2, -0.6),
    twig(right, 0.5, 0.3),
    twig(right, 0.2, -0.6),
  ];
}
