import { createRandom } from '../util/random.js';

/**
 * Ground surface as a grid of heights. Each cell's candidate is a low value of the points in it;
 * a robust plane through the candidates (iteratively re-fitted on the cells within a tolerance)
 * rejects cells that see no ground — under a dense crown the lowest point is a branch — and cells
 * whose low value is a few stray points below the ground. Rejected or empty cells take the plane.
 * Heights between cell centres are interpolated bilinearly. Works on sloped ground; the stem base
 * need not be at the origin or at the lowest point of the file.
 */
export interface GroundModel {
  /** Ground height (local frame, m) at (x, y). */
  heightAt(x: number, y: number): number;
  /** Plane z = a + b x + c y fitted to the accepted cells. */
  plane: [number, number, number];
  /** Fraction of occupied cells accepted as seeing ground. */
  acceptedFraction: number;
}

/** Tolerance of a cell's low value around the robust plane, m (common practice, no source). */
const PLANE_TOLERANCE_M = 0.35;
/** Fewest points for a cell to describe a surface (common practice, no source). */
const MIN_CELL_POINTS = 5;

/**
 * @param x,y,z local coordinates, m
 * @param include optional mask of points to use
 * @param cellM cell edge, m
 */
export function estimateGround(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, cellM: number, include?: Uint8Array): GroundModel {
  const n = x.length;
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < n; i++) {
    if (include && !include[i]) continue;
    if (x[i] < x0) x0 = x[i];
    if (x[i] > x1) x1 = x[i];
    if (y[i] < y0) y0 = y[i];
    if (y[i] > y1) y1 = y[i];
  }
  const nx = Math.max(1, Math.floor((x1 - x0) / cellM) + 1);
  const ny = Math.max(1, Math.floor((y1 - y0) / cellM) + 1);
  const cells = nx * ny;
  // The 3rd-lowest z of a cell: robust to one or two stray low points, cheap to keep.
  const low = new Float64Array(cells * 3).fill(Infinity);
  const cellCount = new Int32Array(cells);
  for (let i = 0; i < n; i++) {
    if (include && !include[i]) continue;
    const c = cellOf(x[i], y[i]);
    cellCount[c]++;
    const o = c * 3;
    const v = z[i];
    if (v < low[o + 2]) {
      if (v < low[o + 1]) {
        low[o + 2] = low[o + 1];
        if (v < low[o]) {
          low[o + 1] = low[o];
          low[o] = v;
        } else low[o + 1] = v;
      } else low[o + 2] = v;
    }
  }
  // Cells with fewer than MIN_CELL_POINTS points hold strays (mixed pixels, clutter), not a surface.
  const cand = new Float64Array(cells).fill(NaN);
  for (let c = 0; c < cells; c++) if (cellCount[c] >= MIN_CELL_POINTS) cand[c] = low[c * 3 + 2];
  const cx = (c: number): number => x0 + ((c % nx) + 0.5) * cellM;
  const cy = (c: number): number => y0 + (Math.floor(c / nx) + 0.5) * cellM;

  // Robust plane: RANSAC over the cell candidates (Fischler & Bolles 1981), preferring the plane
  // with most cells within 0.15 m and, on ties, the lower one (ground lies under everything else);
  // then least squares on the cells within the tolerance.
  let plane: [number, number, number] = [0, 0, 0];
  const occupiedCells: number[] = [];
  for (let c = 0; c < cells; c++) if (Number.isFinite(cand[c])) occupiedCells.push(c);
  if (occupiedCells.length === 0) return { heightAt: () => 0, plane, acceptedFraction: 0 };
  const sorted = occupiedCells.map((c) => cand[c]).sort((a, b) => a - b);
  plane = [sorted[Math.floor(0.01 * (sorted.length - 1))], 0, 0];
  let bestScore = scorePlane(plane);
  const random = createRandom(1);
  const m = occupiedCells.length;
  for (let t = 0; t < 300 && m >= 3; t++) {
    const a = occupiedCells[random.int(m)], b = occupiedCells[random.int(m)], c = occupiedCells[random.int(m)];
    const p = planeThrough(cx(a), cy(a), cand[a], cx(b), cy(b), cand[b], cx(c), cy(c), cand[c]);
    if (!p || Math.hypot(p[1], p[2]) > 1) continue; // steeper than 45°: not ground
    const s = scorePlane(p);
    if (s.score > bestScore.score || (s.score === bestScore.score && s.meanZ < bestScore.meanZ)) {
      bestScore = s;
      plane = p;
    }
  }
  for (let iter = 0; iter < 3; iter++) {
    const accept = new Uint8Array(cells);
    for (const c of occupiedCells) if (Math.abs(cand[c] - (plane[0] + plane[1] * cx(c) + plane[2] * cy(c))) <= PLANE_TOLERANCE_M) accept[c] = 1;
    const fitted = fitPlane(cand, accept, cx, cy);
    if (!fitted) break;
    plane = fitted;
  }

  // Cells well below a candidate plane count heavily against it: nothing stands under the ground,
  // so a plane through the lower edge of a crown (with the stem base below it) loses.
  function scorePlane(p: [number, number, number]): { score: number; meanZ: number } {
    let score = 0;
    let sz = 0;
    for (const c of occupiedCells) {
      const pz = p[0] + p[1] * cx(c) + p[2] * cy(c);
      const r = cand[c] - pz;
      if (Math.abs(r) <= 0.15) score++;
      else if (r < -PLANE_TOLERANCE_M) score -= 10;
      sz += pz;
    }
    return { score, meanZ: sz / occupiedCells.length };
  }
  // Second pass: the low value of each cell relative to the plane, so that on a slope the cell's
  // downhill corner does not pull the ground down by half the slope × cell size.
  const lowR = new Float64Array(cells * 3).fill(Infinity);
  for (let i = 0; i < n; i++) {
    if (include && !include[i]) continue;
    const o = cellOf(x[i], y[i]) * 3;
    const v = z[i] - (plane[0] + plane[1] * x[i] + plane[2] * y[i]);
    if (v < lowR[o + 2]) {
      if (v < lowR[o + 1]) {
        lowR[o + 2] = lowR[o + 1];
        if (v < lowR[o]) {
          lowR[o + 1] = lowR[o];
          lowR[o] = v;
        } else lowR[o + 1] = v;
      } else lowR[o + 2] = v;
    }
  }
  const cellLow = (c: number): number => (cellCount[c] >= MIN_CELL_POINTS ? lowR[c * 3 + 2] : Infinity);
  // The first plane went through cell minima, which sit low on a slope: lift it by the median
  // detrended low value of the ground cells.
  const lows: number[] = [];
  for (let c = 0; c < cells; c++) {
    const r = cellLow(c);
    if (r < Infinity && Math.abs(r) <= PLANE_TOLERANCE_M) lows.push(r);
  }
  lows.sort((a, b) => a - b);
  const lift = lows.length > 0 ? lows[lows.length >> 1] : 0;
  plane = [plane[0] + lift, plane[1], plane[2]];
  let accepted = 0;
  let occupied = 0;
  const grid = new Float64Array(cells);
  for (let c = 0; c < cells; c++) {
    const r = cellLow(c) - lift;
    const p = plane[0] + plane[1] * cx(c) + plane[2] * cy(c);
    if (r < Infinity) occupied++;
    const ok = r < Infinity && Math.abs(r) <= PLANE_TOLERANCE_M;
    if (ok) accepted++;
    grid[c] = ok ? p + r : p;
  }

  return {
    plane,
    acceptedFraction: occupied > 0 ? accepted / occupied : 0,
    heightAt(px: number, py: number): number {
      const fx = Math.min(nx - 1, Math.max(0, (px - x0) / cellM - 0.5));
      const fy = Math.min(ny - 1, Math.max(0, (py - y0) / cellM - 0.5));
      const ix = Math.min(nx - 2, Math.floor(fx));
      const iy = Math.min(ny - 2, Math.floor(fy));
      if (ix < 0 || iy < 0) {
        // A single row or column of cells.
        return grid[Math.round(fx) + nx * Math.round(fy)];
      }
      const tx = fx - ix;
      const ty = fy - iy;
      const g00 = grid[ix + nx * iy];
      const g10 = grid[ix + 1 + nx * iy];
      const g01 = grid[ix + nx * (iy + 1)];
      const g11 = grid[ix + 1 + nx * (iy + 1)];
      return (1 - ty) * ((1 - tx) * g00 + tx * g10) + ty * ((1 - tx) * g01 + tx * g11);
    },
  };

  function cellOf(px: number, py: number): number {
    const ix = Math.min(nx - 1, Math.max(0, Math.floor((px - x0) / cellM)));
    const iy = Math.min(ny - 1, Math.max(0, Math.floor((py - y0) / cellM)));
    return ix + nx * iy;
  }
}

