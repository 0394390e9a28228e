/**
 * Browser entry of the report's 3D view (bundled with three.js by scripts/build-viewer.mjs and
 * inlined into report.html). Reads the embedded payload, draws the network with WebGL or, when
 * WebGL is unavailable, with a 2D-canvas projection, and wires the colour menu, legend and mouse.
 */
import { categoryColour, cssColour, layerColours, MISSING, rampColour, RAMP } from '../colour.js';
import { FlatView } from './flat-view.js';
import { frameBox, pan, rotate, zoom, type Orbit, type V3 } from '../orbit.js';
import { PAYLOAD_ELEMENT_ID, type ViewerLayer, type ViewerPayload } from '../payload.js';
import { pickSegment } from '../pick.js';
import type { NetworkView, ViewGeometry } from '../view.js';
import { WebGlView, webGl2Available } from './webgl-view.js';

interface ViewerState {
  mode: 'webgl' | '2d';
  ready: boolean;
  colourBy: string;
  renders: number;
  /** ms from navigation start to the first drawn frame. */
  firstFrameMs: number;
  /** ms from navigation start at each boot step (for load-time measurements). */
  marks: Record<string, number>;
  /** Index of the segment last clicked, −1 for none. */
  picked: number;
  setColourBy(key: string): void;
  /** Pick the segment at canvas pixel (x, y) as a click does; returns its index or −1. */
  pickAt(x: number, y: number): number;
}

declare global {
  interface Window {
    __xylemap?: ViewerState;
  }
}

const BACKGROUND = '#f3f1ea';

function decode(b64: string): Float32Array {
  const bin = atob(b64);
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return new Float32Array(bytes.buffer);
}

function fmt(v: number): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return v.toExponential(2);
  return String(Number(v.toPrecision(3)));
}

function legendHtml(layer: ViewerLayer, range: [number, number] | null, values: Float32Array): string {
  const unit = layer.unit ? ` (${layer.unit})` : '';
  if (layer.kind === 'categorical') {
    const used = new Set<number>();
    for (let i = 0; i < values.length; i++) used.add(values[i]);
    const items = (layer.categories ?? [])
      .map((name, k) => (used.has(k) ? `<li><span class="swatch" style="background:${cssColour(categoryColour(k, layer.categories?.length))}"></span>${name}</li>` : ''))
      .join('');
    return `<div class="legend-title">${layer.label}${unit}</div><ul class="legend-cats">${items}</ul>`;
  }
  if (!range) return `<div class="legend-title">${layer.label}${unit}</div><p>no values</p>`;
  const stops = RAMP.map((_, k) => cssColour(rampColour(layer.reverse ? 1 - k / (RAMP.length - 1) : k / (RAMP.length - 1))));
  const mid = layer.log ? Math.sqrt(range[0] * range[1]) : (range[0] + range[1]) / 2;
  return (
    `<div class="legend-title">${layer.label}${unit}${layer.log ? ', log scale' : ''}</div>` +
    `<div class="legend-ramp" style="background:linear-gradient(to right,${stops.join(',')})"></div>` +
    `<div class="legend-ticks"><span>${fmt(range[0])}</span><span>${fmt(mid)}</span><span>${fmt(range[1])}</span></div>` +
    `<div class="legend-missing"><span class="swatch" style="background:${cssColour(MISSING)}"></span>no value</div>`
  );
}

