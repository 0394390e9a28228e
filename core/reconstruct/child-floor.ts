import { SegmentTree } from '../topology/node-tree.js';
import type { Segment } from '../types/network.js';

/**
 * A segment without a usable fit (`cluster_spread`: the band cluster's rough radius) may come out
 * far thinner than the branches it carries — measured on the park-oak sample: 0.1 mm segments
 * carrying 5 cm children, which choke every water path through them. Any area-preservation
 * exponent a > 0 in Σ r_child^a = r_parent^a implies r_parent ≥ max r_child, so such segments are
 * raised to their thickest child, children first. This assumes no particular exponent, so the
 * exponent statistics (which skip unreliable segments anyway) are not pulled toward a law.
 * Fitted segments are never changed; raised ones are recorded as `child_floor`.
 */
export function floorUnfittedRadii(segments: Segment[]): Segment[] {
  if (segments.length === 0) return segments;
  const tree = SegmentTree.fromNetwork(segments);
  const radius = Float64Array.from(segments, (s) => s.radiusM);
  const raised = new Uint8Array(segments.length);
  tree.eachAfter((i) => {
    const s = segments[i];
    if (s.radiusCorrection !== 'cluster_spread') return;
    let floor = 0;
    for (const c of tree.children[i]) floor = Math.max(floor, radius[c]);
    if (floor > radius[i]) {
      radius[i] = floor;
      raised[i] = 1;
    }
  });
  return segments.map((s, i) => (raised[i] ? { ...s, radiusM: radius[i], radiusCorrection: 'child_floor' } : s));
}
