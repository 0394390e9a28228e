import type { Network } from '../../types/network.js';
import type { NetworkProfiles } from '../profiles.js';
import type { ExponentView } from '../report-data.js';
import { linearScale, logScale } from './scale.js';
import { axisRanges, DEFAULT_AREA, emptyPlot, SvgPlot } from './svg.js';

/** Theory values of the area-preservation exponent drawn on the histogram (da Vinci a = 2; Murray a = 3). */
export const THEORY_EXPONENTS = [
  { value: 2, label: 'da Vinci a = 2' },
  { value: 3, label: 'Murray a = 3' },
] as const;

/**
 * Most dots drawn in one scatter plot; larger sets are thinned by a fixed stride (no randomness, so
 * the report repeats byte for byte). Keeps a 20 000-segment report's SVG small enough to parse fast.
 */
export const MAX_SCATTER_DOTS = 1500;

/** Equal-width histogram of finite values over [lo, hi]; the last bin includes hi. */
export function histogram(values: number[], bins: number, lo: number, hi: number): { edges: number[]; counts: number[] } {
  const w = (hi - lo) / bins;
  const edges = Array.from({ length: bins + 1 }, (_, k) => lo + k * w);
  const counts = new Array<number>(bins).fill(0);
  for (const v of values) {
    if (!(v >= lo && v <= hi)) continue;
    counts[Math.min(bins - 1, Math.floor((v - lo) / w))]++;
  }
  return { edges, counts };
}

function finite(xs: number[]): number[] {
  return xs.filter((v) => Number.isFinite(v));
}

