import { XylemapError } from '../util/errors.js';
import type { Network, Segment } from '../types/network.js';

/**
 * The central structure: segments as a rooted tree, indexed by position in `segments`.
 * Traversals use explicit stacks, never recursion, so 100 000 segments cannot overflow the stack.
 */
export class SegmentTree {
  readonly segments: Segment[];
  /** Index of the parent segment, -1 for the root. */
  readonly parent: Int32Array;
  readonly children: number[][];
  readonly root: number;
  /** Depth in segments from the root (root 0). */
  readonly depth: Int32Array;
  /** Indices in pre-order (parents before children). */
  readonly preorder: Int32Array;

  private constructor(segments: Segment[], parent: Int32Array, children: number[][], root: number) {
    this.segments = segments;
    this.parent = parent;
    this.children = children;
    this.root = root;
    const n = segments.length;
    this.depth = new Int32Array(n);
    this.preorder = new Int32Array(n);
    let k = 0;
    const stack = [root];
    while (stack.length > 0) {
      const i = stack.pop()!;
      this.preorder[k++] = i;
      const kids = children[i];
      for (let c = kids.length - 1; c >= 0; c--) {
        this.depth[kids[c]] = this.depth[i] + 1;
        stack.push(kids[c]);
      }
    }
    if (k !== n) {
      throw new XylemapError(`network has ${n - k} segments not connected to the root (cycle)`, {
        stage: 'topology',
        hint: 'check parent_id values for loops',
      });
    }
  }

  /**
   * Build from segments, checking for duplicate ids, missing parents, several roots and cycles.
   * Children keep the order of the input rows.
   */
  static fromNetwork(network: Network | Segment[]): SegmentTree {
    const segments = Array.isArray(network) ? network : network.segments;
    const n = segments.length;
    if (n === 0) {
      throw new XylemapError('network has no segments', { stage: 'topology', hint: 'reconstruct a tree first' });
    }
    const indexOf = new Map<number, number>();
    segments.forEach((s, i) => {
      if (indexOf.has(s.segmentId)) {
        throw new XylemapError(`duplicate segment_id ${s.segmentId}`, { stage: 'topology', hint: 'segment ids must be unique' });
      }
      indexOf.set(s.segmentId, i);
    });
    const parent = new Int32Array(n).fill(-1);
    const children: number[][] = Array.from({ length: n }, () => []);
    let root = -1;
    for (let i = 0; i < n; i++) {
      const pid = segments[i].parentId;
      if (pid < 0) {
        if (root >= 0) {
          throw new XylemapError(`several roots: segments ${segments[root].segmentId} and ${segments[i].segmentId} have no parent`, {
            stage: 'topology',
            hint: 'a network must have exactly one segment with parent_id -1',
          });
        }
        root = i;
        continue;
      }
      const p = indexOf.get(pid);
      if (p === undefined) {
        throw new XylemapError(`segment ${segments[i].segmentId} names missing parent ${pid}`, {
          stage: 'topology',
          hint: 'every parent_id must be a segment_id or -1',
        });
      }
      parent[i] = p;
      children[p].push(i);
    }
    if (root < 0) {
      throw new XylemapError('no root: every segment has a parent (cycle)', {
        stage: 'topology',
        hint: 'the stem-base segment must have parent_id -1',
      });
    }
    return new SegmentTree(segments, parent, children, root);
  }

  get size(): number {
    return this.segments.length;
  }

  isTip(i: number): boolean {
    return this.children[i].length === 0;
  }

  /** Visit parents before children. */
  eachBefore(visit: (i: number) => void): void {
    for (let k = 0; k < this.preorder.length; k++) visit(this.preorder[k]);
  }

  /** Visit children before parents. */
  eachAfter(visit: (i: number) => void): void {
    for (let k = this.preorder.length - 1; k >= 0; k--) visit(this.preorder[k]);
  }

  /** Subtree sums of a per-segment value (value of the segment plus all below it). */
  sum(value: (i: number) => number): Float64Array {
    const out = new Float64Array(this.size);
    this.eachAfter((i) => {
      let s = value(i);
      for (const c of this.children[i]) s += out[c];
      out[i] = s;
    });
    return out;
  }

  /** Indices from segment i up to the root, i first. */
  pathToRoot(i: number): number[] {
    const path: number[] = [];
    for (let j = i; j >= 0; j = this.parent[j]) path.push(j);
    return path;
  }
}
