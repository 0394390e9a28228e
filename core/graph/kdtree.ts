/**
 * A flat, implicit kd-tree over typed arrays: no node objects. The points are permuted so that
 * every index range [lo, hi) is a subtree whose median element `mid = (lo + hi) >> 1` is the
 * splitting point; ranges of at most LEAF points are scanned directly. Coordinates are copied in
 * tree order so that a query walks contiguous memory.
 *
 * Hand-written rather than an npm package: the issue measured npm kd-trees far slower on 2 M
 * points, and every stage here needs k-NN, radius and filtered-nearest queries on typed arrays.
 *
 * Measured reason for the hot loops (bench/reconstruct.ts --knn-only --knn-repeat=3, 2 M-point bench
 * cloud, k = 16, one thread, 2 runs × 3 rounds on 2 Dec 2026, side by side in the same run with
 * scipy.spatial.cKDTree workers = 1 at 6.96–8.36 s): build 0.73–0.83 s + `knnAllPoints` (queries in
 * tree order) 4.63–5.92 s = 5.40–6.74 s, 1.20–1.41× faster than scipy; through `allKnn` (queries in
 * input order) 5.69–7.63 s, 1.10–1.36× faster. What paid: selecting on the tree-order coordinate copies
 * (contiguous swaps instead of gathers through the index; build 1.0 → 0.8 s), no closure in the
 * query loop (`sp` had lived in a heap context), pruning by the distance to the cell rather than to
 * the last plane, and querying in tree order. Tried and not kept (no gain beyond the noise of this
 * shared 2-core machine): leaves of 12/16/24 points, a max-heap instead of the sorted array for
 * k = 16, child cells derived from the parent instead of rescanning the bounds.
 */
const LEAF = 8;
const STACK = 256;

export interface KdTree {
  readonly count: number;
  /** Coordinates in tree order. */
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  /** Tree position → original point index. */
  readonly index: Int32Array;
  /** Split axis (0, 1, 2) of the node whose median sits at this tree position. */
  readonly axis: Uint8Array;
}

/**
 * Build a kd-tree over the points (or the subset `subset` of them).
 * @param x,y,z coordinates, m (any frame)
 * @param subset optional original indices to include (default all)
 */
export function buildKdTree(x: ArrayLike<number>, y: ArrayLike<number>, z: ArrayLike<number>, subset?: ArrayLike<number>): KdTree {
  const n = subset ? subset.length : x.length;
  const index = new Int32Array(n);
  const tx = new Float64Array(n);
  const ty = new Float64Array(n);
  const tz = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const i = subset ? subset[k] : k;
    index[k] = i;
    tx[k] = x[i];
    ty[k] = y[i];
    tz[k] = z[i];
  }
  const axis = new Uint8Array(n);
  const stackLo = new Int32Array(STACK);
  const stackHi = new Int32Array(STACK);
  let sp = 0;
  stackLo[0] = 0;
  stackHi[0] = n;
  sp = 1;
  while (sp > 0) {
    sp--;
    const lo = stackLo[sp];
    const hi = stackHi[sp];
    if (hi - lo <= LEAF) continue;
    // Split along the widest extent of this range: better balanced cells than cycling axes.
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity, z0 = Infinity, z1 = -Infinity;
    for (let k = lo; k < hi; k++) {
      const a = tx[k], b = ty[k], c = tz[k];
      if (a < x0) x0 = a;
      if (a > x1) x1 = a;
      if (b < y0) y0 = b;
      if (b > y1) y1 = b;
      if (c < z0) z0 = c;
      if (c > z1) z1 = c;
    }
    const dx = x1 - x0, dy = y1 - y0, dz = z1 - z0;
    const ax = dx >= dy && dx >= dz ? 0 : dy >= dz ? 1 : 2;
    const mid = (lo + hi) >> 1;
    select(ax === 0 ? tx : ax === 1 ? ty : tz, tx, ty, tz, index, lo, hi - 1, mid);
    axis[mid] = ax;
    stackLo[sp] = lo;
    stackHi[sp] = mid;
    sp++;
    stackLo[sp] = mid + 1;
    stackHi[sp] = hi;
    sp++;
  }
  return { count: n, x: tx, y: ty, z: tz, index, axis };
}

/**
 * Hoare quickselect on the key array, moving the coordinates and indices along, so that
 * position k holds the k-th smallest key of [lo, hi] (contiguous access instead of gathers).
 */
