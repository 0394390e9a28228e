/**
 * Bounding volume hierarchy over axis-aligned boxes, the acceleration structure of the virtual
 * scanner. Flat arrays: node k has bounds[6k … 6k+5] = min x,y,z, max x,y,z; an inner node has
 * `count[k] = 0` and children `first[k]` and `first[k] + 1`; a leaf lists `count[k]` primitives
 * starting at `order[first[k]]`. Built top-down by splitting at the median centroid along the
 * widest axis (the simple object-median build, e.g. Pharr, Jakob & Humphreys, PBR 3rd ed., §4.3),
 * with an explicit stack so no depth can overflow the call stack.
 */
export interface Bvh {
  bounds: Float64Array;
  first: Int32Array;
  count: Int32Array;
  order: Int32Array;
  nodeCount: number;
}

const LEAF_SIZE = 4;

/**
 * @param boxes 6 numbers per primitive (min x,y,z, max x,y,z), m
 */
export function buildBvh(boxes: Float64Array): Bvh {
  const n = boxes.length / 6;
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  const maxNodes = Math.max(1, 2 * n); // a binary tree over n leaves-or-fewer has < 2n nodes
  const bounds = new Float64Array(6 * maxNodes);
  const first = new Int32Array(maxNodes);
  const count = new Int32Array(maxNodes);
  const centroid = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) centroid[3 * i + a] = 0.5 * (boxes[6 * i + a] + boxes[6 * i + 3 + a]);
  }
  let nodeCount = 1;
  // Work items: node index, start, end (into `order`).
  const stack: number[] = [0, 0, n];
  while (stack.length > 0) {
    const end = stack.pop()!;
    const start = stack.pop()!;
    const node = stack.pop()!;
    let cminx = Infinity, cminy = Infinity, cminz = Infinity, cmaxx = -Infinity, cmaxy = -Infinity, cmaxz = -Infinity;
    const b = 6 * node;
    bounds[b] = bounds[b + 1] = bounds[b + 2] = Infinity;
    bounds[b + 3] = bounds[b + 4] = bounds[b + 5] = -Infinity;
    for (let k = start; k < end; k++) {
      const p = order[k];
      for (let a = 0; a < 3; a++) {
        if (boxes[6 * p + a] < bounds[b + a]) bounds[b + a] = boxes[6 * p + a];
        if (boxes[6 * p + 3 + a] > bounds[b + 3 + a]) bounds[b + 3 + a] = boxes[6 * p + 3 + a];
      }
      const x = centroid[3 * p], y = centroid[3 * p + 1], z = centroid[3 * p + 2];
      if (x < cminx) cminx = x;
      if (x > cmaxx) cmaxx = x;
      if (y < cminy) cminy = y;
      if (y > cmaxy) cmaxy = y;
      if (z < cminz) cminz = z;
      if (z > cmaxz) cmaxz = z;
    }
    const size = end - start;
    const ex = cmaxx - cminx, ey = cmaxy - cminy, ez = cmaxz - cminz;
    if (size <= LEAF_SIZE || Math.max(ex, ey, ez) <= 0) {
      first[node] = start;
      count[node] = size;
      continue;
    }
    const axis = ex >= ey && ex >= ez ? 0 : ey >= ez ? 1 : 2;
    const mid = start + (size >> 1);
    selectNth(order, start, end, mid, centroid, axis);
    const left = nodeCount;
    nodeCount += 2;
    first[node] = left;
    count[node] = 0;
    stack.push(left, start, mid, left + 1, mid, end);
  }
  return { bounds: bounds.slice(0, 6 * nodeCount), first: first.slice(0, nodeCount), count: count.slice(0, nodeCount), order, nodeCount };
}

/** Quickselect (Hoare partition): order[lo..k) ≤ order[k] ≤ order(k..hi) by centroid along `axis`. */
function selectNth(order: Int32Array, lo: number, hi: number, k: number, centroid: Float64Array, axis: number): void {
  let l = lo;
  let r = hi - 1;
  while (r > l) {
    const pivot = centroid[3 * order[(l + r) >> 1] + axis];
    let i = l;
    let j = r;
    while (i <= j) {
      while (centroid[3 * order[i] + axis] < pivot) i++;
      while (centroid[3 * order[j] + axis] > pivot) j--;
      if (i <= j) {
        const t = order[i];
        order[i] = order[j];
        order[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) r = j;
    else if (k >= i) l = i;
    else return;
  }
}
