import type { SegmentTree } from '../topology/node-tree.js';

/**
 * Radii the same network would have if every furcation followed Σ r_child^a = r_parent^a exactly,
 * from the measured stem-base radius outwards (a = 2 da Vinci's rule, a = 3 Murray's law). Each
 * child keeps its measured share r_c^a / Σ r^a of the split; a single child (a chain of cylinders
 * along one internode) keeps its parent's radius. Topology and lengths are unchanged.
 * @param radiiM measured radii, m
 * @param exponent a (> 0)
 */
export function ruleRadiiM(tree: SegmentTree, radiiM: ArrayLike<number>, exponent: number): Float64Array {
  const out = new Float64Array(tree.size);
  out[tree.root] = radiiM[tree.root];
  tree.eachBefore((i) => {
    const kids = tree.children[i];
    if (kids.length === 0) return;
    if (kids.length === 1) {
      out[kids[0]] = out[i];
      return;
    }
    let total = 0;
    for (const c of kids) total += radiiM[c] ** exponent;
    for (const c of kids) out[c] = out[i] * (radiiM[c] ** exponent / total) ** (1 / exponent);
  });
  return out;
}
