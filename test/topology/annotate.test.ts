import { describe, expect, it } from 'vitest';
import { annotateNetwork, furcations } from '../../core/topology/annotate.js';
import { seg, smallTree } from './fixtures.js';

// Expected values below are worked out by hand on the tree drawn in fixtures.ts.
// Centrifugal order: trunk 0, branches off it 1 (GLOSSARY, common practice);
// Strahler order: Strahler 1957, Trans. Am. Geophys. Union 38:913 (tips 1, k+k → k+1).
describe('annotateNetwork', () => {
  const ann = annotateNetwork({ segments: smallTree() });
  const byId = (field: 'branchId' | 'branchOrder' | 'strahlerOrder') => ann.segments.map((s) => s[field]);

  it('assigns centrifugal branch orders with the trunk at 0', () => {
    expect(byId('branchOrder')).toEqual([0, 0, 0, 1, 1, 0, 0, 1, 2]);
  });

  it('numbers branches in pre-order and lets the thicker child continue the branch', () => {
    expect(byId('branchId')).toEqual([0, 0, 0, 2, 1, 0, 0, 2, 3]);
  });

  it('breaks a radius tie in favour of the child supplying more length', () => {
    expect(ann.mainChild[2]).toBe(5);
  });

  it('computes Strahler orders', () => {
    expect(byId('strahlerOrder')).toEqual([3, 3, 2, 2, 1, 1, 1, 1, 1]);
  });

  it('measures path length from the base to each segment end', () => {
    expect(Array.from(ann.pathLengthFromBaseM)).toEqual([1, 2, 3, 3, 4, 4, 5, 4, 4]);
  });

  it('measures the longest path from each segment start to a tip', () => {
    expect(Array.from(ann.distanceFromApexM)).toEqual([5, 4, 3, 2, 1, 2, 1, 1, 1]);
  });

  it('counts tips and length supplied by each segment', () => {
    expect(Array.from(ann.tipsSupplied)).toEqual([4, 4, 2, 2, 1, 1, 1, 1, 1]);
    expect(Array.from(ann.lengthSuppliedM)).toEqual([9, 8, 4, 3, 1, 2, 1, 1, 1]);
  });

  it('does not modify its input', () => {
    const input = smallTree();
    annotateNetwork({ segments: input });
    expect(input.every((s) => s.branchOrder === 0 && s.strahlerOrder === 0)).toBe(true);
  });

  it('handles a 100 000-segment chain without overflowing the stack', () => {
    const n = 100_000;
    const chain = Array.from({ length: n }, (_, i) => seg(i, i - 1, [0, 0, i * 0.01], [0, 0, (i + 1) * 0.01], 0.1));
    const a = annotateNetwork({ segments: chain });
    expect(a.pathLengthFromBaseM[n - 1]).toBeCloseTo(n * 0.01, 6);
    expect(a.distanceFromApexM[0]).toBeCloseTo(n * 0.01, 6);
    expect(a.segments[n - 1].strahlerOrder).toBe(1);
    expect(a.segments[n - 1].branchOrder).toBe(0);
  });

  it('handles a deep comb (a side twig on each of 50 000 trunk segments)', () => {
    const n = 50_000;
    const segs = [];
    for (let i = 0; i < n; i++) {
      segs.push(seg(2 * i, i === 0 ? -1 : 2 * (i - 1), [0, 0, i], [0, 0, i + 1], 1 - i / (2 * n)));
      segs.push(seg(2 * i + 1, 2 * i, [0, 0, i + 1], [1, 0, i + 1], 0.01));
    }
    const a = annotateNetwork({ segments: segs });
    // Every twig but the last is a new order-1 branch (the last twig is the single child, so it
    // continues the trunk); Strahler: the top trunk segment is 1, every fork below it 1 + 1 → 2 then stays 2.
    expect(a.segments.filter((s) => s.branchOrder === 1).length).toBe(n - 1);
    expect(a.segments[0].strahlerOrder).toBe(2);
    expect(furcations(a.tree).length).toBe(n - 1);
  });
});

describe('furcations', () => {
  it('lists segments with two or more children in pre-order', () => {
    const ann = annotateNetwork({ segments: smallTree() });
    expect(furcations(ann.tree)).toEqual([
      { parentIndex: 1, childIndices: [2, 3] },
      { parentIndex: 2, childIndices: [4, 5] },
      { parentIndex: 3, childIndices: [7, 8] },
    ]);
  });
});
