import { describe, expect, it } from 'vitest';
import { exponentPlot, histogram, quantileSorted, radiusOrderPlot, taperPlot, conduitPlot, waterPotentialPlot, THEORY_EXPONENTS, MAX_SCATTER_DOTS } from '../../core/report/plots/figures.js';
import { formatTick, linearScale, logScale, niceStep } from '../../core/report/plots/scale.js';
import { escapeXml } from '../../core/report/plots/svg.js';
import { networkProfiles } from '../../core/report/profiles.js';
import { binaryTreeNetwork } from './fixtures.js';

const marks = (svg: string): number => (svg.match(/class="mark /g) ?? []).length;

describe('niceStep', () => {
  it('picks steps of 1, 2, 5 or 10 × 10^k with the rounding thresholds 1.5, 3, 7 (Heckbert, "Nice numbers for graph labels", Graphics Gems 1990; from memory)', () => {
    expect(niceStep(10, 5)).toBe(2);
    expect(niceStep(1, 5)).toBeCloseTo(0.2, 12);
    expect(niceStep(100, 4)).toBe(20);
    expect(niceStep(0.037, 5)).toBeCloseTo(0.01, 12); // 0.0074 rounds up to 10 × 10⁻³ (threshold 7, from memory)
    expect(niceStep(7, 1)).toBe(10);
  });
});

describe('linearScale', () => {
  it('widens the domain to whole ticks and maps its ends to the pixel ends', () => {
    const s = linearScale(0.3, 9.6, 50, 450);
    expect(s.domain).toEqual([0, 10]);
    expect(s.ticks).toEqual([0, 2, 4, 6, 8, 10]);
    expect(s.map(0)).toBe(50);
    expect(s.map(10)).toBe(450);
    expect(s.map(5)).toBe(250);
  });

  it('opens a zero-width domain instead of dividing by zero', () => {
    const s = linearScale(3, 3, 0, 100);
    expect(Number.isFinite(s.map(3))).toBe(true);
    expect(s.domain[0]).toBeLessThan(3);
    expect(s.domain[1]).toBeGreaterThan(3);
  });
});

describe('logScale', () => {
  it('spaces decades equally (log10)', () => {
    const s = logScale(0.01, 1, 0, 200);
    expect(s.map(0.01)).toBeCloseTo(0, 9);
    expect(s.map(0.1)).toBeCloseTo(100, 9);
    expect(s.map(1)).toBeCloseTo(200, 9);
    expect(s.ticks).toContain(0.1);
  });
});

describe('formatTick', () => {
  it('writes short labels and exponent form for tiny values', () => {
    expect(formatTick(0.30000000000000004)).toBe('0.3');
    expect(formatTick(1500)).toBe('1500');
    expect(formatTick(0.0001)).toBe('1e-4');
  });
});

describe('escapeXml', () => {
  it('escapes the five XML special characters (XML 1.0 §2.4, predefined entities)', () => {
    expect(escapeXml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
  });
});

describe('histogram', () => {
  it('counts values into equal bins, the top edge in the last bin, outside values dropped', () => {
    const h = histogram([0, 0.5, 1, 1.5, 2, 2, 3, -1, NaN], 2, 0, 2);
    expect(h.edges).toEqual([0, 1, 2]);
    expect(h.counts).toEqual([2, 4]);
  });
});

describe('quantileSorted', () => {
  it('interpolates between order statistics like R type 7 / numpy "linear" (Hyndman & Fan 1996)', () => {
    // numpy.quantile([1, 2, 3, 4], [0.25, 0.5, 0.9]) = [1.75, 2.5, 3.7]
    const v = [1, 2, 3, 4];
    expect(quantileSorted(v, 0.25)).toBeCloseTo(1.75, 12);
    expect(quantileSorted(v, 0.5)).toBeCloseTo(2.5, 12);
    expect(quantileSorted(v, 0.9)).toBeCloseTo(3.7, 12);
  });
});

describe('exponentPlot', () => {
  it('draws bars, the interval, the tree estimate and both theory lines at their x positions', () => {
    const svg = exponentPlot({ perFurcation: [2.1, 2.4, 2.5, 2.6, 2.9], estimate: 2.5, interval: [2.3, 2.7], intervalLabel: '95 % interval' }, 10);
    expect(marks(svg)).toBeGreaterThanOrEqual(2);
    for (const t of THEORY_EXPONENTS) expect(svg).toContain(t.label);
    expect(THEORY_EXPONENTS.map((t) => t.value)).toEqual([2, 3]); // da Vinci's rule a = 2, Murray's law a = 3 (GLOSSARY)
    // The theory lines are 1 unit of a apart; the estimate lies halfway between them.
    const xOf = (cls: string, label: string): number => {
      const m = new RegExp(`<g class="${cls}"><line x1="([\\d.]+)"[^>]*/><text[^>]*>${label}`).exec(svg);
      return Number(m![1]);
    };
    const x2 = xOf('ref', 'da Vinci a = 2');
    const x3 = xOf('ref', 'Murray a = 3');
    expect(xOf('estimate', 'tree a = 2.50')).toBeCloseTo((x2 + x3) / 2, 0);
  });

  it('says why when there is no furcation', () => {
    const svg = exponentPlot({ perFurcation: [], estimate: null, interval: null, intervalLabel: '' }, 10);
    expect(svg).toContain('plot-empty');
    expect(marks(svg)).toBe(0);
  });
});

describe('radiusOrderPlot', () => {
  it('draws one dot per segment and a median per Strahler order', () => {
    const net = binaryTreeNetwork(3);
    const svg = radiusOrderPlot(net);
    const orders = new Set(net.segments.map((s) => s.strahlerOrder)).size;
    expect((svg.match(/class="mark dot faint"/g) ?? []).length).toBe(net.segments.length);
    expect((svg.match(/class="mark dot strong"/g) ?? []).length).toBe(orders);
  });

  it('thins a large network to at most MAX_SCATTER_DOTS dots, the same ones every time', () => {
    const net = binaryTreeNetwork(11);
    expect(net.segments.length).toBeGreaterThan(MAX_SCATTER_DOTS);
    const svg = radiusOrderPlot(net);
    const dots = (svg.match(/class="mark dot faint"/g) ?? []).length;
    expect(dots).toBeLessThanOrEqual(MAX_SCATTER_DOTS);
    expect(dots).toBeGreaterThan(MAX_SCATTER_DOTS / 2);
    expect(radiusOrderPlot(net)).toBe(svg);
  });
});

describe('taperPlot', () => {
  it('follows the trunk from the base (one dot per trunk segment)', () => {
    const net = binaryTreeNetwork(4, 2);
    const p = networkProfiles(net);
    const svg = taperPlot(net, p);
    expect((svg.match(/class="mark dot"/g) ?? []).length).toBe(p.stemPath.length);
  });
});

describe('conduitPlot', () => {
  it('plots positive conduit diameters and explains a missing column', () => {
    const net = binaryTreeNetwork(3);
    const p = networkProfiles(net);
    expect(marks(conduitPlot(p, Float64Array.from(net.segments, () => 30)))).toBe(net.segments.length);
    expect(conduitPlot(p, null)).toContain('plot-empty');
  });
});

describe('waterPotentialPlot', () => {
  it('draws the longest path as a line with one dot per segment on it', () => {
    const net = binaryTreeNetwork(3, 2);
    const p = networkProfiles(net);
    const svg = waterPotentialPlot(p, Float64Array.from(net.segments, (s) => -0.1 * s.end[2]));
    expect((svg.match(/class="mark dot"/g) ?? []).length).toBe(p.longestPath.length);
    expect(svg).toContain('class="mark trace"');
  });
});