/** Least-squares plane z = a + b x + c y through the accepted cells (centred normal equations). */
function fitPlane(
  cand: Float64Array,
  accept: Uint8Array,
  cx: (c: number) => number,
  cy: (c: number) => number,
): [number, number, number] | null {
  let n = 0, mx = 0, my = 0, mz = 0;
  for (let c = 0; c < cand.length; c++) {
    if (!accept[c]) continue;
    n++;
    mx += cx(c);
    my += cy(c);
    mz += cand[c];
  }
  if (n < 1) return null;
  mx /= n;
  my /= n;
  mz /= n;
  let sxx = 0, sxy = 0, syy = 0, sxz = 0, syz = 0;
  for (let c = 0; c < cand.length; c++) {
    if (!accept[c]) continue;
    const dx = cx(c) - mx, dy = cy(c) - my, dz = cand[c] - mz;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
    sxz += dx * dz;
    syz += dy * dz;
  }
  const det = sxx * syy - sxy * sxy;
  let b = 0, c = 0;
  // A tilt is only trusted when the ground cells span some area (std ≥ 0.5 m both ways); a few
  // cells around a stem base give a horizontal plane.
  if (n >= 6 && sxx / n >= 0.25 && syy / n >= 0.25 && det > 1e-12 * (sxx + syy) ** 2) {
    b = (sxz * syy - syz * sxy) / det;
    c = (syz * sxx - sxz * sxy) / det;
  }
  return [mz - b * mx - c * my, b, c];
}

function planeThrough(
  ax: number, ay: number, az: number,
  bx: number, by: number, bz: number,
  cx: number, cy: number, cz: number,
): [number, number, number] | null {
  const ux = bx - ax, uy = by - ay, uz = bz - az;
  const vx = cx - ax, vy = cy - ay, vz = cz - az;
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  if (!(Math.abs(nz) > 1e-12)) return null;
  const b = -nx / nz;
  const c = -ny / nz;
  return [az - b * ax - c * ay, b, c];
}