function boot(): void {
  const marks: Record<string, number> = { boot: performance.now() };
  const el = document.getElementById(PAYLOAD_ELEMENT_ID);
  const canvas = document.getElementById('viewer-canvas') as HTMLCanvasElement | null;
  if (!el || !canvas) return;
  const payload = JSON.parse(el.textContent ?? '{}') as ViewerPayload;
  const geometry: ViewGeometry = {
    count: payload.count,
    start: decode(payload.start),
    end: decode(payload.end),
    radius: decode(payload.radius),
  };
  const min: V3 = [Infinity, Infinity, Infinity];
  const max: V3 = [-Infinity, -Infinity, -Infinity];
  for (const p of [geometry.start, geometry.end]) {
    for (let i = 0; i < p.length; i++) {
      const k = i % 3;
      if (p[i] < min[k]) min[k] = p[i];
      if (p[i] > max[k]) max[k] = p[i];
    }
  }
  marks.decoded = performance.now();
  const home = frameBox(min, max);
  let orbit: Orbit = home;

  // `#view=2d` in the URL forces the fallback (to compare, or on a browser with a broken WebGL).
  const force2d = /(^|[#&])view=2d\b/.test(location.hash.slice(1));
  let view: NetworkView;
  try {
    view = !force2d && webGl2Available() ? new WebGlView(canvas, geometry, BACKGROUND) : new FlatView(canvas, geometry, BACKGROUND);
  } catch {
    view = new FlatView(canvas, geometry, BACKGROUND);
  }
  marks.view = performance.now();
  const modeEl = document.getElementById('viewer-mode');
  if (modeEl) modeEl.textContent = view.mode === 'webgl' ? 'WebGL view' : 'WebGL unavailable: 2D projection';

  const layers = new Map(payload.layers.map((l) => [l.key, l]));
  const decoded = new Map<string, Float32Array>();
  const colours = new Float32Array(3 * payload.count);
  const legend = document.getElementById('viewer-legend');
  const select = document.getElementById('colour-by') as HTMLSelectElement | null;

  let pending = false;
  const state: ViewerState = {
    mode: view.mode,
    ready: false,
    colourBy: '',
    renders: 0,
    firstFrameMs: NaN,
    marks,
    picked: -1,
    pickAt(x: number, y: number): number {
      const rect = canvas!.getBoundingClientRect();
      const i = pickSegment(geometry, orbit, rect.width, rect.height, x, y);
      state.picked = i;
      showReadout(i);
      return i;
    },
    setColourBy(key: string) {
      const layer = layers.get(key);
      if (!layer || !layer.values) return;
      let values = decoded.get(key);
      if (!values) decoded.set(key, (values = decode(layer.values)));
      const range = layerColours(values, { kind: layer.kind, log: layer.log, reverse: layer.reverse, categoryCount: layer.categories?.length }, colours);
      view.setColours(colours);
      if (legend) legend.innerHTML = legendHtml(layer, range, values);
      if (select && select.value !== key) select.value = key;
      state.colourBy = key;
      showReadout(state.picked);
      draw();
    },
  };

  const segmentIds = decode(payload.segmentIds);
  const reasonIndex = decode(payload.reasonIndex);
  const readout = document.getElementById('viewer-readout');
  function showReadout(i: number): void {
    if (!readout) return;
    if (i < 0) {
      readout.textContent = 'click a segment for its values';
      return;
    }
    const parts = [`segment ${segmentIds[i]}`, `radius ${fmt(geometry.radius[i])} m`];
    const layer = layers.get(state.colourBy);
    const values = decoded.get(state.colourBy);
    if (layer && values && layer.key !== 'radius') {
      const v = values[i];
      const text = layer.kind === 'categorical' ? (layer.categories?.[v] ?? String(v)) : Number.isFinite(v) ? `${fmt(v)}${layer.unit ? ` ${layer.unit}` : ''}` : 'no value';
      parts.push(`${layer.label}: ${text}`);
    }
    parts.push(reasonIndex[i] >= 0 ? `flagged: ${payload.reasons[reasonIndex[i]]}` : 'reliable');
    readout.textContent = parts.join(' · ');
  }
  window.__xylemap = state;

  function frame(): void {
    pending = false;
    const rect = canvas!.getBoundingClientRect();
    view.render(orbit, Math.max(1, rect.width), Math.max(1, rect.height), payload.minDrawRadiusPx);
    state.renders++;
    if (!state.ready) {
      state.firstFrameMs = performance.now();
      state.ready = true;
      document.body.dataset.viewerReady = 'true';
    }
  }
  function draw(): void {
    if (pending) return;
    pending = true;
    requestAnimationFrame(frame);
  }

  select?.addEventListener('change', () => state.setColourBy(select.value));
  document.getElementById('viewer-reset')?.addEventListener('click', () => {
    orbit = home;
    draw();
  });

  // Mouse: left-drag rotates, right- or shift-drag pans, the wheel zooms, double-click resets.
  let drag: { x: number; y: number; panning: boolean } | null = null;
  canvas.addEventListener('contextmenu', (e) => e.preventDefault());
  canvas.addEventListener('pointerdown', (e) => {
    drag = { x: e.clientX, y: e.clientY, panning: e.button === 2 || e.shiftKey };
    canvas.setPointerCapture(e.pointerId);
  });
  canvas.addEventListener('pointermove', (e) => {
    if (!drag) return;
    const dx = e.clientX - drag.x;
    const dy = e.clientY - drag.y;
    drag.x = e.clientX;
    drag.y = e.clientY;
    orbit = drag.panning ? pan(orbit, dx, dy, canvas.getBoundingClientRect().height) : rotate(orbit, dx, dy);
    draw();
  });
  let downAt: { x: number; y: number } | null = null;
  canvas.addEventListener('pointerdown', (e) => {
    downAt = { x: e.clientX, y: e.clientY };
  });
  const stop = (): void => {
    drag = null;
  };
  canvas.addEventListener('pointerup', (e) => {
    // A click (pointer moved < 4 px) picks; a drag only moves the camera.
    if (downAt && Math.hypot(e.clientX - downAt.x, e.clientY - downAt.y) < 4) {
      const rect = canvas.getBoundingClientRect();
      state.pickAt(e.clientX - rect.left, e.clientY - rect.top);
    }
    downAt = null;
    stop();
  });
  canvas.addEventListener('pointercancel', stop);
  canvas.addEventListener(
    'wheel',
    (e) => {
      e.preventDefault();
      orbit = zoom(orbit, Math.exp(Math.max(-1, Math.min(1, e.deltaY * 0.0015))));
      draw();
    },
    { passive: false },
  );
  canvas.addEventListener('dblclick', () => {
    orbit = home;
    draw();
  });
  window.addEventListener('resize', draw);

  const initial = layers.get(payload.initial)?.values ? payload.initial : 'branch_order';
  state.setColourBy(initial);
}

if (document.readyState === 'loading') document.addEventListener('DOMContentLoaded', boot);
else boot();
