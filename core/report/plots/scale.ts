/**
 * Axis scales and tick choice for the report's SVG plots. Ticks use the "nice numbers" rule
 * (steps of 1, 2 or 5 × 10^k; Heckbert, Graphics Gems 1990).
 */
export interface Scale {
  /** Data value → pixel. */
  map(v: number): number;
  ticks: number[];
  domain: [number, number];
  log: boolean;
}

/** A step of 1, 2 or 5 × 10^k close to `range / count`. */
export function niceStep(range: number, count: number): number {
  if (!(range > 0) || !(count > 0)) return 1;
  const raw = range / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const nice = f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10;
  return nice * mag;
}

/** Domain [lo, hi] widened to whole ticks; a zero-width domain is opened by ±1 (or ±10 %). */
export function linearScale(lo: number, hi: number, px0: number, px1: number, tickCount = 5): Scale {
  if (!(Number.isFinite(lo) && Number.isFinite(hi))) [lo, hi] = [0, 1];
  if (hi < lo) [lo, hi] = [hi, lo];
  if (hi === lo) {
    const d = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= d;
    hi += d;
  }
  const step = niceStep(hi - lo, tickCount);
  const a = Math.floor(lo / step) * step;
  const b = Math.ceil(hi / step) * step;
  const ticks: number[] = [];
  for (let k = 0; a + k * step <= b + step * 1e-9; k++) ticks.push(roundTo(a + k * step, step));
  const map = (v: number): number => px0 + ((v - a) / (b - a)) * (px1 - px0);
  return { map, ticks, domain: [a, b], log: false };
}

/** Log10 scale over positive values; ticks at 1, 2, 5 × 10^k when the span is short, else at decades. */
export function logScale(lo: number, hi: number, px0: number, px1: number): Scale {
  if (!(lo > 0) || !(hi > 0)) [lo, hi] = [1, 10];
  if (hi < lo) [lo, hi] = [hi, lo];
  let a = Math.floor(Math.log10(lo));
  let b = Math.ceil(Math.log10(hi));
  if (a === b) {
    a -= 1;
    b += 1;
  }
  const ticks: number[] = [];
  const mantissas = b - a <= 2 ? [1, 2, 5] : [1];
  for (let e = a; e <= b; e++) for (const m of mantissas) if (e < b || m === 1) ticks.push(m * 10 ** e);
  const map = (v: number): number => px0 + ((Math.log10(v) - a) / (b - a)) * (px1 - px0);
  return { map, ticks, domain: [10 ** a, 10 ** b], log: true };
}

function roundTo(v: number, step: number): number {
  const digits = Math.max(0, -Math.floor(Math.log10(step)) + 1);
  return Number(v.toFixed(Math.min(digits, 15)));
}

/** Short tick label: up to 3 significant digits, no trailing zeros, exponent form for tiny/huge values. */
export function formatTick(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(0).replace('e+', 'e');
  return String(Number(v.toPrecision(3)));
}
