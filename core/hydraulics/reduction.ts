import type { SegmentTree } from '../topology/node-tree.js';

/**
 * Whole-tree conductance from the stem base to all tips held at one water potential, by
 * series–parallel reduction: a subtree's conductance is its segment in series with the parallel
 * sum of its children's subtrees, G_i = 1 / (1/g_i + 1/Σ G_c), tips G = g_i. Children first,
 * iteratively (no recursion).
 * @param conductance per-segment conductance (any unit; the result has the same unit)
 * @returns conductance of every subtree; the tree's is at `tree.root`
 */
export function subtreeConductances(tree: SegmentTree, conductance: ArrayLike<number>): Float64Array {
  const out = new Float64Array(tree.size);
  tree.eachAfter((i) => {
    const kids = tree.children[i];
    const g = conductance[i];
    if (kids.length === 0) {
      out[i] = g;
      return;
    }
    let parallel = 0;
    for (const c of kids) parallel += out[c];
    // Written as a product over a sum rather than 1/(1/g + 1/P) so zero conductances stay 0, not NaN.
    out[i] = g + parallel > 0 ? (g * parallel) / (g + parallel) : 0;
  });
  return out;
}

/** Whole-tree conductance by series–parallel reduction (see `subtreeConductances`). */
export function treeConductanceByReduction(tree: SegmentTree, conductance: ArrayLike<number>): number {
  return subtreeConductances(tree, conductance)[tree.root];
}
