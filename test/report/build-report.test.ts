import { describe, expect, it } from 'vitest';
import { buildReportHtml, formatValue } from '../../core/report/build-report.js';
import { reportOptions } from '../../core/report/options.js';
import { REPORT_CAUTION, reliabilityFromNetwork } from '../../core/report/report-data.js';
import { viewerPayload } from '../../core/report/viewer-payload.js';
import { PAYLOAD_ELEMENT_ID, type ViewerPayload } from '../../core/report/viewer/payload.js';
import { binaryTreeNetwork, fixtureReportData } from './fixtures.js';

const VIEWER_STUB = 'window.__stub = "</script><!--";';

function payloadOf(html: string): ViewerPayload {
  const m = new RegExp(`<script type="application/json" id="${PAYLOAD_ELEMENT_ID}">(.*?)</script>`, 's').exec(html);
  return JSON.parse(m![1]) as ViewerPayload;
}

function f32(b64: string): Float32Array {
  const b = Buffer.from(b64, 'base64');
  return new Float32Array(b.buffer, b.byteOffset, b.byteLength / 4);
}

describe('buildReportHtml', () => {
  const data = fixtureReportData(binaryTreeNetwork(4, 2));
  const html = buildReportHtml(data, reportOptions.defaults(), VIEWER_STUB);

  it('references no external resource (HTML 5: no src/href to a URL; everything inline)', () => {
    expect(html).not.toMatch(/\s(src|href)\s*=/i);
    expect(html).not.toMatch(/url\(/i);
    expect(html).not.toMatch(/@import/i);
  });

  it('forbids network requests with a Content-Security-Policy of default-src none (W3C CSP Level 3)', () => {
    expect(html).toContain(`content="default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:"`);
  });

  it('keeps inline script text from closing its element early (HTML 5 script data state)', () => {
    expect(html).toContain('window.__stub = "<\\/script><\\!--";');
    const title = buildReportHtml({ ...data, title: '</script><b>x' }, reportOptions.defaults(), VIEWER_STUB);
    expect(title).toContain('&lt;/script&gt;&lt;b&gt;x');
    expect(payloadOf(title).count).toBe(data.network.segments.length);
  });

  it('shows the caution text, the key figures and the reliability reasons', () => {
    expect(html).toContain(REPORT_CAUTION);
    expect(REPORT_CAUTION).toContain('not a tree-safety assessment');
    for (const f of data.keyFigures) expect(html).toContain(`data-figure="${f.id}"`);
    for (const r of data.reliability.reasons) expect(html).toContain(`<td class="key">${r.reason}</td>`);
  });

  it('is byte-identical for the same data (no dates or timings inside)', () => {
    expect(buildReportHtml(data, reportOptions.defaults(), VIEWER_STUB)).toBe(html);
  });

  it('lists each option of every stage with its value', () => {
    expect(html).toContain('<td class="key">colour_by</td><td class="text">&quot;branch_order&quot;</td>');
  });

  it('builds a report for a one-segment network, saying why each plot is empty', () => {
    const one = fixtureReportData(binaryTreeNetwork(0), false);
    const page = buildReportHtml({ ...one, exponent: { perFurcation: [], estimate: null, interval: null, intervalLabel: '' } }, reportOptions.defaults(), VIEWER_STUB);
    expect(one.network.segments.length).toBe(1);
    expect((page.match(/class="plot plot-empty"/g) ?? []).length).toBe(4); // all but radius–order, which has its one dot
    expect(payloadOf(page).count).toBe(1);
  });

  it('disables colour choices the stages did not compute', () => {
    const bare = buildReportHtml(fixtureReportData(binaryTreeNetwork(3), false), reportOptions.defaults(), VIEWER_STUB);
    expect(bare).toMatch(/<option value="water_potential" disabled>/);
    expect(bare).toMatch(/<option value="branch_order" selected>/);
  });
});

describe('viewerPayload', () => {
  it('stores segment ends relative to the stem base as Float32 (IEEE 754 single precision)', () => {
    const net = binaryTreeNetwork(3);
    const p = viewerPayload(fixtureReportData(net), 'radius', 0.6);
    const start = f32(p.start);
    const end = f32(p.end);
    expect(p.origin).toEqual(net.segments[0].start);
    net.segments.forEach((s, i) => {
      for (let k = 0; k < 3; k++) {
        expect(start[3 * i + k]).toBeCloseTo(s.start[k] - p.origin[k], 5);
        expect(end[3 * i + k]).toBeCloseTo(s.end[k] - p.origin[k], 5);
      }
    });
    expect([...f32(p.radius)].map((r) => Math.fround(r))).toEqual(net.segments.map((s) => Math.fround(s.radiusM)));
  });

  it('marks layers without values as missing', () => {
    const p = viewerPayload(fixtureReportData(binaryTreeNetwork(2), false), 'branch_order', 0.6);
    expect(p.layers.find((l) => l.key === 'plc')!.values).toBeUndefined();
    expect(p.layers.find((l) => l.key === 'plc')!.missing).toContain('not computed');
  });
});

describe('reliabilityFromNetwork', () => {
  it('counts flagged segments per reason, most frequent first', () => {
    const net = binaryTreeNetwork(5);
    const r = reliabilityFromNetwork(net);
    const flagged = net.segments.filter((s) => !s.reliable).length;
    expect(r.segments - r.reliable).toBe(flagged);
    expect(r.reasons.reduce((n, x) => n + x.count, 0)).toBe(flagged);
    for (let k = 1; k < r.reasons.length; k++) expect(r.reasons[k - 1].count).toBeGreaterThanOrEqual(r.reasons[k].count);
  });
});

describe('formatValue', () => {
  it('rounds to significant digits and shows a dash for missing values', () => {
    expect(formatValue(0.123456, 3)).toBe('0.123');
    expect(formatValue(1234.5, 3)).toBe('1230');
    expect(formatValue(null)).toBe('–');
    expect(formatValue(NaN)).toBe('–');
  });
});
