import type { Network, Vec3 } from '../types/network.js';
import type { TriangleMesh } from './ply.js';

/**
 * Colours by centrifugal branching order (trunk 0 brown, then orange, yellow-green, green, teal,
 * blue, violet; orders above 6 reuse violet). Chosen for contrast, no source.
 */
export const ORDER_COLOURS: [number, number, number][] = [
  [120, 72, 36],
  [230, 140, 30],
  [170, 200, 40],
  [60, 170, 70],
  [30, 160, 160],
  [50, 100, 210],
  [140, 70, 200],
];

/**
 * A closed-side triangle mesh of the network's cylinders (no end caps: joints are internal):
 * `sides` vertices around each end, 2 × sides triangles per segment, per-vertex colour by
 * branching order. Positions in the input's own frame, m.
 */
export function cylindersMesh(network: Network, sides = 12): TriangleMesh {
  const segs = network.segments;
  const nv = segs.length * 2 * sides;
  const positions = new Float64Array(nv * 3);
  const colors = new Uint8Array(nv * 3);
  const faces = new Uint32Array(segs.length * sides * 6);
  let v = 0;
  let f = 0;
  for (const s of segs) {
    const a: Vec3 = [s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]];
    const len = Math.hypot(a[0], a[1], a[2]) || 1;
    const u: Vec3 = [a[0] / len, a[1] / len, a[2] / len];
    const h: Vec3 = Math.abs(u[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
    const e1 = unit(cross(u, h));
    const e2 = cross(u, e1);
    const col = ORDER_COLOURS[Math.min(ORDER_COLOURS.length - 1, Math.max(0, s.branchOrder))];
    const base = v;
    for (const p of [s.start, s.end]) {
      for (let k = 0; k < sides; k++) {
        const th = (2 * Math.PI * k) / sides;
        const c = Math.cos(th) * s.radiusM;
        const d = Math.sin(th) * s.radiusM;
        positions[3 * v] = p[0] + e1[0] * c + e2[0] * d;
        positions[3 * v + 1] = p[1] + e1[1] * c + e2[1] * d;
        positions[3 * v + 2] = p[2] + e1[2] * c + e2[2] * d;
        colors[3 * v] = col[0];
        colors[3 * v + 1] = col[1];
        colors[3 * v + 2] = col[2];
        v++;
      }
    }
    for (let k = 0; k < sides; k++) {
      const k1 = (k + 1) % sides;
      const a0 = base + k, a1 = base + k1, b0 = base + sides + k, b1 = base + sides + k1;
      faces[f++] = a0;
      faces[f++] = a1;
      faces[f++] = b1;
      faces[f++] = a0;
      faces[f++] = b1;
      faces[f++] = b0;
    }
  }
  return { positions, colors, faces };
}

function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function unit(a: Vec3): Vec3 {
  const l = Math.hypot(a[0], a[1], a[2]);
  return [a[0] / l, a[1] / l, a[2] / l];
}
