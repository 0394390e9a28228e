import { describe, expect, it } from 'vitest';
import { SegmentTree } from '../../core/topology/node-tree.js';
import { createRandom } from '../../core/util/random.js';
import type { Segment } from '../../core/types/network.js';
import { KirchhoffSystem, solveKirchhoff, treeConductanceByKirchhoff, treeEliminationOrder, treeNetwork } from '../../core/hydraulics/kirchhoff.js';
import { subtreeConductances, treeConductanceByReduction } from '../../core/hydraulics/reduction.js';
import { binaryTree, segment } from './helpers.js';

const spec = { levels: 6, baseRadiusM: 0.1, baseLengthM: 2, radiusRatio: 2 ** -0.5, lengthRatio: 2 ** (-1 / 3) };

/** Per-segment conductance ∝ r⁴ / l (Poiseuille scaling; any positive numbers would do). */
function poiseuilleLike(tree: SegmentTree): Float64Array {
  return Float64Array.from(tree.segments, (s) => s.radiusM ** 4 / s.lengthM);
}

/** A random tree of n segments: each new segment hangs below a random earlier one (seeded). */
function randomTree(n: number, seed: number): { tree: SegmentTree; g: Float64Array } {
  const rnd = createRandom(seed);
  const segs: Segment[] = [segment(0, -1, [0, 0, 0], [0, 0, 1], 0.1)];
  for (let i = 1; i < n; i++) segs.push(segment(i, rnd.int(i), [0, 0, 0], [0, 0, 1], 0.1));
  const tree = SegmentTree.fromNetwork(segs);
  // Conductances spread over six orders of magnitude, like trunk vs twigs.
  const g = Float64Array.from({ length: n }, () => 10 ** rnd.uniform(-6, 0));
  return { tree, g };
}

describe('treeConductanceByReduction', () => {
  it('equals the closed form 1 / Σ_k 1/(2^k g_k) of a symmetric binary tree', () => {
    // Closed form: level k holds 2^k equal segments in parallel, levels are in series
    // (series/parallel rules for conductances, Ohm's-law analogy of Hagen–Poiseuille flow).
    const tree = SegmentTree.fromNetwork(binaryTree(spec));
    const g = poiseuilleLike(tree);
    let resistance = 0;
    for (let k = 0; k < spec.levels; k++) {
      const r = spec.baseRadiusM * spec.radiusRatio ** k;
      const l = spec.baseLengthM * spec.lengthRatio ** k;
      resistance += 1 / (2 ** k * (r ** 4 / l));
    }
    expect(Math.abs(treeConductanceByReduction(tree, g) * resistance - 1)).toBeLessThan(1e-12);
  });

  it('gives a chain of segments the series conductance 1 / Σ 1/g', () => {
    // Series rule for conductances.
    const segs = [0, 1, 2].map((i) => segment(i, i - 1, [0, 0, i], [0, 0, i + 1], 0.1));
    const tree = SegmentTree.fromNetwork(segs);
    expect(treeConductanceByReduction(tree, [1, 2, 4])).toBeCloseTo(1 / (1 + 0.5 + 0.25), 14);
  });
});

describe('subtreeConductances', () => {
  it('gives each tip its own conductance and keeps zero conductances at zero', () => {
    const tree = SegmentTree.fromNetwork(binaryTree({ ...spec, levels: 2 }));
    const out = subtreeConductances(tree, [0, 3, 5]);
    expect(out[1]).toBe(3);
    expect(out[2]).toBe(5);
    expect(out[0]).toBe(0);
  });
});

describe('treeConductanceByKirchhoff', () => {
  it.each([1, 2, 3, 4, 5])('agrees with series–parallel reduction to 1e-10 on random tree %i (IC(0) and Jacobi)', (seed) => {
    // Two independent methods (reduction over the node tree vs a sparse Kirchhoff solve) must agree.
    const { tree, g } = randomTree(400, seed);
    const reduced = treeConductanceByReduction(tree, g);
    for (const preconditioner of ['ic0', 'jacobi'] as const) {
      const k = treeConductanceByKirchhoff(tree, g, { preconditioner, tolerance: 1e-15 }).conductance;
      expect(Math.abs(k - reduced) / reduced).toBeLessThan(1e-10);
    }
  });

  it('agrees with the closed form of the symmetric binary tree', () => {
    const tree = SegmentTree.fromNetwork(binaryTree(spec));
    const g = poiseuilleLike(tree);
    const byReduction = treeConductanceByReduction(tree, g);
    expect(Math.abs(treeConductanceByKirchhoff(tree, g).conductance / byReduction - 1)).toBeLessThan(1e-10);
  });
});

