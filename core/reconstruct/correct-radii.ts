import type { Segment } from '../types/network.js';

/**
 * Radius correction of the network — placeholder hook: passes segments through unchanged until
 * the fit stage's taper-model correction (`fit/radius-correction.ts`) is wired in here.
 */
export function correctNetworkRadii(segments: Segment[]): Segment[] {
  return segments;
}
