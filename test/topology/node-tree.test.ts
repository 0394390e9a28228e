import { describe, expect, it } from 'vitest';
import { SegmentTree } from '../../core/topology/node-tree.js';
import { XylemapError } from '../../core/util/errors.js';
import { seg, smallTree } from './fixtures.js';

// The error rules are the project's own contract for a network (core/topology/node-tree.ts docs):
// unique ids, one root, every parent present, no cycles.
describe('SegmentTree.fromNetwork', () => {
  it('builds parent, children and depth for a valid network', () => {
    const t = SegmentTree.fromNetwork(smallTree());
    expect(t.root).toBe(0);
    expect(Array.from(t.parent)).toEqual([-1, 0, 1, 1, 2, 2, 5, 3, 3]);
    expect(Array.from(t.depth)).toEqual([0, 1, 2, 2, 3, 3, 4, 3, 3]);
  });

  it('rejects duplicate segment ids', () => {
    const s = smallTree();
    s[4].segmentId = 3;
    expect(() => SegmentTree.fromNetwork(s)).toThrow(/duplicate segment_id 3/);
  });

  it('rejects a parent id that names no segment', () => {
    const s = smallTree();
    s[4].parentId = 99;
    expect(() => SegmentTree.fromNetwork(s)).toThrow(/missing parent 99/);
  });

  it('rejects several roots', () => {
    const s = smallTree();
    s[3].parentId = -1;
    expect(() => SegmentTree.fromNetwork(s)).toThrow(XylemapError);
    expect(() => SegmentTree.fromNetwork(s)).toThrow(/several roots/);
  });

  it('rejects a cycle detached from the root', () => {
    const s = [seg(0, -1, [0, 0, 0], [0, 0, 1], 0.1), seg(1, 2, [0, 0, 1], [0, 0, 2], 0.1), seg(2, 1, [0, 0, 2], [0, 0, 3], 0.1)];
    expect(() => SegmentTree.fromNetwork(s)).toThrow(/not connected to the root/);
  });

  it('rejects a network where every segment has a parent', () => {
    const s = [seg(0, 1, [0, 0, 0], [0, 0, 1], 0.1), seg(1, 0, [0, 0, 1], [0, 0, 2], 0.1)];
    expect(() => SegmentTree.fromNetwork(s)).toThrow(/no root/);
  });

  it('rejects an empty network', () => {
    expect(() => SegmentTree.fromNetwork([])).toThrow(/no segments/);
  });
});
