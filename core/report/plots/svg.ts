import { formatTick, type Scale } from './scale.js';

/** Escape text for HTML and SVG content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

const f1 = (v: number): string => (Math.round(v * 10) / 10).toString();

export interface PlotArea {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export const DEFAULT_AREA: PlotArea = { width: 460, height: 300, left: 58, right: 16, top: 16, bottom: 46 };

/** Pixel range of the x and y axes inside an area (y grows upwards). */
export function axisRanges(area: PlotArea): { x: [number, number]; y: [number, number] } {
  return { x: [area.left, area.width - area.right], y: [area.height - area.bottom, area.top] };
}

/**
 * A small SVG plot builder. Data marks carry the class `mark` (the browser test counts them),
 * reference lines (theory values) the class `ref`. Output is plain SVG text, deterministic.
 */
export class SvgPlot {
  private readonly parts: string[] = [];
  constructor(
    readonly id: string,
    readonly title: string,
    readonly area: PlotArea,
    readonly x: Scale,
    readonly y: Scale,
    readonly xLabel: string,
    readonly yLabel: string,
  ) {}

  /** Grid lines, tick labels and axis titles. */
  private axes(): string {
    const { area, x, y } = this;
    const [x0, x1] = [area.left, area.width - area.right];
    const [y0, y1] = [area.height - area.bottom, area.top];
    const out: string[] = [`<g class="axes">`];
    for (const t of x.ticks) {
      const px = f1(x.map(t));
      out.push(`<line class="grid" x1="${px}" x2="${px}" y1="${y0}" y2="${y1}"/>`);
      out.push(`<text class="tick" x="${px}" y="${y0 + 15}" text-anchor="middle">${escapeXml(formatTick(t))}</text>`);
    }
    for (const t of y.ticks) {
      const py = f1(y.map(t));
      out.push(`<line class="grid" x1="${x0}" x2="${x1}" y1="${py}" y2="${py}"/>`);
      out.push(`<text class="tick" x="${x0 - 6}" y="${py}" dy="0.32em" text-anchor="end">${escapeXml(formatTick(t))}</text>`);
    }
    out.push(`<rect class="frame" x="${x0}" y="${y1}" width="${x1 - x0}" height="${y0 - y1}"/>`);
    out.push(`<text class="axis-title" x="${(x0 + x1) / 2}" y="${area.height - 8}" text-anchor="middle">${escapeXml(this.xLabel)}</text>`);
    out.push(
      `<text class="axis-title" transform="translate(14 ${(y0 + y1) / 2}) rotate(-90)" text-anchor="middle">${escapeXml(this.yLabel)}</text>`,
    );
    out.push('</g>');
    return out.join('');
  }

  private inside(px: number, py: number): boolean {
    const { area } = this;
    return px >= area.left - 0.5 && px <= area.width - area.right + 0.5 && py >= area.top - 0.5 && py <= area.height - area.bottom + 0.5;
  }

  /** Circles at (xs[i], ys[i]); non-finite or off-scale points are left out. */
  points(xs: ArrayLike<number>, ys: ArrayLike<number>, cls = 'dot', r = 2.2): this {
    const out: string[] = [];
    for (let i = 0; i < xs.length; i++) {
      const px = this.x.map(xs[i]);
      const py = this.y.map(ys[i]);
      if (!Number.isFinite(px) || !Number.isFinite(py) || !this.inside(px, py)) continue;
      out.push(`<circle class="mark ${cls}" cx="${f1(px)}" cy="${f1(py)}" r="${r}"/>`);
    }
    if (out.length) this.parts.push(`<g>${out.join('')}</g>`);
    return this;
  }

  /** A connected line through the finite points, in the given order. */
  line(xs: ArrayLike<number>, ys: ArrayLike<number>, cls = 'trace'): this {
    const pts: string[] = [];
    for (let i = 0; i < xs.length; i++) {
      const px = this.x.map(xs[i]);
      const py = this.y.map(ys[i]);
      if (Number.isFinite(px) && Number.isFinite(py)) pts.push(`${f1(px)},${f1(py)}`);
    }
    if (pts.length >= 2) this.parts.push(`<polyline class="mark ${cls}" points="${pts.join(' ')}"/>`);
    return this;
  }

