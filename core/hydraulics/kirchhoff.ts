import { XylemapError } from '../util/errors.js';
import type { SegmentTree } from '../topology/node-tree.js';
import { csrFromTriplets, lowerPattern, solveSpd, type CsrMatrix, type LowerFactor, type Preconditioner } from './sparse.js';

/**
 * A general network of conductances between nodes (any graph, loops allowed). Kirchhoff's current
 * law at every free node: Σ_j g_ij (H_i − H_j) = q_i, q the flow injected into node i.
 */
export interface ConductanceNetwork {
  nodeCount: number;
  edgeFrom: Int32Array;
  edgeTo: Int32Array;
  /** Edge conductance, > 0 (any unit; potentials and flows follow it). */
  conductance: Float64Array;
}

export interface KirchhoffProblem {
  /** Potential fixed at a node, NaN where the node is free. */
  fixedPotential: Float64Array;
  /** Flow injected into each free node (negative = drawn out, e.g. transpiration at a tip). */
  injection?: Float64Array;
  /** Order in which free nodes are eliminated (numbered) for the IC(0) factor; default node order. */
  eliminationOrder?: ArrayLike<number>;
  preconditioner?: Preconditioner;
  tolerance?: number;
}

export interface KirchhoffSolution {
  /** Potential at every node (fixed ones as given). */
  potential: Float64Array;
  /** Flow along every edge, from edgeFrom to edgeTo. */
  edgeFlow: Float64Array;
  iterations: number;
  relativeResidual: number;
  preconditioner: Preconditioner;
}

/**
 * A Kirchhoff network prepared for repeated solves with the same topology and the same set of
 * fixed nodes (only conductances, fixed values and injections change): the sparse pattern and the
 * place of every edge in it are computed once.
 */
export class KirchhoffSystem {
  readonly net: ConductanceNetwork;
  private readonly unknownOf: Int32Array;
  private readonly pattern: CsrMatrix;
  /** Per edge: position in pattern.val of (a,a), (b,b), (a,b), (b,a); -1 where a node is fixed. */
  private readonly slots: Int32Array;
  private readonly factor: LowerFactor | null;

  /**
   * @param fixedMask true where the node's potential is fixed
   * @param eliminationOrder order in which free nodes are numbered for the IC(0) factor
   * @throws XylemapError when no node is fixed
   */
  constructor(net: ConductanceNetwork, fixedMask: ArrayLike<boolean>, eliminationOrder?: ArrayLike<number>) {
    this.net = net;
    const { nodeCount, edgeFrom, edgeTo } = net;
    const unknownOf = new Int32Array(nodeCount).fill(-1);
    let m = 0;
    if (eliminationOrder) {
      for (let k = 0; k < eliminationOrder.length; k++) {
        const v = eliminationOrder[k];
        if (!fixedMask[v] && unknownOf[v] < 0) unknownOf[v] = m++;
      }
    }
    for (let v = 0; v < nodeCount; v++) if (!fixedMask[v] && unknownOf[v] < 0) unknownOf[v] = m++;
    if (m === nodeCount) {
      throw new XylemapError('Kirchhoff network has no node of fixed potential', { stage: 'hydraulics', hint: 'fix the potential at the stem base' });
    }
    this.unknownOf = unknownOf;
    // Pattern: diagonal of every unknown plus both off-diagonals of every free–free edge.
    const rows: number[] = [];
    const cols: number[] = [];
    for (let u = 0; u < m; u++) {
      rows.push(u);
      cols.push(u);
    }
    for (let e = 0; e < edgeFrom.length; e++) {
      const ua = unknownOf[edgeFrom[e]];
      const ub = unknownOf[edgeTo[e]];
      if (ua >= 0 && ub >= 0 && ua !== ub) {
        rows.push(ua, ub);
        cols.push(ub, ua);
      }
    }
    this.pattern = csrFromTriplets(m, rows, cols, new Float64Array(rows.length));
    const slots = new Int32Array(4 * edgeFrom.length).fill(-1);
    for (let e = 0; e < edgeFrom.length; e++) {
      const ua = unknownOf[edgeFrom[e]];
      const ub = unknownOf[edgeTo[e]];
      if (ua >= 0) slots[4 * e] = this.find(ua, ua);
      if (ub >= 0) slots[4 * e + 1] = this.find(ub, ub);
      if (ua >= 0 && ub >= 0 && ua !== ub) {
        slots[4 * e + 2] = this.find(ua, ub);
        slots[4 * e + 3] = this.find(ub, ua);
      }
    }
    this.slots = slots;
    this.factor = lowerPattern(this.pattern);
  }

  private find(r: number, c: number): number {
    const { rowPtr, col } = this.pattern;
    for (let p = rowPtr[r]; p < rowPtr[r + 1]; p++) if (col[p] === c) return p;
    throw new Error(`sparse pattern lacks (${r}, ${c})`);
  }

