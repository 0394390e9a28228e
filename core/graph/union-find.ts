/** Disjoint sets over 0..n-1 with path halving and union by size (Tarjan 1975). */
export class UnionFind {
  readonly parent: Int32Array;
  private readonly size: Int32Array;

  constructor(n: number) {
    this.parent = new Int32Array(n);
    this.size = new Int32Array(n).fill(1);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }

  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) {
      p[i] = p[p[i]];
      i = p[i];
    }
    return i;
  }

  union(a: number, b: number): void {
    let ra = this.find(a);
    let rb = this.find(b);
    if (ra === rb) return;
    if (this.size[ra] < this.size[rb]) [ra, rb] = [rb, ra];
    this.parent[rb] = ra;
    this.size[ra] += this.size[rb];
  }

  /**
   * Dense labels 0..count-1 per element (in order of first appearance) and the size of each set.
   */
  labels(): { label: Int32Array; count: number; sizes: Int32Array } {
    const n = this.parent.length;
    const label = new Int32Array(n).fill(-1);
    const rootLabel = new Int32Array(n).fill(-1);
    let count = 0;
    for (let i = 0; i < n; i++) {
      const r = this.find(i);
      if (rootLabel[r] < 0) rootLabel[r] = count++;
      label[i] = rootLabel[r];
    }
    const sizes = new Int32Array(count);
    for (let i = 0; i < n; i++) sizes[label[i]]++;
    return { label, count, sizes };
  }
}