  /** Histogram bars: bins [edges[k], edges[k+1]) with counts[k]. */
  bars(edges: number[], counts: number[], cls = 'bar'): this {
    const out: string[] = [];
    const base = this.y.map(this.y.domain[0]);
    for (let k = 0; k < counts.length; k++) {
      if (!(counts[k] > 0)) continue;
      const xa = this.x.map(edges[k]);
      const xb = this.x.map(edges[k + 1]);
      const top = this.y.map(counts[k]);
      out.push(
        `<rect class="mark ${cls}" x="${f1(xa + 0.5)}" y="${f1(top)}" width="${f1(Math.max(0.5, xb - xa - 1))}" height="${f1(base - top)}"><title>${escapeXml(
          `${formatTick(edges[k])}–${formatTick(edges[k + 1])}: ${counts[k]}`,
        )}</title></rect>`,
      );
    }
    if (out.length) this.parts.push(`<g>${out.join('')}</g>`);
    return this;
  }

  /**
   * A vertical line at data value v (cls `ref` for theory values), labelled in the top margin;
   * `row` staggers labels of nearby lines (0 = nearest the frame).
   */
  vline(v: number, label: string, cls = 'ref', row = 0): this {
    if (!Number.isFinite(v)) return this;
    const px = this.x.map(v);
    if (!this.inside(px, this.area.top)) return this;
    const [y0, y1] = [this.area.height - this.area.bottom, this.area.top];
    this.parts.push(
      `<g class="${cls}"><line x1="${f1(px)}" x2="${f1(px)}" y1="${y0}" y2="${y1}"/><text x="${f1(px)}" y="${y1 - 5 - 13 * row}" text-anchor="middle">${escapeXml(label)}</text></g>`,
    );
    return this;
  }

  /** A shaded vertical band between data values a and b (e.g. a confidence interval). */
  band(a: number, b: number, cls = 'interval'): this {
    if (!Number.isFinite(a) || !Number.isFinite(b)) return this;
    const clamp = (p: number): number => Math.min(this.area.width - this.area.right, Math.max(this.area.left, p));
    const pa = clamp(this.x.map(Math.min(a, b)));
    const pb = clamp(this.x.map(Math.max(a, b)));
    const [y0, y1] = [this.area.height - this.area.bottom, this.area.top];
    this.parts.push(`<rect class="mark ${cls}" x="${f1(pa)}" y="${y1}" width="${f1(Math.max(1, pb - pa))}" height="${y0 - y1}"/>`);
    return this;
  }

  /** A legend entry list in a top corner of the frame, on a light backing so it stays readable over marks. */
  legend(entries: { cls: string; label: string }[], corner: 'left' | 'right' = 'right'): this {
    const w = 8 + 7 * Math.max(...entries.map((e) => e.label.length)) + 18;
    const x = corner === 'right' ? this.area.width - this.area.right - w - 6 : this.area.left + 6;
    const y = this.area.top + 6;
    const out = entries.map(
      (e, k) =>
        `<g class="legend-entry" transform="translate(${x + 6} ${y + 14 + k * 15})"><rect class="swatch ${e.cls}" width="10" height="10" y="-9"/><text x="15">${escapeXml(e.label)}</text></g>`,
    );
    this.parts.push(
      `<g class="legend"><rect class="legend-box" x="${x}" y="${y}" width="${w}" height="${8 + 15 * entries.length}"/>${out.join('')}</g>`,
    );
    return this;
  }

  toString(): string {
    const { width, height } = this.area;
    return `<figure class="plot" id="plot-${this.id}"><figcaption>${escapeXml(this.title)}</figcaption><svg class="plot-svg" data-plot="${this.id}" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${escapeXml(this.title)}">${this.axes()}${this.parts.join('')}</svg></figure>`;
  }
}

/** Placeholder figure when a plot has no data, saying why. */
export function emptyPlot(id: string, title: string, why: string): string {
  return `<figure class="plot plot-empty" id="plot-${id}"><figcaption>${escapeXml(title)}</figcaption><p class="empty">${escapeXml(why)}</p></figure>`;
}
