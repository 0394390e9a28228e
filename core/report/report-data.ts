import type { Network } from '../types/network.js';

/** One key figure of the report header (value null = not available, shown as "–" with the reason). */
export interface KeyFigure {
  id: string;
  label: string;
  value: number | null;
  unit: string;
  /** Significant digits shown. */
  digits: number;
  /** Interval shown after the value, e.g. a 95 % interval of the exponent. */
  interval?: [number, number] | null;
  note?: string;
}

/** Per-segment values from later stages, indexed like `network.segments`; null when the stage did not produce them. */
export interface SegmentLayers {
  conduitDiameterUm: Float64Array | null;
  waterPotentialMPa: Float64Array | null;
  plcPercent: Float64Array | null;
}

/** What the exponent plot shows. */
export interface ExponentView {
  /** Per-furcation exponents a (Σ r_child^a = r_parent^a), finite values only. */
  perFurcation: number[];
  /** Tree estimate of a, or null. */
  estimate: number | null;
  interval: [number, number] | null;
  /** How the interval was obtained, e.g. "95 % bootstrap interval". */
  intervalLabel: string;
  /** Furcations left out of the estimate, with reasons (shown under the plot). */
  excludedNote?: string;
}

export interface ReliabilityView {
  segments: number;
  reliable: number;
  /** Count of flagged segments per reason code. */
  reasons: { reason: string; count: number }[];
  /** Further lines from the stages, e.g. "12 furcations excluded from the exponent: unreliable child". */
  notes: string[];
}

/**
 * Everything report.html shows, gathered by the pipeline from the stage outputs. Plain data, so
 * the report can also be built from files (segments.csv + summary.json) or from test fixtures.
 */
export interface ReportData {
  title: string;
  source: { file: string; sha256?: string; version: string };
  network: Network;
  layers: SegmentLayers;
  exponent: ExponentView;
  keyFigures: KeyFigure[];
  reliability: ReliabilityView;
  /** Resolved options of every stage (defaults filled in). */
  options: Record<string, Record<string, unknown>>;
  warnings: string[];
}

/** The caution shown on every report (wording of our own, required by the project brief). */
export const REPORT_CAUTION =
  'These are model estimates from geometry plus assumed anatomy, not measurements and not a tree-safety assessment. ' +
  'Defer to local codes and licensed practice before any decision about a living tree.';

/** Count flagged segments by reason code, most frequent first (ties by name, so output is stable). */
export function reliabilityFromNetwork(network: Network, notes: string[] = []): ReliabilityView {
  const counts = new Map<string, number>();
  let reliable = 0;
  for (const s of network.segments) {
    if (s.reliable) reliable++;
    else {
      const r = s.reliabilityReason || 'unspecified';
      counts.set(r, (counts.get(r) ?? 0) + 1);
    }
  }
  const reasons = [...counts.entries()]
    .map(([reason, count]) => ({ reason, count }))
    .sort((a, b) => b.count - a.count || (a.reason < b.reason ? -1 : 1));
  return { segments: network.segments.length, reliable, reasons, notes };
}
