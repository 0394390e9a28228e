import { describe, expect, it } from 'vitest';
import { SegmentTree } from '../../core/topology/node-tree.js';
import { createRandom } from '../../core/util/random.js';
import { ruleRadiiM } from '../../core/hydraulics/what-if.js';
import { binaryTree } from './helpers.js';

describe('ruleRadiiM', () => {
  // An irregular measured tree: binary, with radii jittered ±30 % (seeded).
  const net = binaryTree({ levels: 6, baseRadiusM: 0.08, baseLengthM: 2, radiusRatio: 0.75, lengthRatio: 0.8, cylindersPerInternode: 2 });
  const rnd = createRandom(5);
  const measured = net.segments.map((s) => s.radiusM * rnd.uniform(0.7, 1.3));
  const tree = SegmentTree.fromNetwork(net);

  it.each([2, 3])('makes every furcation satisfy Σ r_child^a = r_parent^a exactly for a = %i', (a) => {
    // da Vinci's rule (a = 2) and Murray's law (a = 3) as defined in the glossary.
    const r = ruleRadiiM(tree, measured, a);
    for (let i = 0; i < tree.size; i++) {
      const kids = tree.children[i];
      if (kids.length < 2) continue;
      const sum = kids.reduce((s, c) => s + r[c] ** a, 0);
      expect(sum / r[i] ** a).toBeCloseTo(1, 12);
    }
  });

  it('keeps the measured stem-base radius and the measured split shares', () => {
    const r = ruleRadiiM(tree, measured, 2);
    expect(r[tree.root]).toBe(measured[tree.root]);
    const fork = tree.preorder.find((i) => tree.children[i].length === 2)!;
    const [c1, c2] = tree.children[fork];
    expect(r[c1] ** 2 / r[c2] ** 2).toBeCloseTo(measured[c1] ** 2 / measured[c2] ** 2, 12);
  });

  it('keeps the radius along an unbranched chain of cylinders', () => {
    const r = ruleRadiiM(tree, measured, 3);
    for (let i = 0; i < tree.size; i++) if (tree.children[i].length === 1) expect(r[tree.children[i][0]]).toBe(r[i]);
  });
});
