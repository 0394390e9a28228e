/**
 * A small orbit camera of our own (z up): the eye circles a target at a distance, with azimuth
 * and elevation angles. Pure math, shared by the WebGL view and the 2D fallback.
 */
export type V3 = [number, number, number];

export interface Orbit {
  target: V3;
  distance: number;
  /** Radians, around z. */
  azimuth: number;
  /** Radians above the horizontal, kept inside (−85°, 85°). */
  elevation: number;
  /** Vertical field of view, degrees. */
  fovDeg: number;
}

const MAX_ELEVATION = (85 * Math.PI) / 180;

/** Frame a box: target its centre, distance so the box's bounding sphere fits the view. */
export function frameBox(min: V3, max: V3, fovDeg = 40): Orbit {
  const target: V3 = [(min[0] + max[0]) / 2, (min[1] + max[1]) / 2, (min[2] + max[2]) / 2];
  const radius = Math.max(1e-3, Math.hypot(max[0] - min[0], max[1] - min[1], max[2] - min[2]) / 2);
  // 0.8 of the bounding-sphere distance: trees are tall and narrow, so the sphere is a loose fit.
  const distance = (radius / Math.sin(((fovDeg / 2) * Math.PI) / 180)) * 0.8;
  return { target, distance, azimuth: -Math.PI / 2.6, elevation: 0.12, fovDeg };
}

export function eyeOf(o: Orbit): V3 {
  const c = Math.cos(o.elevation);
  return [
    o.target[0] + o.distance * c * Math.cos(o.azimuth),
    o.target[1] + o.distance * c * Math.sin(o.azimuth),
    o.target[2] + o.distance * Math.sin(o.elevation),
  ];
}

/** Camera basis: right, up and forward unit vectors. */
export function basisOf(o: Orbit): { right: V3; up: V3; forward: V3 } {
  const e = eyeOf(o);
  const f = normalise([o.target[0] - e[0], o.target[1] - e[1], o.target[2] - e[2]]);
  const right = normalise(cross(f, [0, 0, 1]));
  const up = cross(right, f);
  return { right, up, forward: f };
}

export function rotate(o: Orbit, dxPx: number, dyPx: number): Orbit {
  const elevation = Math.max(-MAX_ELEVATION, Math.min(MAX_ELEVATION, o.elevation + dyPx * 0.008));
  return { ...o, azimuth: o.azimuth - dxPx * 0.008, elevation };
}

/** Move the target in the view plane so the scene follows the pointer. */
export function pan(o: Orbit, dxPx: number, dyPx: number, viewHeightPx: number): Orbit {
  const { right, up } = basisOf(o);
  const perPx = (2 * o.distance * Math.tan(((o.fovDeg / 2) * Math.PI) / 180)) / Math.max(1, viewHeightPx);
  const t: V3 = [...o.target];
  for (let k = 0; k < 3; k++) t[k] += (-dxPx * right[k] + dyPx * up[k]) * perPx;
  return { ...o, target: t };
}

/** Zoom by a factor (> 1 moves away), kept within 1e-3 … 1e5 m. */
export function zoom(o: Orbit, factor: number): Orbit {
  return { ...o, distance: Math.min(1e5, Math.max(1e-3, o.distance * factor)) };
}

function cross(a: V3, b: V3): V3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

function normalise(v: V3): V3 {
  const l = Math.hypot(v[0], v[1], v[2]) || 1;
  return [v[0] / l, v[1] / l, v[2] / l];
}
