/**
 * A flat, implicit kd-tree over typed arrays: no node objects. The points are permuted so that
 * every index range [lo, hi) is a subtree whose median element `mid = (lo + hi) >> 1` is the
 * splitting point; ranges of at most LEAF points are scanned directly. Coordinates are copied in
 * tree order so that a query walks contiguous memory.
 *
 * Hand-written rather than an npm package: the issue measured npm kd-trees far slower on 2 M
 * points, and every stage here needs k-NN, radius and filtered-nearest queries on typed arrays.
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
  for (let i = 0; i < n; i++) index[i] = subset ? subset[i] : i;
  const axis = new Uint8Array(n);
  const coords = [x, y, z];
  const stackLo: number[] = [0];
  const stackHi: number[] = [n];
  while (stackLo.length > 0) {
    const lo = stackLo.pop()!;
    const hi = stackHi.pop()!;
    if (hi - lo <= LEAF) continue;
    // Split along the widest extent of this range: better balanced cells than cycling axes.
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity, z0 = Infinity, z1 = -Infinity;
    for (let k = lo; k < hi; k++) {
      const i = index[k];
      const a = x[i], b = y[i], c = z[i];
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
    select(index, coords[ax], lo, hi - 1, mid);
    axis[mid] = ax;
    stackLo.push(lo, mid + 1);
    stackHi.push(mid, hi);
  }
  const tx = new Float64Array(n);
  const ty = new Float64Array(n);
  const tz = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const i = index[k];
    tx[k] = x[i];
    ty[k] = y[i];
    tz[k] = z[i];
  }
  return { count: n, x: tx, y: ty, z: tz, index, axis };
}

/** Hoare quickselect: reorder index[lo..hi] so that index[k] has the k-th smallest key. */
function select(index: Int32Array, key: ArrayLike<number>, lo: number, hi: number, k: number): void {
  while (hi > lo) {
    const pivot = key[index[(lo + hi) >> 1]];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (key[index[i]] < pivot) i++;
      while (key[index[j]] > pivot) j--;
      if (i <= j) {
        const t = index[i];
        index[i] = index[j];
        index[j] = t;
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
  stackBound: Float64Array;
}

export function createKnnScratch(k: number): KnnScratch {
  return {
    k,
    idx: new Int32Array(k),
    d2: new Float64Array(k),
    stackLo: new Int32Array(STACK),
    stackHi: new Int32Array(STACK),
    stackBound: new Float64Array(STACK),
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
  const { k, idx, d2, stackLo, stackHi, stackBound } = scratch;
  const tx = tree.x, ty = tree.y, tz = tree.z, axis = tree.axis, index = tree.index;
  let found = 0;
  let worst = maxDist === Infinity ? Infinity : maxDist * maxDist;
  let sp = 0;
  stackLo[0] = 0;
  stackHi[0] = tree.count;
  stackBound[0] = 0;
  sp = 1;
  while (sp > 0) {
    sp--;
    let lo = stackLo[sp];
    let hi = stackHi[sp];
    if (stackBound[sp] > worst) continue;
    for (;;) {
      if (hi - lo <= LEAF) {
        for (let p = lo; p < hi; p++) {
          const ex = tx[p] - qx, ey = ty[p] - qy, ez = tz[p] - qz;
          const dd = ex * ex + ey * ey + ez * ez;
          if (dd > worst || (dd === worst && found === k)) continue;
          if (accept && accept[index[p]] === 0) continue;
          found = insert(idx, d2, found, k, index[p], dd);
          if (found === k) worst = d2[k - 1];
        }
        break;
      }
      const mid = (lo + hi) >> 1;
      const ax = axis[mid];
      const ex = tx[mid] - qx, ey = ty[mid] - qy, ez = tz[mid] - qz;
      const dd = ex * ex + ey * ey + ez * ez;
      if (dd <= worst && !(dd === worst && found === k) && !(accept && accept[index[mid]] === 0)) {
        found = insert(idx, d2, found, k, index[mid], dd);
        if (found === k) worst = d2[k - 1];
      }
      const diff = ax === 0 ? -ex : ax === 1 ? -ey : -ez; // q - split
      const bound = diff * diff;
      if (diff < 0) {
        if (bound <= worst) push(mid + 1, hi, bound);
        hi = mid;
      } else {
        if (bound <= worst) push(lo, mid, bound);
        lo = mid + 1;
      }
    }
  }
  return found;

  function push(a: number, b: number, bound: number): void {
    stackLo[sp] = a;
    stackHi[sp] = b;
    stackBound[sp] = bound;
    sp++;
  }
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