describe('solveKirchhoff', () => {
  // Wheatstone bridge A–C (R1), A–D (R2), C–B (R3), D–B (R4), C–D (R5). Equivalent resistance
  // (classical circuit result, checked by R5 → ∞ and R5 → 0 limits):
  // R = [R1R2(R3+R4) + R3R4(R1+R2) + R5(R1+R3)(R2+R4)] / [(R1+R2)(R3+R4) + R5(R1+R2+R3+R4)].
  const bridge = (R: number[]) => {
    const [r1, r2, r3, r4, r5] = R;
    const net = {
      nodeCount: 4, // A 0, B 1, C 2, D 3
      edgeFrom: Int32Array.from([0, 0, 2, 3, 2]),
      edgeTo: Int32Array.from([2, 3, 1, 1, 3]),
      conductance: Float64Array.from(R, (r) => 1 / r),
    };
    const sol = solveKirchhoff(net, { fixedPotential: Float64Array.from([1, 0, Number.NaN, Number.NaN]) });
    const current = sol.edgeFlow[0] + sol.edgeFlow[1];
    const closed = (r1 * r2 * (r3 + r4) + r3 * r4 * (r1 + r2) + r5 * (r1 + r3) * (r2 + r4)) / ((r1 + r2) * (r3 + r4) + r5 * (r1 + r2 + r3 + r4));
    return { resistance: 1 / current, closed, sol };
  };

  it('solves an unbalanced Wheatstone bridge (a network with a loop) like its closed form', () => {
    const { resistance, closed } = bridge([1, 2, 3, 4, 5]);
    expect(Math.abs(resistance / closed - 1)).toBeLessThan(1e-12);
  });

  it('carries no current through the bridge of a balanced Wheatstone bridge', () => {
    // Balanced when R1/R3 = R2/R4 (Wheatstone 1843): no flow through R5.
    const { sol } = bridge([1, 2, 3, 6, 7]);
    expect(Math.abs(sol.edgeFlow[4])).toBeLessThan(1e-14);
  });

  it('conserves flow at every free node when flow is drawn at the tips', () => {
    // Kirchhoff's current law: inflow = outflow + draw at each node.
    const tree = SegmentTree.fromNetwork(binaryTree(spec));
    const n = tree.size;
    const g = poiseuilleLike(tree);
    const edgeFrom = Int32Array.from({ length: n }, (_, i) => (tree.parent[i] >= 0 ? tree.parent[i] + 1 : 0));
    const edgeTo = Int32Array.from({ length: n }, (_, i) => i + 1);
    const fixed = new Float64Array(n + 1).fill(Number.NaN);
    fixed[0] = 0;
    const injection = new Float64Array(n + 1);
    for (let i = 0; i < n; i++) if (tree.isTip(i)) injection[i + 1] = -1e-3;
    const sol = solveKirchhoff({ nodeCount: n + 1, edgeFrom, edgeTo, conductance: g }, { fixedPotential: fixed, injection });
    const balance = new Float64Array(n + 1);
    for (let e = 0; e < n; e++) {
      balance[edgeFrom[e]] -= sol.edgeFlow[e];
      balance[edgeTo[e]] += sol.edgeFlow[e];
    }
    for (let v = 1; v <= n; v++) expect(Math.abs(balance[v] + injection[v])).toBeLessThan(1e-12);
  });

  it('refuses a network in which no node has a fixed potential', () => {
    const net = { nodeCount: 2, edgeFrom: Int32Array.from([0]), edgeTo: Int32Array.from([1]), conductance: Float64Array.from([1]) };
    expect(() => solveKirchhoff(net, { fixedPotential: Float64Array.from([Number.NaN, Number.NaN]) })).toThrow(/no node of fixed potential/);
  });
});

describe('KirchhoffSystem', () => {
  it('gives the same potentials on repeated solves with new conductances as a fresh solve', () => {
    const { tree, g } = randomTree(200, 9);
    const net = treeNetwork(tree, g);
    const mask = new Array<boolean>(net.nodeCount).fill(false);
    mask[0] = true;
    const system = new KirchhoffSystem(net, mask, treeEliminationOrder(tree));
    const fixed = new Float64Array(net.nodeCount).fill(Number.NaN);
    fixed[0] = -0.5;
    const injection = new Float64Array(net.nodeCount);
    for (let i = 0; i < tree.size; i++) if (tree.isTip(i)) injection[i + 1] = -1e-4;
    system.solve(fixed, { injection });
    const halved = g.map((x) => x / 2);
    const again = system.solve(fixed, { conductance: halved, injection });
    const fresh = solveKirchhoff({ ...net, conductance: halved }, { fixedPotential: fixed, injection });
    // The fresh solve uses node order (IC(0) then inexact, CG iterates): compare relatively.
    for (let v = 0; v < net.nodeCount; v++) expect(Math.abs(again.potential[v] - fresh.potential[v])).toBeLessThan(1e-9 * Math.abs(fresh.potential[v]));
  });
});

describe('treeEliminationOrder', () => {
  it('numbers every node after all nodes below it, so IC(0) is exact and CG takes one step', () => {
    // No fill-in when a tree is eliminated leaves first (George & Liu 1981).
    const { tree, g } = randomTree(300, 4);
    const order = treeEliminationOrder(tree);
    const position = new Int32Array(order.length);
    order.forEach((node, k) => (position[node] = k));
    for (let i = 0; i < tree.size; i++) {
      const parentNode = tree.parent[i] >= 0 ? tree.parent[i] + 1 : 0;
      expect(position[i + 1]).toBeLessThan(position[parentNode]);
    }
    expect(treeConductanceByKirchhoff(tree, g).iterations).toBe(1);
  });
});
