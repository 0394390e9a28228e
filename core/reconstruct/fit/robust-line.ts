import { MAD_TO_SIGMA, robustTerms, select } from './robust.js';

/** y ≈ intercept + slope·x, with the robust spread of the residuals. */
export interface RobustLine {
  intercept: number;
  slope: number;
  /** 1.4826 · median |residual| of the points kept (weight > 0), in y units. */
  spread: number;
  count: number;
}

/**
 * Weighted straight-line fit with Tukey biweight IRLS (scale from the MAD of the residuals,
 * floored at `minSpread` so a few identical values do not give zero scale).
 *
 * @param slopeSign  −1: slope must be ≤ 0, +1: ≥ 0, 0: free. When the free fit has the wrong
 *                   sign the slope is set to 0 and only a robust location is fitted — a taper
 *                   model must not let radius grow towards the tip.
 * @returns null for no points or no positive weight
 */
export function fitRobustLine(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  w: ArrayLike<number>,
  slopeSign: -1 | 0 | 1 = 0,
  minSpread = 0.02,
): RobustLine | null {
  const n = x.length;
  if (n === 0) return null;
  const rw = new Float64Array(n);
  const res = new Float64Array(n);
  const scratch = new Float64Array(n);
  const terms = new Float64Array(3);
  for (let i = 0; i < n; i++) rw[i] = w[i];
  let a = 0;
  let b = 0;
  let fitSlope = n >= 2;
  for (let it = 0; it < 20; it++) {
    const next = weightedLs(x, y, rw, fitSlope);
    if (!next) return null;
    [a, b] = next;
    if (fitSlope && slopeSign !== 0 && Math.sign(b) === -slopeSign) {
      fitSlope = false;
      const c = weightedLs(x, y, rw, false);
      if (!c) return null;
      [a, b] = c;
    }
    for (let i = 0; i < n; i++) res[i] = y[i] - a - b * x[i];
    const s = Math.max(madOf(res, scratch), minSpread);
    let change = 0;
    for (let i = 0; i < n; i++) {
      robustTerms('tukey', res[i], s, terms);
      const nw = w[i] * terms[0];
      change += Math.abs(nw - rw[i]);
      rw[i] = nw;
    }
    if (change < 1e-9) break;
  }
  let kept = 0;
  for (let i = 0; i < n; i++) {
    if (rw[i] > 0) scratch[kept++] = Math.abs(y[i] - a - b * x[i]);
  }
  const spread = kept > 0 ? Math.max(MAD_TO_SIGMA * medianOf(scratch.subarray(0, kept)), minSpread) : minSpread;
  return { intercept: a, slope: b, spread, count: kept };
}

function weightedLs(x: ArrayLike<number>, y: ArrayLike<number>, w: ArrayLike<number>, slope: boolean): [number, number] | null {
  let sw = 0, sx = 0, sy = 0;
  for (let i = 0; i < x.length; i++) {
    sw += w[i];
    sx += w[i] * x[i];
    sy += w[i] * y[i];
  }
  if (!(sw > 0)) return null;
  const mx = sx / sw;
  const my = sy / sw;
  if (!slope) return [my, 0];
  let sxx = 0, sxy = 0;
  for (let i = 0; i < x.length; i++) {
    const dx = x[i] - mx;
    sxx += w[i] * dx * dx;
    sxy += w[i] * dx * (y[i] - my);
  }
  // All x equal: the slope is not identified, fit a level.
  const b = sxx > 1e-12 * Math.max(1, mx * mx) * sw ? sxy / sxx : 0;
  return [my - b * mx, b];
}

function madOf(res: Float64Array, scratch: Float64Array): number {
  for (let i = 0; i < res.length; i++) scratch[i] = Math.abs(res[i]);
  return MAD_TO_SIGMA * medianOf(scratch.subarray(0, res.length));
}

function medianOf(a: Float64Array): number {
  const n = a.length;
  if (n === 0) return 0;
  const mid = n >> 1;
  return n % 2 === 1 ? select(a, mid) : 0.5 * (select(a, mid - 1) + select(a, mid));
}
