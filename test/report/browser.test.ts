import { existsSync, mkdirSync, statSync, writeFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';
import { buildViewer } from '../../scripts/build-viewer.mjs';
import { buildReportHtml } from '../../core/report/build-report.js';
import { reportOptions } from '../../core/report/options.js';
import { binaryTreeNetwork, fixtureReportData } from './fixtures.js';

/**
 * The report in a real browser: Debian chromium, headless, driven by playwright-core.
 * Checks the page's own behaviour (no console errors, no network, drawing, colour switching,
 * plot marks); the 20 000-segment load time is printed, not asserted.
 */
const CHROMIUM = '/usr/bin/chromium';
const ARTEFACTS = join(process.cwd(), 'test-artefacts');
const BACKGROUND = [243, 241, 234]; // #f3f1ea, the viewer's clear colour (core/report/viewer/main.ts)

let browser: Browser;
let viewerJs: string;
let reportPath: string;
/** The fixture report, opened once and shared by the tests that only look at it or act on it in turn. */
let main: Opened;

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`Debian chromium not found at ${CHROMIUM}: install it with \`apt-get install -y chromium\` (.ci/run does this)`);
  }
  mkdirSync(ARTEFACTS, { recursive: true });
  // Bundle the viewer from the current sources, so the test never sees a stale dist/.
  viewerJs = readFileSync(await buildViewer(join(ARTEFACTS, 'report-viewer.js')), 'utf8');
  const html = buildReportHtml(fixtureReportData(binaryTreeNetwork(7, 3)), reportOptions.defaults(), viewerJs);
  reportPath = join(ARTEFACTS, 'report-fixture.html');
  writeFileSync(reportPath, html);
  browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
  });
  main = await open(reportPath);
});

afterAll(async () => {
  await browser?.close();
});

interface Opened {
  page: Page;
  consoleErrors: string[];
  blocked: string[];
  requested: string[];
}

/** Open a report with every request routed: file: and data: URLs pass, anything else is blocked and recorded. */
async function open(path: string, hash = ''): Promise<Opened> {
  const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  const consoleErrors: string[] = [];
  const blocked: string[] = [];
  const requested: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') consoleErrors.push(m.text());
  });
  page.on('pageerror', (e) => consoleErrors.push(`pageerror: ${e.message}`));
  await page.route('**/*', (route) => {
    const url = route.request().url();
    requested.push(url);
    if (url.startsWith('file:') || url.startsWith('data:')) return route.continue();
    blocked.push(url);
    return route.abort();
  });
  await page.goto(`file://${path}${hash}`);
  await page.waitForFunction(() => window.__xylemap?.ready === true, null, { timeout: 30_000 });
  return { page, consoleErrors, blocked, requested };
}

/** Canvas pixels as RGBA, read through a 2D copy (works for WebGL with preserveDrawingBuffer and for the 2D fallback). */
async function canvasPixels(page: Page): Promise<number[]> {
  return page.evaluate(() => {
    const src = document.getElementById('viewer-canvas') as HTMLCanvasElement;
    const c = document.createElement('canvas');
    c.width = 320;
    c.height = Math.round((320 * src.height) / src.width);
    const ctx = c.getContext('2d')!;
    ctx.drawImage(src, 0, 0, c.width, c.height);
    return Array.from(ctx.getImageData(0, 0, c.width, c.height).data);
  });
}

function countNonBackground(px: number[]): number {
  let n = 0;
  for (let i = 0; i < px.length; i += 4) {
    const d = Math.abs(px[i] - BACKGROUND[0]) + Math.abs(px[i + 1] - BACKGROUND[1]) + Math.abs(px[i + 2] - BACKGROUND[2]);
    if (d > 30) n++;
  }
  return n;
}

function countChanged(a: number[], b: number[]): number {
  let n = 0;
  for (let i = 0; i < a.length; i += 4) if (Math.abs(a[i] - b[i]) + Math.abs(a[i + 1] - b[i + 1]) + Math.abs(a[i + 2] - b[i + 2]) > 30) n++;
  return n;
}

async function waitForRender(page: Page, after: number): Promise<void> {
  await page.waitForFunction((n) => (window.__xylemap?.renders ?? 0) > n, after, { timeout: 10_000 });
}

