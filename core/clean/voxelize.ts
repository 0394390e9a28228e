/**
 * Voxel thinning that keeps the link to the original points: each occupied voxel becomes one
 * vertex at the centroid of its points, and `pointVoxel` / (`pointOffsets`, `points`) map both ways.
 */
export interface VoxelGrid {
  count: number;
  /** Centroid of the voxel's points, local frame, m. */
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  /** Points of voxel v: points[pointOffsets[v] .. pointOffsets[v + 1]) (original indices). */
  pointOffsets: Int32Array;
  points: Int32Array;
  /** Per input point its voxel, -1 when the point was not included. */
  pointVoxel: Int32Array;
}

/**
 * Thin points to one centroid per occupied voxel of edge `sizeM`.
 * @param x,y,z local coordinates, m
 * @param include optional per-point mask (points with 0 are skipped)
 */
export function voxelize(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, sizeM: number, include?: Uint8Array): VoxelGrid {
  const n = x.length;
  let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < n; i++) {
    if (include && !include[i]) continue;
    if (x[i] < x0) x0 = x[i];
    if (y[i] < y0) y0 = y[i];
    if (z[i] < z0) z0 = z[i];
    if (x[i] > x1) x1 = x[i];
    if (y[i] > y1) y1 = y[i];
  }
  const nx = Math.floor((x1 - x0) / sizeM) + 1;
  const ny = Math.floor((y1 - y0) / sizeM) + 1;
  const pointVoxel = new Int32Array(n).fill(-1);
  const ids = new Map<number, number>();
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (include && !include[i]) continue;
    const key = Math.floor((x[i] - x0) / sizeM) + nx * (Math.floor((y[i] - y0) / sizeM) + ny * Math.floor((z[i] - z0) / sizeM));
    let v = ids.get(key);
    if (v === undefined) {
      v = count++;
      ids.set(key, v);
    }
    pointVoxel[i] = v;
  }
  const pointOffsets = new Int32Array(count + 1);
  for (let i = 0; i < n; i++) if (pointVoxel[i] >= 0) pointOffsets[pointVoxel[i] + 1]++;
  for (let v = 0; v < count; v++) pointOffsets[v + 1] += pointOffsets[v];
  const fill = pointOffsets.slice(0, count);
  const points = new Int32Array(pointOffsets[count]);
  const vx = new Float64Array(count);
  const vy = new Float64Array(count);
  const vz = new Float64Array(count);
  for (let i = 0; i < n; i++) {
    const v = pointVoxel[i];
    if (v < 0) continue;
    points[fill[v]++] = i;
    vx[v] += x[i];
    vy[v] += y[i];
    vz[v] += z[i];
  }
  for (let v = 0; v < count; v++) {
    const c = pointOffsets[v + 1] - pointOffsets[v];
    vx[v] /= c;
    vy[v] /= c;
    vz[v] /= c;
  }
  return { count, x: vx, y: vy, z: vz, pointOffsets, points, pointVoxel };
}
