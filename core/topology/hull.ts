/**
 * Planar convex hull (Andrew's monotone chain, Andrew 1979, Inf. Proc. Letters 9:216), used for
 * crown spread and projected crown area. Returns hull vertices counter-clockwise as [x, y] pairs,
 * collinear points dropped.
 */
export function convexHull2d(x: ArrayLike<number>, y: ArrayLike<number>): [number, number][] {
  const n = x.length;
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => x[a] - x[b] || y[a] - y[b]);
  const pts: [number, number][] = idx.map((i) => [x[i], y[i]]);
  if (n < 3) return pts;
  const cross = (o: [number, number], a: [number, number], b: [number, number]): number =>
    (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
  const lower: [number, number][] = [];
  for (const p of pts) {
    while (lower.length >= 2 && cross(lower[lower.length - 2], lower[lower.length - 1], p) <= 0) lower.pop();
    lower.push(p);
  }
  const upper: [number, number][] = [];
  for (let k = pts.length - 1; k >= 0; k--) {
    const p = pts[k];
    while (upper.length >= 2 && cross(upper[upper.length - 2], upper[upper.length - 1], p) <= 0) upper.pop();
    upper.push(p);
  }
  lower.pop();
  upper.pop();
  return lower.concat(upper);
}

/** Area of a simple polygon (shoelace formula), m². */
export function hullArea(hull: [number, number][]): number {
  let a = 0;
  for (let i = 0; i < hull.length; i++) {
    const p = hull[i];
    const q = hull[(i + 1) % hull.length];
    a += p[0] * q[1] - q[0] * p[1];
  }
  return Math.abs(a) / 2;
}

/** Largest distance between two hull vertices (all pairs; hulls of crowns have few vertices). */
export function hullDiameter(hull: [number, number][]): number {
  let best = 0;
  for (let i = 0; i < hull.length; i++) {
    for (let j = i + 1; j < hull.length; j++) {
      best = Math.max(best, Math.hypot(hull[i][0] - hull[j][0], hull[i][1] - hull[j][1]));
    }
  }
  return best;
}
