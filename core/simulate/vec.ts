import type { Vec3 } from '../types/network.js';

/** Small 3-vector helpers for the generator (not used in the per-ray hot loop). */
export const add = (a: Vec3, b: Vec3): Vec3 => [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
export const scale = (a: Vec3, s: number): Vec3 => [a[0] * s, a[1] * s, a[2] * s];
export const dot = (a: Vec3, b: Vec3): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
export const cross = (a: Vec3, b: Vec3): Vec3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
export const norm = (a: Vec3): number => Math.hypot(a[0], a[1], a[2]);
export function normalize(a: Vec3): Vec3 {
  const n = norm(a);
  return n > 0 ? [a[0] / n, a[1] / n, a[2] / n] : [0, 0, 1];
}

/** Rotate v about the unit axis k by angle θ (rad), Rodrigues' rotation formula. */
export function rotate(v: Vec3, k: Vec3, theta: number): Vec3 {
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const kv = cross(k, v);
  const kd = dot(k, v) * (1 - c);
  return [v[0] * c + kv[0] * s + k[0] * kd, v[1] * c + kv[1] * s + k[1] * kd, v[2] * c + kv[2] * s + k[2] * kd];
}

/**
 * Two unit vectors (u, w) completing d to a right-handed frame. u is horizontal when d is not
 * vertical, so azimuths measured in this frame are comparable along an axis.
 */
export function frame(d: Vec3): [Vec3, Vec3] {
  const ref: Vec3 = Math.abs(d[2]) < 0.999 ? [0, 0, 1] : [1, 0, 0];
  const u = normalize(cross(ref, d));
  return [u, cross(d, u)];
}

/** Direction at angle θ (rad) from d, at azimuth φ (rad) in d's frame. */
export function coneDirection(d: Vec3, theta: number, phi: number): Vec3 {
  const [u, w] = frame(d);
  const st = Math.sin(theta);
  const ct = Math.cos(theta);
  const cp = Math.cos(phi);
  const sp = Math.sin(phi);
  return normalize([
    d[0] * ct + st * (u[0] * cp + w[0] * sp),
    d[1] * ct + st * (u[1] * cp + w[1] * sp),
    d[2] * ct + st * (u[2] * cp + w[2] * sp),
  ]);
}

export const DEG = Math.PI / 180;