  /**
   * Solve for the node potentials.
   * @param conductance per edge (> 0), default the network's own
   * @param fixedPotential values at the fixed nodes (others ignored)
   * @param injection flow into each free node (negative = drawn out)
   */
  solve(
    fixedPotential: ArrayLike<number>,
    options: { conductance?: ArrayLike<number>; injection?: ArrayLike<number>; preconditioner?: Preconditioner; tolerance?: number } = {},
  ): KirchhoffSolution {
    const { nodeCount, edgeFrom, edgeTo } = this.net;
    const g = options.conductance ?? this.net.conductance;
    const unknownOf = this.unknownOf;
    const a = this.pattern;
    const val = new Float64Array(a.val.length);
    const rhs = new Float64Array(a.n);
    if (options.injection) for (let v = 0; v < nodeCount; v++) if (unknownOf[v] >= 0) rhs[unknownOf[v]] += options.injection[v];
    const slots = this.slots;
    for (let e = 0; e < edgeFrom.length; e++) {
      const ge = g[e];
      const ua = unknownOf[edgeFrom[e]];
      const ub = unknownOf[edgeTo[e]];
      if (ua >= 0) val[slots[4 * e]] += ge;
      if (ub >= 0) val[slots[4 * e + 1]] += ge;
      if (slots[4 * e + 2] >= 0) {
        val[slots[4 * e + 2]] -= ge;
        val[slots[4 * e + 3]] -= ge;
      } else if (ua >= 0 && ub < 0) rhs[ua] += ge * fixedPotential[edgeTo[e]];
      else if (ub >= 0 && ua < 0) rhs[ub] += ge * fixedPotential[edgeFrom[e]];
    }
    const solved = solveSpd({ n: a.n, rowPtr: a.rowPtr, col: a.col, val }, rhs, {
      preconditioner: options.preconditioner,
      tolerance: options.tolerance,
      factor: this.factor,
    });
    const potential = new Float64Array(nodeCount);
    for (let v = 0; v < nodeCount; v++) potential[v] = unknownOf[v] >= 0 ? solved.x[unknownOf[v]] : fixedPotential[v];
    const edgeFlow = new Float64Array(edgeFrom.length);
    for (let e = 0; e < edgeFrom.length; e++) edgeFlow[e] = g[e] * (potential[edgeFrom[e]] - potential[edgeTo[e]]);
    return { potential, edgeFlow, iterations: solved.iterations, relativeResidual: solved.relativeResidual, preconditioner: solved.preconditioner };
  }
}

/**
 * Solve a Kirchhoff network for node potentials by sparse preconditioned conjugate gradients
 * (the reduced Laplacian of the free nodes is symmetric positive definite when every connected
 * group of free nodes touches a fixed node).
 * @throws XylemapError when no node has a fixed potential
 */
export function solveKirchhoff(net: ConductanceNetwork, problem: KirchhoffProblem): KirchhoffSolution {
  const mask = Array.from(problem.fixedPotential, (v) => !Number.isNaN(v));
  return new KirchhoffSystem(net, mask, problem.eliminationOrder).solve(problem.fixedPotential, {
    injection: problem.injection,
    preconditioner: problem.preconditioner,
    tolerance: problem.tolerance,
  });
}

/**
 * The segment tree as a conductance network: node 0 is the stem base (start of the root segment),
 * node i + 1 the end of segment i; edge i joins the parent's end node to node i + 1.
 */
export function treeNetwork(tree: SegmentTree, conductance: ArrayLike<number>): ConductanceNetwork {
  const n = tree.size;
  const edgeFrom = new Int32Array(n);
  const edgeTo = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    edgeFrom[i] = tree.parent[i] >= 0 ? tree.parent[i] + 1 : 0;
    edgeTo[i] = i + 1;
  }
  return { nodeCount: n + 1, edgeFrom, edgeTo, conductance: Float64Array.from(conductance) };
}

/** Children-before-parents order of the tree's nodes: with it IC(0) is an exact factor. */
export function treeEliminationOrder(tree: SegmentTree): Int32Array {
  const n = tree.size;
  const order = new Int32Array(n + 1);
  for (let k = 0; k < n; k++) order[k] = tree.preorder[n - 1 - k] + 1;
  order[n] = 0;
  return order;
}

/**
 * Whole-tree conductance by a Kirchhoff solve: potential 1 at the base, 0 at every tip end,
 * conductance = flow out of the base.
 * @param conductance per-segment conductance (any unit; the result has the same unit)
 */
export function treeConductanceByKirchhoff(
  tree: SegmentTree,
  conductance: ArrayLike<number>,
  options: { preconditioner?: Preconditioner; tolerance?: number } = {},
): { conductance: number; iterations: number; preconditioner: Preconditioner } {
  const net = treeNetwork(tree, conductance);
  const fixed = new Float64Array(net.nodeCount).fill(Number.NaN);
  fixed[0] = 1;
  for (let i = 0; i < tree.size; i++) if (tree.isTip(i)) fixed[i + 1] = 0;
  const sol = solveKirchhoff(net, { fixedPotential: fixed, eliminationOrder: treeEliminationOrder(tree), ...options });
  let flow = 0;
  for (let e = 0; e < net.edgeFrom.length; e++) if (net.edgeFrom[e] === 0) flow += sol.edgeFlow[e];
  return { conductance: flow, iterations: sol.iterations, preconditioner: sol.preconditioner };
}
