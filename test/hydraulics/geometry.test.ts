import { describe, expect, it } from 'vitest';
import { SegmentTree } from '../../core/topology/node-tree.js';
import { pathGeometry } from '../../core/hydraulics/geometry.js';
import { binaryTree, segment } from './helpers.js';

describe('pathGeometry', () => {
  const spec = { levels: 4, baseRadiusM: 0.05, baseLengthM: 2, radiusRatio: 0.7, lengthRatio: 0.5 };
  const tree = SegmentTree.fromNetwork(binaryTree(spec));
  const g = pathGeometry(tree);

  it('measures the base-to-tip path of a symmetric tree as Σ l_k', () => {
    // Geometric series 2 + 1 + 0.5 + 0.25 = 3.75 m (hand calculation).
    let maxPath = 0;
    for (let i = 0; i < tree.size; i++) maxPath = Math.max(maxPath, g.pathLengthToEndM[i]);
    expect(maxPath).toBeCloseTo(3.75, 12);
  });

  it('measures the distance from the apex from the segment midpoint', () => {
    // Root: half its own 2 m plus 1 + 0.5 + 0.25 above it = 2.75 m; a tip: half of 0.25 m.
    expect(g.distanceFromApexM[tree.root]).toBeCloseTo(2.75, 12);
    const tip = tree.preorder.find((i) => tree.isTip(i))!;
    expect(g.distanceFromApexM[tip]).toBeCloseTo(0.125, 12);
  });

  it('counts 2^(levels − 1) tips supplied by the root', () => {
    expect(g.tipsSupplied[tree.root]).toBe(8);
  });

  it('rejects a zero-length segment, naming it', () => {
    const bad = SegmentTree.fromNetwork([segment(0, -1, [0, 0, 0], [0, 0, 1], 0.1), segment(7, 0, [0, 0, 1], [0, 0, 1], 0.1)]);
    expect(() => pathGeometry(bad)).toThrow(/segment 7: length_m must be > 0 m, got 0/);
  });
});
