/**
 * Seeded points on a cylinder surface with known truth (radius, axis, arc, noise, outliers):
 * the analytic cases for the fit tests and the fit bench. Not used by the pipeline.
 */
import { createRandom, type Random } from '../../util/random.js';
import type { Vec3 } from '../../types/network.js';

/** Points on a cylinder surface with known truth, for tests and the fit bench. */
export interface CylinderSample {
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  indices: Int32Array;
  /** True for points drawn as outliers. */
  outlier: Uint8Array;
}

export interface CylinderSpec {
  n: number;
  radiusM: number;
  lengthM: number;
  /** Angular extent of the covered arc, rad (2π = full circle). */
  arcRad: number;
  /** Gaussian radial noise σ, m. */
  noiseM: number;
  /** Fraction of points replaced by outliers spread through the cylinder's bounding shell. */
  outlierFraction?: number;
  axis?: Vec3;
  centre?: Vec3;
  seed?: number;
}

/** Unit vectors e1, e2 orthogonal to unit a. */
export function basis(a: Vec3): [Vec3, Vec3] {
  const t: Vec3 = Math.abs(a[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
  const d = t[0] * a[0] + t[1] * a[1] + t[2] * a[2];
  let e1: Vec3 = [t[0] - d * a[0], t[1] - d * a[1], t[2] - d * a[2]];
  const l = Math.hypot(...e1);
  e1 = [e1[0] / l, e1[1] / l, e1[2] / l];
  const e2: Vec3 = [a[1] * e1[2] - a[2] * e1[1], a[2] * e1[0] - a[0] * e1[2], a[0] * e1[1] - a[1] * e1[0]];
  return [e1, e2];
}

export function unit(a: Vec3): Vec3 {
  const l = Math.hypot(...a);
  return [a[0] / l, a[1] / l, a[2] / l];
}

export function sampleCylinder(spec: CylinderSpec, rnd: Random = createRandom(spec.seed ?? 1)): CylinderSample {
  const { n, radiusM: r, lengthM: L, arcRad, noiseM } = spec;
  const a = unit(spec.axis ?? [0, 0, 1]);
  const c = spec.centre ?? [0, 0, 0];
  const [e1, e2] = basis(a);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const z = new Float64Array(n);
  const outlier = new Uint8Array(n);
  const fo = spec.outlierFraction ?? 0;
  for (let i = 0; i < n; i++) {
    const th = rnd.uniform(0, arcRad);
    const t = rnd.uniform(-L / 2, L / 2);
    let rr = r + noiseM * rnd.normal();
    if (rnd.next() < fo) {
      // outliers: anywhere from deep inside to well outside the surface (leaves, mixed pixels)
      rr = r * rnd.uniform(0, 3);
      outlier[i] = 1;
    }
    const ct = Math.cos(th);
    const st = Math.sin(th);
    x[i] = c[0] + a[0] * t + rr * (ct * e1[0] + st * e2[0]);
    y[i] = c[1] + a[1] * t + rr * (ct * e1[1] + st * e2[1]);
    z[i] = c[2] + a[2] * t + rr * (ct * e1[2] + st * e2[2]);
  }
  return { x, y, z, indices: Int32Array.from({ length: n }, (_, i) => i), outlier };
}

/** Angle between two lines (direction sign ignored), rad. */
export function lineAngle(a: Vec3, b: Vec3): number {
  const ua = unit(a);
  const ub = unit(b);
  const d = Math.abs(ua[0] * ub[0] + ua[1] * ub[1] + ua[2] * ub[2]);
  return Math.acos(Math.min(1, d));
}

/** Distance from point p to the line through c with direction a. */
export function distanceToLine(p: Vec3, c: Vec3, a: Vec3): number {
  const u = unit(a);
  const q: Vec3 = [p[0] - c[0], p[1] - c[1], p[2] - c[2]];
  const t = q[0] * u[0] + q[1] * u[1] + q[2] * u[2];
  return Math.hypot(q[0] - t * u[0], q[1] - t * u[1], q[2] - t * u[2]);
}
