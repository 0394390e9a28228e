/**
 * Analytic ray–primitive geometry for the virtual scanner. Rays are o + t·d with |d| = 1, t ≥ 0.
 * Scalar arguments (no Vec3 arrays) because these run once per ray and candidate, millions of times.
 */

/**
 * Nearest intersection of a ray with the lateral surface of a finite open cylinder (no end caps:
 * in a network the ends are joints covered by the neighbouring cylinder; an open tip end is a
 * twig-sized hole). Solves |w⊥ + t d⊥|² = r² (the quadratic of a ray and an infinite circular
 * cylinder, e.g. Pharr, Jakob & Humphreys, Physically Based Rendering, 3rd ed., §3.2) and keeps
 * roots whose axial coordinate lies in [0, L].
 *
 * @param ax,ay,az cylinder axis start, m; @param ux,uy,uz unit axis direction; @param lengthM axis length, m
 * @param radiusM cylinder radius, m; @param tMin smallest accepted t, m
 * @returns t of the nearest hit, m, or Infinity
 */
export function rayCylinder(
  ox: number, oy: number, oz: number,
  dx: number, dy: number, dz: number,
  ax: number, ay: number, az: number,
  ux: number, uy: number, uz: number,
  lengthM: number, radiusM: number, tMin = 0,
): number {
  const wx = ox - ax;
  const wy = oy - ay;
  const wz = oz - az;
  const du = dx * ux + dy * uy + dz * uz;
  const wu = wx * ux + wy * uy + wz * uz;
  const px = dx - du * ux;
  const py = dy - du * uy;
  const pz = dz - du * uz;
  const qx = wx - wu * ux;
  const qy = wy - wu * uy;
  const qz = wz - wu * uz;
  const A = px * px + py * py + pz * pz;
  if (A < 1e-18) return Infinity; // ray parallel to the axis never meets the lateral surface
  const B = px * qx + py * qy + pz * qz; // half of the linear coefficient
  const C = qx * qx + qy * qy + qz * qz - radiusM * radiusM;
  const disc = B * B - A * C;
  if (disc < 0) return Infinity;
  const sq = Math.sqrt(disc);
  // Numerically stable pair of roots (avoid cancellation in -B ± sq).
  const q = B > 0 ? -(B + sq) : -(B - sq);
  let t1 = q / A;
  let t2 = q !== 0 ? C / q : -t1;
  if (t1 > t2) {
    const s = t1;
    t1 = t2;
    t2 = s;
  }
  if (t1 >= tMin) {
    const s = wu + t1 * du;
    if (s >= 0 && s <= lengthM) return t1;
  }
  if (t2 >= tMin) {
    const s = wu + t2 * du;
    if (s >= 0 && s <= lengthM) return t2;
  }
  return Infinity;
}

/**
 * Intersection of a ray with a flat disc (centre c, unit normal n, radius r), both faces.
 * @returns t of the hit, m, or Infinity
 */
export function rayDisc(
  ox: number, oy: number, oz: number,
  dx: number, dy: number, dz: number,
  cx: number, cy: number, cz: number,
  nx: number, ny: number, nz: number,
  radiusM: number, tMin = 0,
): number {
  const dn = dx * nx + dy * ny + dz * nz;
  if (dn > -1e-12 && dn < 1e-12) return Infinity;
  const t = ((cx - ox) * nx + (cy - oy) * ny + (cz - oz) * nz) / dn;
  if (!(t >= tMin)) return Infinity;
  const hx = ox + t * dx - cx;
  const hy = oy + t * dy - cy;
  const hz = oz + t * dz - cz;
  return hx * hx + hy * hy + hz * hz <= radiusM * radiusM ? t : Infinity;
}

/** Scratch output of `rayAxisApproach`: [t along the ray, distance to the axis segment]. */
export const approach = new Float64Array(2);

/**
 * Closest approach between a ray and a cylinder's axis segment a + s·u, s ∈ [0, L]: the point of
 * the infinite-line solution with s clamped to the segment and t ≥ 0 (standard segment–segment
 * distance, e.g. Ericson, Real-Time Collision Detection, §5.1.9). Writes [t, distance] into `approach`.
 */
export function rayAxisApproach(
  ox: number, oy: number, oz: number,
  dx: number, dy: number, dz: number,
  ax: number, ay: number, az: number,
  ux: number, uy: number, uz: number,
  lengthM: number,
): void {
  const wx = ox - ax;
  const wy = oy - ay;
  const wz = oz - az;
  const b = dx * ux + dy * uy + dz * uz;
  const e = dx * wx + dy * wy + dz * wz;
  const f = ux * wx + uy * wy + uz * wz;
  const denom = 1 - b * b;
  let t = denom > 1e-12 ? (b * f - e) / denom : 0;
  if (t < 0) t = 0;
  let s = f + t * b;
  if (s < 0) s = 0;
  else if (s > lengthM) s = lengthM;
  t = s * b - e;
  if (t < 0) t = 0;
  const rx = wx + t * dx - s * ux;
  const ry = wy + t * dy - s * uy;
  const rz = wz + t * dz - s * uz;
  approach[0] = t;
  approach[1] = Math.sqrt(rx * rx + ry * ry + rz * rz);
}

/**
 * Share of a uniform circular beam footprint (radius w) covered by a cylinder seen side-on: the
 * cylinder projects to a strip of half-width r whose centre line lies at distance `distanceM`
 * from the beam centre. Uses the area of a circular segment, F(u) = (u√(1−u²) + asin u)/π + ½
 * for the share of the disc left of u·w.
 */
export function footprintCoverage(distanceM: number, radiusM: number, footprintRadiusM: number): number {
  if (!(footprintRadiusM > 0)) return distanceM < radiusM ? 1 : 0;
  return discShareBelow((distanceM + radiusM) / footprintRadiusM) - discShareBelow((distanceM - radiusM) / footprintRadiusM);
}

function discShareBelow(u: number): number {
  if (u <= -1) return 0;
  if (u >= 1) return 1;
  return (u * Math.sqrt(1 - u * u) + Math.asin(u)) / Math.PI + 0.5;
}
