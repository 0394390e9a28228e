import type { OptionValues } from '../options/declare.js';
import { conduitPlot, exponentPlot, radiusOrderPlot, taperPlot, waterPotentialPlot } from './plots/figures.js';
import { escapeXml } from './plots/svg.js';
import { networkProfiles, type OrderRow } from './profiles.js';
import { REPORT_CAUTION, type KeyFigure, type ReportData, type ReliabilityView } from './report-data.js';
import type { reportOptions } from './options.js';
import { REPORT_CSS } from './style.js';
import { viewerPayload } from './viewer-payload.js';
import { PAYLOAD_ELEMENT_ID } from './viewer/payload.js';

export type ReportOptionValues = OptionValues<typeof reportOptions.specs>;

/** What the reliability reason codes mean (codes from the reconstruction; unknown codes are shown as they are). */
export const REASON_MEANINGS: Record<string, string> = {
  few_points: 'too few points to fit a cylinder',
  thin_arc: 'points cover too little of the circumference',
  below_noise: 'radius below the scan noise level',
  taper_outlier: 'radius out of line with its parent and children',
};

/** Colour-menu entries, in menu order, with the labels and units shown. */
const COLOUR_MENU: { key: string; label: string }[] = [
  { key: 'branch_order', label: 'branching order' },
  { key: 'radius', label: 'radius (m)' },
  { key: 'reliability', label: 'reliability flag' },
  { key: 'conduit_diameter', label: 'conduit diameter (µm)' },
  { key: 'water_potential', label: 'water potential (MPa)' },
  { key: 'plc', label: 'PLC (%)' },
];

/** Number with `digits` significant digits, no exponent for ordinary magnitudes. */
export function formatValue(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '–';
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(digits - 1);
  return String(Number(v.toPrecision(digits)));
}

function keyFiguresHtml(figures: KeyFigure[]): string {
  const cards = figures.map((f) => {
    const interval = f.interval ? `<div class="interval">${formatValue(f.interval[0], f.digits)} – ${formatValue(f.interval[1], f.digits)}</div>` : '';
    const note = f.note ? `<div class="note">${escapeXml(f.note)}</div>` : '';
    const unit = f.unit && f.value !== null ? `<span class="unit">${escapeXml(f.unit)}</span>` : '';
    return `<div class="figure" data-figure="${escapeXml(f.id)}"><div class="label">${escapeXml(f.label)}</div><div class="value">${formatValue(f.value, f.digits)}${unit}</div>${interval}${note}</div>`;
  });
  return `<section id="key-figures"><h2>Key figures</h2><div class="figures">${cards.join('')}</div></section>`;
}

function viewerHtml(data: ReportData, initial: string): string {
  const available = new Set<string>(['branch_order', 'radius', 'reliability']);
  if (data.layers.conduitDiameterUm) available.add('conduit_diameter');
  if (data.layers.waterPotentialMPa) available.add('water_potential');
  if (data.layers.plcPercent) available.add('plc');
  const chosen = available.has(initial) ? initial : 'branch_order';
  const options = COLOUR_MENU.map(
    (m) =>
      `<option value="${m.key}"${m.key === chosen ? ' selected' : ''}${available.has(m.key) ? '' : ' disabled'}>${escapeXml(m.label)}${available.has(m.key) ? '' : ' – not computed'}</option>`,
  ).join('');
  return (
    `<section id="network-view"><h2>Segment network (${data.network.segments.length} segments)</h2><div class="viewer" id="viewer">` +
    `<div class="viewer-bar"><label>Colour by <select id="colour-by">${options}</select></label><button id="viewer-reset" type="button">Reset view</button>` +
    `<span class="hint">drag: rotate · right- or shift-drag: pan · wheel: zoom · click: values · double-click: reset</span></div>` +
    `<canvas id="viewer-canvas"></canvas><div id="viewer-legend"></div><p id="viewer-readout">click a segment for its values</p><p id="viewer-mode"></p></div></section>`
  );
}

function orderTableHtml(rows: OrderRow[]): string {
  const body = rows
    .map(
      (r) =>
        `<tr><td>${r.order}</td><td>${r.branches}</td><td>${r.segments}</td><td>${formatValue(r.lengthM)}</td><td>${formatValue(r.volumeM3)}</td><td>${formatValue(r.meanRadiusM)}</td><td>${formatValue(r.maxRadiusM)}</td><td>${formatValue(100 * r.reliableShare, 3)}</td></tr>`,
    )
    .join('');
  return (
    `<section id="by-order"><h2>By branching order</h2><table class="order-table"><thead><tr><th>order</th><th>branches</th><th>segments</th><th>length (m)</th><th>volume (m³)</th><th>mean radius (m)</th><th>max radius (m)</th><th>reliable (%)</th></tr></thead>` +
    `<tbody>${body}</tbody></table><p class="note">Order: centrifugal branching order (trunk 0). Mean radius is length-weighted.</p></section>`
  );
}