/** Quantile by linear interpolation between order statistics (type 7), of sorted values. */
export function quantileSorted(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Per-furcation exponent distribution with the tree estimate, its interval and the theory values.
 * The axis spans the 1st–99th percentile of the values (so a few degenerate furcations with huge a do
 * not flatten the plot) and always includes 1.5–3.5 so both theory lines are visible.
 */
export function exponentPlot(view: ExponentView, bins: number): string {
  const title = 'Area-preservation exponent a per furcation';
  const values = finite(view.perFurcation);
  if (values.length === 0) return emptyPlot('exponent', title, 'No furcation gave an exponent (no reliable furcations).');
  const sorted = [...values].sort((a, b) => a - b);
  let lo = Math.min(1.5, quantileSorted(sorted, 0.01));
  let hi = Math.max(3.5, quantileSorted(sorted, 0.99));
  if (view.interval) [lo, hi] = [Math.min(lo, view.interval[0]), Math.max(hi, view.interval[1])];
  const r = axisRanges({ ...DEFAULT_AREA, top: 44, height: DEFAULT_AREA.height + 28 });
  const x = linearScale(lo, hi, ...r.x);
  const hist = histogram(values, bins, x.domain[0], x.domain[1]);
  // 35 % headroom keeps the legend clear of the bars.
  const y = linearScale(0, Math.max(1, ...hist.counts) * 1.35, ...r.y);
  const area = { ...DEFAULT_AREA, top: 44, height: DEFAULT_AREA.height + 28 };
  const plot = new SvgPlot('exponent', title, area, x, y, 'exponent a (dimensionless)', 'furcations');
  if (view.interval) plot.band(view.interval[0], view.interval[1]);
  plot.bars(hist.edges, hist.counts);
  for (const t of THEORY_EXPONENTS) plot.vline(t.value, t.label, 'ref', 0);
  if (view.estimate !== null) plot.vline(view.estimate, `tree a = ${view.estimate.toPrecision(3)}`, 'estimate', 1);
  plot.legend([
    { cls: 'bar', label: `furcations (n = ${values.length})` },
    ...(view.interval ? [{ cls: 'interval', label: view.intervalLabel }] : []),
  ]);
  return plot.toString();
}

/** Radius against Strahler order on log–log axes, one dot per segment and the per-order median as a line. */
export function radiusOrderPlot(network: Network): string {
  const title = 'Radius against Strahler order (log–log)';
  const segs = network.segments.filter((s) => s.strahlerOrder > 0 && s.radiusM > 0);
  if (segs.length === 0) return emptyPlot('radius-order', title, 'No segment has a Strahler order.');
  const xs = segs.map((s) => s.strahlerOrder);
  const ys = segs.map((s) => s.radiusM);
  const r = axisRanges(DEFAULT_AREA);
  const x = logScale(1, Math.max(2, ...xs), ...r.x);
  const y = logScale(Math.min(...ys), Math.max(...ys), ...r.y);
  const plot = new SvgPlot('radius-order', title, DEFAULT_AREA, x, y, 'Strahler order', 'radius (m)');
  const step = Math.max(1, Math.ceil(segs.length / MAX_SCATTER_DOTS));
  const tx: number[] = [];
  const ty: number[] = [];
  for (let i = 0; i < segs.length; i += step) {
    tx.push(xs[i]);
    ty.push(ys[i]);
  }
  plot.points(tx, ty, 'dot faint', 1.6);
  const orders = [...new Set(xs)].sort((a, b) => a - b);
  const med = orders.map((o) => quantileSorted(ys.filter((_, i) => xs[i] === o).sort((a, b) => a - b), 0.5));
  plot.line(orders, med, 'trace').points(orders, med, 'dot strong', 3.2);
  plot.legend([{ cls: 'dot', label: 'segments' }, { cls: 'trace', label: 'median per order' }], 'left');
  return plot.toString();
}

/** Stem taper: radius of the trunk segments against path length from the stem base. */
export function taperPlot(network: Network, profiles: NetworkProfiles): string {
  const title = 'Stem taper: radius along the trunk';
  const path = profiles.stemPath;
  if (path.length < 2) return emptyPlot('taper', title, 'The trunk has fewer than two segments.');
  const xs = path.map((i) => profiles.distanceFromBaseM[i]);
  const ys = path.map((i) => network.segments[i].radiusM);
  const r = axisRanges(DEFAULT_AREA);
  const x = linearScale(0, Math.max(...xs), ...r.x);
  const y = linearScale(0, Math.max(...ys), ...r.y);
  const plot = new SvgPlot('taper', title, DEFAULT_AREA, x, y, 'path length from stem base (m)', 'radius (m)');
  plot.line(xs, ys, 'trace').points(xs, ys, 'dot', 2);
  return plot.toString();
}

/** Conduit diameter against distance from the apex, log–log (conduit widening). */
export function conduitPlot(profiles: NetworkProfiles, conduitDiameterUm: Float64Array | null): string {
  const title = 'Conduit diameter against distance from the apex (log–log)';
  if (!conduitDiameterUm) return emptyPlot('conduit', title, 'The hydraulics stage gave no conduit diameters.');
  const xs: number[] = [];
  const ys: number[] = [];
  const n = conduitDiameterUm.length;
  const step = Math.max(1, Math.ceil(n / MAX_SCATTER_DOTS));
  for (let i = 0; i < n; i += step) {
    const d = conduitDiameterUm[i];
    const l = profiles.distanceFromApexM[i];
    if (d > 0 && l > 0) {
      xs.push(l);
      ys.push(d);
    }
  }
  if (xs.length === 0) return emptyPlot('conduit', title, 'No segment has a positive conduit diameter.');
  const r = axisRanges(DEFAULT_AREA);
  const x = logScale(Math.min(...xs), Math.max(...xs), ...r.x);
  const y = logScale(Math.min(...ys), Math.max(...ys), ...r.y);
  const plot = new SvgPlot('conduit', title, DEFAULT_AREA, x, y, 'distance from apex (m)', 'conduit diameter (µm)');
  plot.points(xs, ys, 'dot', 1.8);
  return plot.toString();
}

/** Water potential along the longest base-to-tip path. */
export function waterPotentialPlot(profiles: NetworkProfiles, waterPotentialMPa: Float64Array | null): string {
  const title = 'Water potential along the longest path';
  if (!waterPotentialMPa) return emptyPlot('water-potential', title, 'The hydraulics stage gave no water potentials.');
  const path = profiles.longestPath.filter((i) => Number.isFinite(waterPotentialMPa[i]));
  if (path.length < 2) return emptyPlot('water-potential', title, 'Fewer than two segments on the path have a water potential.');
  const xs = path.map((i) => profiles.distanceFromBaseM[i]);
  const ys = path.map((i) => waterPotentialMPa[i]);
  const r = axisRanges(DEFAULT_AREA);
  const x = linearScale(0, Math.max(...xs), ...r.x);
  const y = linearScale(Math.min(...ys), Math.max(...ys), ...r.y);
  const plot = new SvgPlot('water-potential', title, DEFAULT_AREA, x, y, 'path length from stem base (m)', 'water potential (MPa)');
  plot.line(xs, ys, 'trace').points(xs, ys, 'dot', 2);
  return plot.toString();
}