function select(key: Float64Array, tx: Float64Array, ty: Float64Array, tz: Float64Array, index: Int32Array, lo: number, hi: number, k: number): void {
  while (hi > lo) {
    const pivot = key[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (key[i] < pivot) i++;
      while (key[j] > pivot) j--;
      if (i <= j) {
        let t = tx[i];
        tx[i] = tx[j];
        tx[j] = t;
        t = ty[i];
        ty[i] = ty[j];
        ty[j] = t;
        t = tz[i];
        tz[i] = tz[j];
        tz[j] = t;
        const u = index[i];
        index[i] = index[j];
        index[j] = u;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/** Reusable buffers for queries, so that millions of queries allocate nothing. */
export interface KnnScratch {
  k: number;
  /** Original indices of the neighbours found, nearest first. */
  idx: Int32Array;
  /** Squared distances, ascending. */
  d2: Float64Array;
  stackLo: Int32Array;
  stackHi: Int32Array;
  /** Per stack entry: squared distance to the cell, then its x, y, z offsets (4 numbers). */
  stackBound: Float64Array;
}

/** Buffers for queries of up to `k` neighbours (create once per loop, not per query). */
export function createKnnScratch(k: number): KnnScratch {
  return {
    k,
    idx: new Int32Array(k),
    d2: new Float64Array(k),
    stackLo: new Int32Array(STACK),
    stackHi: new Int32Array(STACK),
    stackBound: new Float64Array(4 * STACK),
  };
}

/**
 * The k nearest points to (qx, qy, qz), optionally only within `maxDist` m, optionally only points
 * whose original index passes `accept[i] !== 0`. Results in `scratch.idx` / `scratch.d2`.
 * @returns number of neighbours found (≤ k)
 */
export function knn(
  tree: KdTree,
  qx: number,
  qy: number,
  qz: number,
  scratch: KnnScratch,
  maxDist = Infinity,
  accept?: Uint8Array,
): number {
  return search(tree, qx, qy, qz, scratch, maxDist, accept, -1);
}

/**
 * The search behind `knn`; `skip` is a tree position never reported (the query point itself).
 * Pruning uses the squared distance from the query to the cell (its per-axis offsets ride on the
 * stack and change only along the axis of the plane crossed), not just to the last plane.
 */
function search(
  tree: KdTree,
  qx: number,
  qy: number,
  qz: number,
  scratch: KnnScratch,
  maxDist: number,
  accept: Uint8Array | undefined,
  skip: number,
): number {
  const k = scratch.k, idx = scratch.idx, d2 = scratch.d2, stackLo = scratch.stackLo, stackHi = scratch.stackHi, st = scratch.stackBound;
  const tx = tree.x, ty = tree.y, tz = tree.z, axis = tree.axis, index = tree.index;
  let found = 0;
  if (!(k > 0) || tree.count === 0) return 0;
  let worst = maxDist === Infinity ? Infinity : maxDist * maxDist;
  stackLo[0] = 0;
  stackHi[0] = tree.count;
  st[0] = 0;
  st[1] = 0;
  st[2] = 0;
  st[3] = 0;
  let sp = 1;
  while (sp > 0) {
    sp--;
    const s4 = 4 * sp;
    if (st[s4] > worst) continue;
    const ox = st[s4 + 1], oy = st[s4 + 2], oz = st[s4 + 3];
    let lo = stackLo[sp];
    let hi = stackHi[sp];
    for (;;) {
      if (hi - lo <= LEAF) {
        for (let p = lo; p < hi; p++) {
          const ex = tx[p] - qx, ey = ty[p] - qy, ez = tz[p] - qz;
          const dd = ex * ex + ey * ey + ez * ez;
          if (dd < worst || (dd === worst && found < k)) {
            if (p === skip || (accept !== undefined && accept[index[p]] === 0)) continue;
            found = insert(idx, d2, found, k, index[p], dd);
            if (found === k) worst = d2[k - 1];
          }
        }
        break;
      }
      const mid = (lo + hi) >> 1;
      const ax = axis[mid];
      const ex = qx - tx[mid], ey = qy - ty[mid], ez = qz - tz[mid];
      const dd = ex * ex + ey * ey + ez * ez;
      if ((dd < worst || (dd === worst && found < k)) && mid !== skip && !(accept !== undefined && accept[index[mid]] === 0)) {
        found = insert(idx, d2, found, k, index[mid], dd);
        if (found === k) worst = d2[k - 1];
      }
      // Far child: the cell offset along `ax` becomes the distance to this plane.
      // Recomputed rather than updated (rd - old² + new²) so that rounding can never make the
      // bound exceed the computed distance of a point in the cell (each term is monotone).
      let fx = ox, fy = oy, fz = oz, diff: number;
      if (ax === 0) diff = fx = ex;
      else if (ax === 1) diff = fy = ey;
      else diff = fz = ez;
      const far = fx * fx + fy * fy + fz * fz;
      if (far <= worst) {
        const f4 = 4 * sp;
        if (diff < 0) {
          stackLo[sp] = mid + 1;
          stackHi[sp] = hi;
        } else {
          stackLo[sp] = lo;
          stackHi[sp] = mid;
        }
        st[f4] = far;
        st[f4 + 1] = fx;
        st[f4 + 2] = fy;
        st[f4 + 3] = fz;
        sp++;
      }
      if (diff < 0) hi = mid;
      else lo = mid + 1;
    }
  }
  return found;
}

/** Insert (i, dd) into the sorted arrays of length `found` (capacity k); returns the new length. */
function insert(idx: Int32Array, d2: Float64Array, found: number, k: number, i: number, dd: number): number {
  let p = found < k ? found : k - 1;
  while (p > 0 && d2[p - 1] > dd) {
    d2[p] = d2[p - 1];
    idx[p] = idx[p - 1];
    p--;
  }
  d2[p] = dd;
  idx[p] = i;
  return found < k ? found + 1 : k;
}

/**
 * The k nearest neighbours of every point of the tree (the point itself excluded), as flat arrays
 * with row = original index: entries `[i * k, i * k + k)` belong to point i (index -1 / distance
 * Infinity where fewer than k were found within `maxDist`). Rows of indices not in the tree stay
 * empty. Queries run in tree order, so consecutive queries reuse the same cells in cache.
 * @param maxDist neighbours farther than this (m) are not reported
 */
export function knnAllPoints(tree: KdTree, k: number, maxDist = Infinity): { idx: Int32Array; dist: Float32Array } {
  const n = tree.count, index = tree.index;
  let rows = 0;
  for (let p = 0; p < n; p++) if (index[p] >= rows) rows = index[p] + 1;
  const idx = new Int32Array(rows * k).fill(-1);
  const dist = new Float32Array(rows * k).fill(Infinity);
  if (!(k > 0)) return { idx, dist };
  const scratch = createKnnScratch(k);
  const tx = tree.x, ty = tree.y, tz = tree.z;
  for (let p = 0; p < n; p++) {
    const found = search(tree, tx[p], ty[p], tz[p], scratch, maxDist, undefined, p);
    const o = index[p] * k;
    for (let f = 0; f < found; f++) {
      idx[o + f] = scratch.idx[f];
      dist[o + f] = Math.sqrt(scratch.d2[f]);
    }
  }
  return { idx, dist };
}

/**
 * Visit every point within `radius` m of (qx, qy, qz) (unordered).
 * @param visit called with the original index and the squared distance
 */
export function radiusSearch(
  tree: KdTree,
  qx: number,
  qy: number,
  qz: number,
  radius: number,
  visit: (i: number, d2: number) => void,
  scratch: KnnScratch,
): void {
  const { stackLo, stackHi } = scratch;
  const tx = tree.x, ty = tree.y, tz = tree.z, axis = tree.axis, index = tree.index;
  const r2 = radius * radius;
  let sp = 0;
  stackLo[sp] = 0;
  stackHi[sp] = tree.count;
  sp++;
  while (sp > 0) {
    sp--;
    let lo = stackLo[sp];
    let hi = stackHi[sp];
    for (;;) {
      if (hi - lo <= LEAF) {
        for (let p = lo; p < hi; p++) {
          const ex = tx[p] - qx, ey = ty[p] - qy, ez = tz[p] - qz;
          const dd = ex * ex + ey * ey + ez * ez;
          if (dd <= r2) visit(index[p], dd);
        }
        break;
      }
      const mid = (lo + hi) >> 1;
      const ax = axis[mid];
      const ex = tx[mid] - qx, ey = ty[mid] - qy, ez = tz[mid] - qz;
      const dd = ex * ex + ey * ey + ez * ez;
      if (dd <= r2) visit(index[mid], dd);
      const diff = ax === 0 ? -ex : ax === 1 ? -ey : -ez;
      if (diff < 0) {
        if (diff * diff <= r2) {
          stackLo[sp] = mid + 1;
          stackHi[sp] = hi;
          sp++;
        }
        hi = mid;
      } else {
        if (diff * diff <= r2) {
          stackLo[sp] = lo;
          stackHi[sp] = mid;
          sp++;
        }
        lo = mid + 1;
      }
    }
  }
}
