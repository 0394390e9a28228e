import type { Segment } from '../types/network.js';
import { SegmentTree } from '../topology/node-tree.js';
import { annotateNetwork } from '../topology/annotate.js';
import { correctRadii, type RadiusCorrectionSummary } from './fit/radius-correction.js';

/**
 * Radius correction of the whole network with the fit stage's documented rules (noise bias,
 * taper model per branch, apex allometry, parent cap — see fit/radius-correction.ts). Branches are
 * annotated first because the taper model works per branch. The raw fit stays in `radiusFitM`
 * and the rule used in `radiusCorrection`.
 * @param mode 'taper' corrects; 'none' only records the raw fit and flags taper outliers
 */
export function correctNetworkRadii(segments: Segment[], rangeNoiseM: number, mode: 'taper' | 'none'): { segments: Segment[]; summary: RadiusCorrectionSummary } {
  const annotated = annotateNetwork({ segments });
  const tree = SegmentTree.fromNetwork(annotated.segments);
  return correctRadii(annotated.segments, tree, { mode, rangeNoiseM });
}
