/**
 * Colour scales of the 3D view (pure functions; shared by the browser viewer and tests).
 * Palettes are our own choice: a continuous ramp from deep blue-green through sand to brick,
 * and a categorical set that starts with a bark brown for the trunk.
 */
export type Rgb = [number, number, number];

/** Stops of the continuous ramp, low → high, as 0–255 sRGB. */
export const RAMP: readonly Rgb[] = [
  [24, 54, 77],
  [31, 110, 120],
  [72, 160, 120],
  [196, 200, 110],
  [236, 160, 80],
  [178, 58, 52],
];

export const CATEGORICAL: readonly Rgb[] = [
  [110, 74, 50],
  [47, 125, 109],
  [214, 140, 47],
  [96, 88, 190],
  [196, 69, 90],
  [63, 143, 208],
  [138, 154, 59],
  [176, 102, 143],
  [80, 80, 80],
];

export const MISSING: Rgb = [160, 160, 160];

/** Ramp colour at t ∈ [0, 1] (clamped; NaN → MISSING), linear between stops. */
export function rampColour(t: number): Rgb {
  if (Number.isNaN(t)) return MISSING;
  const u = Math.min(1, Math.max(0, t)) * (RAMP.length - 1);
  const k = Math.min(RAMP.length - 2, Math.floor(u));
  const f = u - k;
  const a = RAMP[k];
  const b = RAMP[k + 1];
  return [Math.round(a[0] + f * (b[0] - a[0])), Math.round(a[1] + f * (b[1] - a[1])), Math.round(a[2] + f * (b[2] - a[2]))];
}

/**
 * Colour of category k of `count`: the categorical set while it has enough colours, else the
 * continuous ramp (so many branching orders stay distinguishable instead of repeating colours).
 */
export function categoryColour(k: number, count: number = CATEGORICAL.length): Rgb {
  if (!(k >= 0)) return MISSING;
  if (count > CATEGORICAL.length) return rampColour(Math.floor(k) / (count - 1));
  return CATEGORICAL[Math.floor(k) % CATEGORICAL.length];
}

export interface LayerScale {
  kind: 'continuous' | 'categorical';
  /** Continuous: map through log10 (positive values only). */
  log?: boolean;
  /** Continuous: high values get the low end of the ramp (e.g. water potential: more negative = hotter). */
  reverse?: boolean;
  /** Categorical: number of categories (decides between the categorical set and the ramp). */
  categoryCount?: number;
}

/** Finite min and max (positive only when `log`); null when there is none. */
export function valueRange(values: ArrayLike<number>, log = false): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v) || (log && !(v > 0))) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : null;
}

/** Position t ∈ [0, 1] of v in the range (0.5 when the range is a single value). */
export function rampPosition(v: number, range: [number, number], scale: LayerScale): number {
  if (!Number.isFinite(v) || (scale.log && !(v > 0))) return NaN;
  const [lo, hi] = scale.log ? [Math.log10(range[0]), Math.log10(range[1])] : range;
  const x = scale.log ? Math.log10(v) : v;
  const t = hi > lo ? (x - lo) / (hi - lo) : 0.5;
  return scale.reverse ? 1 - t : t;
}

/** Fill `out` (3 floats per segment, 0–1) with the colours of a layer. */
export function layerColours(values: ArrayLike<number>, scale: LayerScale, out: Float32Array): [number, number] | null {
  const range = scale.kind === 'continuous' ? valueRange(values, scale.log) : null;
  for (let i = 0; i < values.length; i++) {
    const c =
      scale.kind === 'categorical'
        ? categoryColour(values[i], scale.categoryCount)
        : range
          ? rampColour(rampPosition(values[i], range, scale))
          : MISSING;
    out[3 * i] = c[0] / 255;
    out[3 * i + 1] = c[1] / 255;
    out[3 * i + 2] = c[2] / 255;
  }
  return range;
}

export function cssColour(c: Rgb): string {
  return `rgb(${c[0]},${c[1]},${c[2]})`;
}
