import type { Segment } from '../types/network.js';

/** The `reliability` block of summary.json. */
export interface ReliabilitySummary {
  segment_count: number;
  reliable_count: number;
  reliable_fraction: number;
  /** Share of wood volume in reliable segments. */
  reliable_volume_fraction: number;
  /** Count of unreliable segments per reason code. */
  reasons: Record<string, number>;
  /** Count of segments whose radius was corrected, per correction code. */
  corrections: Record<string, number>;
}

/** Count reliable segments, reasons and corrections. */
export function summarizeReliability(segments: Segment[]): ReliabilitySummary {
  let reliable = 0;
  let vol = 0;
  let volReliable = 0;
  const reasons: Record<string, number> = {};
  const corrections: Record<string, number> = {};
  for (const s of segments) {
    const v = Math.PI * s.radiusM * s.radiusM * s.lengthM;
    vol += v;
    if (s.reliable) {
      reliable++;
      volReliable += v;
    } else {
      const r = s.reliabilityReason || 'unspecified';
      reasons[r] = (reasons[r] ?? 0) + 1;
    }
    if (s.radiusCorrection) corrections[s.radiusCorrection] = (corrections[s.radiusCorrection] ?? 0) + 1;
  }
  const n = segments.length;
  return {
    segment_count: n,
    reliable_count: reliable,
    reliable_fraction: n > 0 ? reliable / n : 0,
    reliable_volume_fraction: vol > 0 ? volReliable / vol : 0,
    reasons,
    corrections,
  };
}