function reliabilityHtml(r: ReliabilityView): string {
  const flagged = r.segments - r.reliable;
  const rows = r.reasons
    .map((x) => `<tr><td class="key">${escapeXml(x.reason)}</td><td class="text">${escapeXml(REASON_MEANINGS[x.reason] ?? '')}</td><td>${x.count}</td></tr>`)
    .join('');
  const table = rows
    ? `<table class="reliability-table"><thead><tr><th class="key">reason</th><th>meaning</th><th>segments</th></tr></thead><tbody>${rows}</tbody></table>`
    : '<p>No segment was flagged.</p>';
  const notes = r.notes.map((n) => `<li>${escapeXml(n)}</li>`).join('');
  return (
    `<section id="reliability"><h2>Reliability</h2><p>${r.reliable} of ${r.segments} segments are reliable; ${flagged} flagged segments are excluded from the exponent statistics and shown in the reliability colouring.</p>` +
    `${table}${notes ? `<ul class="notes">${notes}</ul>` : ''}</section>`
  );
}

function optionsHtml(options: Record<string, Record<string, unknown>>): string {
  const blocks = Object.entries(options).map(([stage, values]) => {
    const rows = Object.entries(values)
      .map(([k, v]) => `<tr><td class="key">${escapeXml(k)}</td><td class="text">${escapeXml(typeof v === 'string' ? JSON.stringify(v) : String(v))}</td></tr>`)
      .join('');
    return `<table class="options-table"><thead><tr><th class="key" colspan="2">${escapeXml(stage)}</th></tr></thead><tbody>${rows}</tbody></table>`;
  });
  return `<section id="options"><h2>Options used</h2><div class="options">${blocks.join('')}</div></section>`;
}

/** Make text safe inside an inline <script> element. */
function scriptSafe(text: string): string {
  return text.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
}

/**
 * Build the self-contained report.html: everything (styles, data, the 3D viewer with three.js)
 * is inlined, and a Content-Security-Policy forbids any network request. Deterministic: the same
 * data gives the same bytes (no dates, no timings).
 * @param data gathered stage results
 * @param options resolved `report` options
 * @param viewerScript the bundled viewer (from `readViewerBundle()`)
 */
export function buildReportHtml(data: ReportData, options: ReportOptionValues, viewerScript: string): string {
  const profiles = networkProfiles(data.network);
  const payload = viewerPayload(data, options.colour_by, options.min_draw_radius_px);
  const title = data.title || data.source.file;
  const plots = [
    exponentPlot(data.exponent, options.histogram_bins),
    radiusOrderPlot(data.network),
    taperPlot(data.network, profiles),
    conduitPlot(profiles, data.layers.conduitDiameterUm),
    waterPotentialPlot(profiles, data.layers.waterPotentialMPa),
  ];
  const exponentNote = data.exponent.excludedNote ? `<p class="note">${escapeXml(data.exponent.excludedNote)}</p>` : '';
  const warnings = data.warnings.length
    ? `<section id="warnings"><h2>Warnings</h2><ul class="warnings">${data.warnings.map((w) => `<li>${escapeXml(w)}</li>`).join('')}</ul></section>`
    : '';
  const sha = data.source.sha256 ? ` · sha256 ${escapeXml(data.source.sha256.slice(0, 16))}…` : '';
  return [
    '<!DOCTYPE html>',
    '<html lang="en"><head><meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:">`,
    '<meta name="viewport" content="width=device-width,initial-scale=1">',
    `<title>${escapeXml(title)} – xylemap report</title>`,
    `<style>${REPORT_CSS}</style></head><body>`,
    `<header class="top"><h1>${escapeXml(title)}</h1><div class="meta">input ${escapeXml(data.source.file)}${sha} · xylemap ${escapeXml(data.source.version)}</div></header>`,
    '<main>',
    `<aside class="caution" id="caution"><strong>Caution.</strong> ${escapeXml(REPORT_CAUTION)}</aside>`,
    keyFiguresHtml(data.keyFigures),
    viewerHtml(data, options.colour_by),
    `<section id="plots"><h2>Plots</h2><div class="plots">${plots.join('')}</div>${exponentNote}</section>`,
    orderTableHtml(profiles.byOrder),
    reliabilityHtml(data.reliability),
    warnings,
    optionsHtml(data.options),
    '</main>',
    `<footer>Made by xylemap ${escapeXml(data.source.version)}. ${escapeXml(REPORT_CAUTION)}</footer>`,
    `<script type="application/json" id="${PAYLOAD_ELEMENT_ID}">${JSON.stringify(payload).replace(/</g, '\\u003c')}</script>`,
    `<script>${scriptSafe(viewerScript)}</script>`,
    '</body></html>',
    '',
  ].join('\n');
}
