import { basisOf, eyeOf, type Orbit } from './orbit.js';
import type { ViewGeometry } from './view.js';

/**
 * The segment under a screen point: project every segment with the orbit camera (the same
 * perspective as the views), keep those whose screen line passes within `tolerancePx` of the
 * point (widened by their drawn half-width), and return the nearest to the eye; -1 when none.
 * Pure, so both the WebGL view and the 2D fallback share it.
 */
export function pickSegment(
  g: ViewGeometry,
  o: Orbit,
  width: number,
  height: number,
  px: number,
  py: number,
  tolerancePx = 5,
): number {
  const eye = eyeOf(o);
  const { right, up, forward } = basisOf(o);
  const focal = height / 2 / Math.tan(((o.fovDeg / 2) * Math.PI) / 180);
  const near = o.distance / 1000;
  let best = -1;
  let bestDepth = Infinity;
  const proj = (p: Float32Array, i: number): [number, number, number] | null => {
    const x = p[3 * i] - eye[0];
    const y = p[3 * i + 1] - eye[1];
    const z = p[3 * i + 2] - eye[2];
    const zc = x * forward[0] + y * forward[1] + z * forward[2];
    if (zc < near) return null;
    return [width / 2 + ((x * right[0] + y * right[1] + z * right[2]) / zc) * focal, height / 2 - ((x * up[0] + y * up[1] + z * up[2]) / zc) * focal, zc];
  };
  for (let i = 0; i < g.count; i++) {
    const a = proj(g.start, i);
    const b = proj(g.end, i);
    if (!a || !b) continue;
    const dx = b[0] - a[0];
    const dy = b[1] - a[1];
    const l2 = dx * dx + dy * dy;
    const t = l2 > 0 ? Math.max(0, Math.min(1, ((px - a[0]) * dx + (py - a[1]) * dy) / l2)) : 0;
    const d = Math.hypot(a[0] + t * dx - px, a[1] + t * dy - py);
    const depth = a[2] + t * (b[2] - a[2]);
    const halfWidth = (g.radius[i] * focal) / depth;
    if (d <= tolerancePx + halfWidth && depth < bestDepth) {
      best = i;
      bestDepth = depth;
    }
  }
  return best;
}
