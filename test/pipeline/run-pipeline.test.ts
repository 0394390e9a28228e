import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildViewer } from '../../scripts/build-viewer.mjs';
import { encodeLas } from '../../core/io/las-write.js';
import { TREE_OUTPUT_FILES } from '../../core/io/tree-outputs.js';
import { parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { analyseScaling } from '../../core/scaling/analyse.js';
import { analyseHydraulics } from '../../core/hydraulics/analyse.js';
import { resolvePipelineConfig, runPipeline, stableJson, type RunResult } from '../../core/pipeline/run-pipeline.js';
import { PIPELINE } from '../../core/pipeline/stages.js';
import { XylemapError } from '../../core/util/errors.js';
import { binaryTreeNetwork } from '../report/fixtures.js';
import { sampleNetworkCloud } from './fixtures.js';

const EXPONENT = 2.5; // exponent the fixture tree is built with
const TRUNK_RADIUS_M = 0.25; // binaryTreeNetwork's stem-base radius
let dir: string;
let cloudPath: string;
let first: RunResult;

beforeAll(async () => {
  if (!existsSync(join(process.cwd(), 'dist/report-viewer.js'))) await buildViewer();
  dir = mkdtempSync(join(tmpdir(), 'xylemap-pipeline-'));
  cloudPath = join(dir, 'tree.las');
  const cloud = sampleNetworkCloud(binaryTreeNetwork(4, 3, EXPONENT, 11), 3000, 0.001);
  writeFileSync(cloudPath, encodeLas(cloud, { version: '1.4', pointFormat: 6, creation: { day: 1, year: 2026 } }));
  first = await runPipeline({ path: cloudPath, outDir: join(dir, 'out') });
});

function errorOf(p: Promise<unknown>): Promise<XylemapError> {
  return p.then(
    () => {
      throw new Error('expected a XylemapError');
    },
    (e) => {
      if (e instanceof XylemapError) return e;
      throw e;
    },
  );
}

describe('runPipeline', () => {
  it('writes every per-tree output file', () => {
    expect(first.written.map((p) => p.slice(join(dir, 'out').length + 1))).toEqual([...TREE_OUTPUT_FILES]);
    for (const name of TREE_OUTPUT_FILES) expect(existsSync(join(dir, 'out', name))).toBe(true);
  });

  it('records the input SHA-256 (FIPS 180-4, via node:crypto), the tool version and every stage option with defaults', () => {
    const run = JSON.parse(readFileSync(join(dir, 'out', 'run.json'), 'utf8'));
    expect(run.input.sha256).toBe(createHash('sha256').update(readFileSync(cloudPath)).digest('hex'));
    expect(run.tool.version).toBe(JSON.parse(readFileSync(join(process.cwd(), 'package.json'), 'utf8')).version);
    const defaults = resolvePipelineConfig(undefined) as unknown as Record<string, unknown>;
    expect(Object.keys(run.options)).toEqual(PIPELINE.map((s) => s.name));
    for (const s of PIPELINE) expect(run.options[s.name]).toEqual(defaults[s.name]);
    expect(run.timings_ms.total).toBeGreaterThan(0);
  });

  it('recovers the generated stem: DBH = 2 × the stem radius it was built with', () => {
    const s = first.summary as { tree: { dbh_m: number } };
    // Known truth of the generated cloud; 5 % is a loose tolerance for a sampled, noisy surface (common practice, no source).
    expect(Math.abs(s.tree.dbh_m / (2 * TRUNK_RADIUS_M) - 1)).toBeLessThan(0.05);
  });

  it('feeds scaling and hydraulics the network it writes: their blocks equal a rerun of each stage on segments.csv', () => {
    const net = parseSegmentsCsv(readFileSync(join(dir, 'out', 'segments.csv'), 'utf8'));
    const cfg = resolvePipelineConfig(undefined);
    const summary = JSON.parse(readFileSync(join(dir, 'out', 'summary.json'), 'utf8'));
    expect(JSON.parse(stableJson(analyseScaling(net, cfg.scaling).summary))).toEqual(summary.scaling);
    expect(JSON.parse(stableJson(analyseHydraulics(net, cfg.hydraulics).summary))).toEqual(summary.hydraulics);
  });

  it('gives byte-identical outputs on a rerun, except run.json (timings), and reports progress per stage', async () => {
    const stages = new Set<string>();
    const again = await runPipeline({ path: cloudPath }, undefined, { progress: (s) => stages.add(s) });
    for (const s of ['read', 'scaling', 'hydraulics']) expect(stages.has(s)).toBe(true);
    expect(again.written).toEqual([]);
    for (const name of TREE_OUTPUT_FILES) {
      if (name === 'run.json') continue;
      const a = first.outputs[name]!;
      const b = again.outputs[name]!;
      expect(Buffer.from(b).equals(Buffer.from(a)), name).toBe(true);
    }
  });

  it('puts the hydraulics columns into segments.csv and the report', () => {
    const header = readFileSync(join(dir, 'out', 'segments.csv'), 'utf8').split('\n')[0].split(',');
    expect(header).toContain('conduit_diameter_um');
    expect(header).toContain('water_potential_mpa');
    expect(String(first.outputs['report.html'])).toContain('<option value="conduit_diameter">');
  });

  it('rejects a bad option before reading any point, and writes nothing', async () => {
    const out = join(dir, 'bad-option');
    const e = await errorOf(runPipeline({ path: join(dir, 'does-not-exist.las'), outDir: out }, { reconstruct: { band_min_m: -1 } }));
    expect(e.option).toBe('reconstruct.band_min_m');
    expect(existsSync(out)).toBe(false);
  });

  it('rejects an input that is not a point cloud in one line naming the file, and writes nothing', async () => {
    const bad = join(dir, 'notes.las');
    writeFileSync(bad, 'this is not a point cloud\n');
    const out = join(dir, 'bad-input');
    const e = await errorOf(runPipeline({ path: bad, outDir: out }));
    expect(e.oneLine()).toContain(bad);
    expect(existsSync(out)).toBe(false);
  });

});

describe('stableJson', () => {
  it('writes non-finite numbers as null (JSON, RFC 8259, has no NaN or Infinity)', () => {
    expect(stableJson({ a: NaN, b: [Infinity, 1] })).toBe('{\n  "a": null,\n  "b": [\n    null,\n    1\n  ]\n}\n');
  });
});