describe('buildReportHtml in headless chromium', () => {
  it('opens with no console errors and makes no network requests', async () => {
    const { page, consoleErrors, blocked, requested } = main;
    expect(consoleErrors).toEqual([]);
    expect(blocked).toEqual([]);
    expect(requested.length).toBeGreaterThan(0);
    expect(requested.every((u) => u.startsWith('file:') || u.startsWith('data:'))).toBe(true);
    console.log(`3D view mode in headless chromium: ${await page.evaluate(() => window.__xylemap!.mode)}`);
  });

  it('draws non-background pixels in the 3D canvas, with WebGL and with the 2D fallback', async () => {
    for (const hash of ['', '#view=2d']) {
      const { page, consoleErrors } = hash ? await open(reportPath, hash) : main;
      const mode = await page.evaluate(() => window.__xylemap!.mode);
      if (hash) expect(mode).toBe('2d');
      const px = await canvasPixels(page);
      const share = countNonBackground(px) / (px.length / 4);
      console.log(`mode ${mode}: ${(100 * share).toFixed(1)} % of canvas pixels drawn`);
      // The fixture tree fills a good part of the frame; 1 % is a loose floor (common practice, no source).
      expect(share).toBeGreaterThan(0.01);
      expect(consoleErrors).toEqual([]);
      if (hash) await page.close();
    }
  });

  it('changes the picture and the legend when the colour attribute is switched', async () => {
    const { page, consoleErrors } = main;
    const before = await canvasPixels(page);
    const legendBefore = await page.textContent('#viewer-legend');
    for (const key of ['radius', 'reliability', 'conduit_diameter', 'water_potential', 'plc']) {
      const renders = await page.evaluate(() => window.__xylemap!.renders);
      await page.selectOption('#colour-by', key);
      await waitForRender(page, renders);
      expect(await page.evaluate(() => window.__xylemap!.colourBy)).toBe(key);
    }
    const renders = await page.evaluate(() => window.__xylemap!.renders);
    await page.selectOption('#colour-by', 'radius');
    await waitForRender(page, renders);
    const after = await canvasPixels(page);
    const changed = countChanged(before, after);
    expect(changed).toBeGreaterThan(50);
    const legendAfter = await page.textContent('#viewer-legend');
    expect(legendAfter).not.toBe(legendBefore);
    expect(legendAfter).toContain('radius (m)');
    expect(consoleErrors).toEqual([]);
  });

  it('shows the values of a segment clicked on a drawn pixel, and nothing for the background', async () => {
    const { page } = main;
    const px = await canvasPixels(page);
    const box = (await page.locator('#viewer-canvas').boundingBox())!;
    const w = 320;
    const h = px.length / 4 / w;
    let hit: [number, number] | null = null;
    for (let k = 0; k < px.length / 4 && !hit; k++) {
      const d = Math.abs(px[4 * k] - BACKGROUND[0]) + Math.abs(px[4 * k + 1] - BACKGROUND[1]) + Math.abs(px[4 * k + 2] - BACKGROUND[2]);
      if (d > 60) hit = [((k % w) + 0.5) * (box.width / w), (Math.floor(k / w) + 0.5) * (box.height / h)];
    }
    expect(hit).not.toBeNull();
    await page.mouse.click(box.x + hit![0], box.y + hit![1]);
    expect(await page.evaluate(() => window.__xylemap!.picked)).toBeGreaterThanOrEqual(0);
    expect(await page.textContent('#viewer-readout')).toMatch(/^segment \d+ · radius /);
    await page.mouse.click(box.x + 3, box.y + 3);
    expect(await page.evaluate(() => window.__xylemap!.picked)).toBe(-1);
  });

  it('rotates the view when the canvas is dragged', async () => {
    const { page } = main;
    const before = await canvasPixels(page);
    const box = (await page.locator('#viewer-canvas').boundingBox())!;
    const renders = await page.evaluate(() => window.__xylemap!.renders);
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width / 2 + 120, box.y + box.height / 2, { steps: 4 });
    await page.mouse.up();
    await waitForRender(page, renders);
    expect(countChanged(before, await canvasPixels(page))).toBeGreaterThan(50);
    // Back to the opening view for the screenshot.
    const r2 = await page.evaluate(() => window.__xylemap!.renders);
    await page.click('#viewer-reset');
    await waitForRender(page, r2);
  });

  it('shows marks in every plot, the theory lines, and the caution', async () => {
    const { page } = main;
    const marks = await page.$$eval('svg.plot-svg', (svgs) => svgs.map((s) => [s.getAttribute('data-plot'), s.querySelectorAll('.mark').length]));
    expect(marks.map((m) => m[0])).toEqual(['exponent', 'radius-order', 'taper', 'conduit', 'water-potential']);
    for (const [, n] of marks) expect(n).toBeGreaterThan(0);
    // da Vinci a = 2 and Murray a = 3 (GLOSSARY, area-preservation exponent) are drawn on the histogram.
    const refs = await page.$$eval('svg[data-plot="exponent"] .ref text', (t) => t.map((x) => x.textContent));
    expect(refs).toEqual(['da Vinci a = 2', 'Murray a = 3']);
    expect(await page.textContent('#caution')).toContain('not a tree-safety assessment');
    await page.screenshot({ path: join(ARTEFACTS, 'report.png'), fullPage: true });
    const png = readFileSync(join(ARTEFACTS, 'report.png'));
    expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]); // PNG signature (ISO/IEC 15948)
    expect(statSync(join(ARTEFACTS, 'report.png')).size).toBeGreaterThan(10_000);
  });

  it('loads a 20 000-segment report and draws it (load time printed, not asserted)', async () => {
    const network = binaryTreeNetwork(11, 5);
    expect(network.segments.length).toBeGreaterThan(20_000);
    const t0 = performance.now();
    const html = buildReportHtml(fixtureReportData(network), reportOptions.defaults(), viewerJs);
    const buildMs = performance.now() - t0;
    const path = join(ARTEFACTS, 'report-20k.html');
    writeFileSync(path, html);
    for (const hash of ['', '#view=2d']) {
      const t1 = performance.now();
      const { page, consoleErrors } = await open(path, hash);
      // Reading the canvas back waits until the first frame is really rasterised (WebGL draws asynchronously).
      const state = await page.evaluate(() => {
        const c = document.createElement('canvas');
        c.getContext('2d')!.drawImage(document.getElementById('viewer-canvas') as HTMLCanvasElement, 0, 0, 4, 4);
        return { mode: window.__xylemap!.mode, firstFrameMs: window.__xylemap!.firstFrameMs, drawnMs: performance.now() };
      });
      const wallMs = performance.now() - t1;
      console.log(
        `20k report: ${network.segments.length} segments, ${(html.length / 1e6).toFixed(2)} MB; built in ${buildMs.toFixed(0)} ms; ` +
          `first frame issued ${state.firstFrameMs.toFixed(0)} ms and pixels readable ${state.drawnMs.toFixed(0)} ms after navigation start (${state.mode}); ` +
          `wall time from newPage to readable pixels ${wallMs.toFixed(0)} ms`,
      );
      expect(countNonBackground(await canvasPixels(page)) > 0).toBe(true);
      expect(consoleErrors).toEqual([]);
      await page.close();
    }
  });
});
