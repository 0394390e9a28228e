import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { TreeJob, TreeOutcome } from '../../core/batch/run-batch.js';
import { batchConfig, mergeBatchFolders, runBatchFolder, treeConfig } from '../../core/io/batch-driver.js';
import { hashFile } from '../../core/io/tree-outputs.js';
import { XylemapError } from '../../core/util/errors.js';
import { fakeSummary } from './fixtures.js';

/**
 * A stand-in for the pipeline (the batch machinery is under test, not the reconstruction): the
 * "cloud" is a small JSON file with the tree's key figures; the processor writes summary.json and a
 * run.json with the input sha256 and options, as the real pipeline does.
 */
function fakeProcessor(calls: string[]): (job: TreeJob) => Promise<TreeOutcome> {
  return async (job) => {
    calls.push(job.treeId);
    const f = JSON.parse(readFileSync(job.path, 'utf8')) as { dbh: number; a: number; k: number; fail?: boolean };
    if (f.fail) return { ok: false, error: `${job.path}: no stem found` };
    mkdirSync(job.outDir, { recursive: true });
    writeFileSync(join(job.outDir, 'summary.json'), JSON.stringify(fakeSummary(f.dbh, f.a, f.k)));
    const run = { input: { sha256: hashFile(job.path).sha256 }, options: job.config, outputs: ['summary.json', 'run.json'] };
    writeFileSync(join(job.outDir, 'run.json'), JSON.stringify(run));
    return { ok: true };
  };
}

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

/** A campaign folder with 12 trees of three species on exact K–DBH power laws, plus an inventory. */
function campaign(): { dir: string; manifest: string; inventory: string } {
  const dir = mkdtempSync(join(tmpdir(), 'xylemap-batch-'));
  made.push(dir);
  mkdirSync(join(dir, 'clouds'));
  const rows = ['tree_id,species,file,field_dbh_m,plot,preset,notes'];
  const species = [
    ['oak', 2, 2.5, 2.1, 'ring-porous'],
    ['beech', 1.5, 2.3, 2.4, 'diffuse-porous'],
    ['spruce', 1, 2.0, 2.8, 'conifer'],
  ] as const;
  let i = 0;
  for (const [name, c, d, a, preset] of species) {
    for (let j = 0; j < 4; j++, i++) {
      const dbh = 0.15 + 0.1 * j + 0.01 * i;
      writeFileSync(join(dir, 'clouds', `${name}-${j}.json`), JSON.stringify({ dbh, a: a + 0.05 * j, k: c * Math.pow(dbh, d) }));
      rows.push(`${name}-${j},${name},clouds/${name}-${j}.json,${dbh.toFixed(3)},P${j % 2},${j === 0 ? preset : ''},`);
    }
  }
  const manifest = join(dir, 'manifest.csv');
  writeFileSync(manifest, rows.join('\n') + '\n');
  const inventory = join(dir, 'plots.csv');
  writeFileSync(inventory, 'plot_id,plot_area_m2,species,dbh_m\nP0,400,oak,0.3\nP0,400,birch,0.25\nP1,600,spruce,0.9\nP1,600,beech,0.2\n');
  return { dir, manifest, inventory };
}

const fast = { batch: { permutation_replicates: 499, bootstrap_replicates: 300 } };
const TABLES = ['stand.csv', 'species.csv', 'species-pairs.csv', 'species.json', 'stand.json', 'failures.csv'];

describe('runBatchFolder', () => {
  it('processes every tree into trees/<tree_id>/ and writes the stand, species and plot tables', async () => {
    const c = campaign();
    const out = join(c.dir, 'out');
    const calls: string[] = [];
    const r = await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, inventoryPath: c.inventory, processTree: fakeProcessor(calls) });
    expect(r.counts).toEqual({ total: 12, done: 12, skipped: 0, failed: 0 });
    for (const f of [...TABLES, 'plots.csv', 'stems.csv', 'batch.json']) expect(existsSync(join(out, f))).toBe(true);
    expect(existsSync(join(out, 'trees', 'oak-0', 'summary.json'))).toBe(true);
    const stand = readFileSync(join(out, 'stand.csv'), 'utf8').trim().split('\n');
    expect(stand).toHaveLength(13);
    const plots = readFileSync(join(out, 'plots.csv'), 'utf8');
    expect(plots).toContain('P0,400,2,1,1,0,');
    const species = JSON.parse(readFileSync(join(out, 'species.json'), 'utf8'));
    expect(species.species.find((s: { species: string }) => s.species === 'oak').conductance_fit.d).toBeCloseTo(2.5, 10);
  });
  it('gives each tree the manifest preset as hydraulics.preset', async () => {
    const c = campaign();
    const configs = new Map<string, unknown>();
    await runBatchFolder({
      manifestPath: c.manifest,
      outDir: join(c.dir, 'out'),
      workers: 1,
      rawConfig: fast,
      processTree: async (j) => {
        configs.set(j.treeId, j.config);
        return fakeProcessor([])(j);
      },
    });
    expect((configs.get('oak-0') as { hydraulics: { preset: string } }).hydraulics.preset).toBe('ring-porous');
    expect((configs.get('spruce-0') as { hydraulics: { preset: string } }).hydraulics.preset).toBe('conifer');
    expect((configs.get('oak-1') as { hydraulics: { preset: string } }).hydraulics.preset).toBe('diffuse-porous');
  });
  it('resumes: skips unchanged trees, reruns a tree whose input changed, and all trees when options change', async () => {
    const c = campaign();
    const out = join(c.dir, 'out');
    await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, processTree: fakeProcessor([]) });
    const again: string[] = [];
    const r2 = await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, processTree: fakeProcessor(again) });
    expect(again).toEqual([]);
    expect(r2.counts.skipped).toBe(12);
    writeFileSync(join(c.dir, 'clouds', 'beech-2.json'), JSON.stringify({ dbh: 0.5, a: 2.5, k: 1 }));
    const changed: string[] = [];
    await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, processTree: fakeProcessor(changed) });
    expect(changed).toEqual(['beech-2']);
    const optionCalls: string[] = [];
    await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: { ...fast, scaling: { seed: 99 } }, processTree: fakeProcessor(optionCalls) });
    expect(optionCalls).toHaveLength(12);
  });
  it('records a failed tree in failures.csv and batch.json and finishes the others', async () => {
    const c = campaign();
    writeFileSync(join(c.dir, 'clouds', 'oak-3.json'), JSON.stringify({ dbh: 1, a: 2, k: 1, fail: true }));
    const out = join(c.dir, 'out');
    const r = await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, processTree: fakeProcessor([]) });
    expect(r.counts).toMatchObject({ done: 11, failed: 1 });
    expect(readFileSync(join(out, 'failures.csv'), 'utf8')).toContain('oak-3,oak,clouds/oak-3.json,');
    expect(readFileSync(join(out, 'stand.csv'), 'utf8')).not.toContain('oak-3');
  });
  it('checks the whole manifest before any tree: one error lists every bad row, nothing is processed or written', async () => {
    const c = campaign();
    writeFileSync(c.manifest, readFileSync(c.manifest, 'utf8') + 'oak-0,oak,clouds/none.json,,,,\nx,oak,clouds/oak-1.json,,,tropical,\n');
    const calls: string[] = [];
    const out = join(c.dir, 'out');
    const err = await runBatchFolder({ manifestPath: c.manifest, outDir: out, workers: 2, rawConfig: fast, processTree: fakeProcessor(calls) }).catch((e) => e);
    expect(err).toBeInstanceOf(XylemapError);
    expect(err.message).toContain('line 14: duplicate tree_id "oak-0"');
    expect(err.message).toContain('line 14: file not found: clouds/none.json');
    expect(err.message).toContain('line 15: unknown preset "tropical"');
    expect(calls).toEqual([]);
    expect(existsSync(out)).toBe(false);
  });
  it('rejects an inventory in centimetres and a bad configuration before any tree', async () => {
    const c = campaign();
    writeFileSync(c.inventory, 'plot_id,plot_area_m2,species,dbh_m\nP0,400,oak,30\nP0,400,oak,45\n');
    const calls: string[] = [];
    const bad = await runBatchFolder({ manifestPath: c.manifest, outDir: join(c.dir, 'o'), workers: 1, rawConfig: fast, inventoryPath: c.inventory, processTree: fakeProcessor(calls) }).catch((e) => e);
    expect(bad).toBeInstanceOf(XylemapError);
    expect(bad.oneLine()).toMatch(/line 2: .*line 3: .*centimetres/);
    const cfg = await runBatchFolder({ manifestPath: c.manifest, outDir: join(c.dir, 'o'), workers: 1, rawConfig: { batch: { confidence: 2 } }, processTree: fakeProcessor(calls) }).catch((e) => e);
    expect(cfg).toBeInstanceOf(XylemapError);
    expect(cfg.option).toBe('batch.confidence');
    expect(calls).toEqual([]);
  });
});

describe('mergeBatchFolders', () => {
  it('reproduces the single-run tables byte for byte from 4 shard folders', async () => {
    const c = campaign();
    const single = join(c.dir, 'single');
    await runBatchFolder({ manifestPath: c.manifest, outDir: single, workers: 2, rawConfig: fast, inventoryPath: c.inventory, processTree: fakeProcessor([]) });
    const shardDirs: string[] = [];
    const seen: string[] = [];
    for (let i = 0; i < 4; i++) {
      const d = join(c.dir, `shard-${i}`);
      shardDirs.push(d);
      await runBatchFolder({ manifestPath: c.manifest, outDir: d, workers: 2, rawConfig: fast, shard: { index: i, count: 4, source: 'flag' }, processTree: fakeProcessor(seen) });
    }
    expect(seen.sort()).toEqual(
      ['oak', 'beech', 'spruce'].flatMap((s) => [0, 1, 2, 3].map((j) => `${s}-${j}`)).sort(),
    );
    const merged = join(c.dir, 'merged');
    // no configuration: merge takes the batch options the shards recorded
    const r = mergeBatchFolders(shardDirs.slice().reverse(), merged, undefined, undefined, c.inventory);
    expect(r.tree_count).toBe(12);
    expect(r.warnings).toEqual([]);
    for (const f of [...TABLES, 'plots.csv', 'stems.csv']) {
      expect(readFileSync(join(merged, f), 'utf8'), f).toBe(readFileSync(join(single, f), 'utf8'));
    }
  });
  it('warns about a missing shard and refuses a tree present in two folders', async () => {
    const c = campaign();
    const a = join(c.dir, 's0');
    const b = join(c.dir, 's1');
    await runBatchFolder({ manifestPath: c.manifest, outDir: a, workers: 1, rawConfig: fast, shard: { index: 0, count: 2, source: 'flag' }, processTree: fakeProcessor([]) });
    await runBatchFolder({ manifestPath: c.manifest, outDir: b, workers: 1, rawConfig: fast, processTree: fakeProcessor([]) });
    expect(mergeBatchFolders([a], join(c.dir, 'm1'), fast).warnings[0]).toContain('shard 1/2 not among the folders');
    expect(() => mergeBatchFolders([a, b], join(c.dir, 'm2'), fast)).toThrow(/more than one folder/);
    expect(() => mergeBatchFolders([c.dir], join(c.dir, 'm3'), fast)).toThrow(XylemapError);
    const other = join(c.dir, 's1-other');
    await runBatchFolder({ manifestPath: c.manifest, outDir: other, workers: 1, rawConfig: { batch: { seed: 5 } }, shard: { index: 1, count: 2, source: 'flag' }, processTree: fakeProcessor([]) });
    expect(() => mergeBatchFolders([a, other], join(c.dir, 'm4'))).toThrow(/different batch options/);
    expect(mergeBatchFolders([a, other], join(c.dir, 'm5'), fast).tree_count).toBe(12);
  });
});

describe('treeConfig', () => {
  it('resolves the pipeline blocks with the manifest preset as hydraulics.preset, without the batch block', () => {
    const c = treeConfig({ batch: { seed: 3 }, scaling: { seed: 7 } }, 'conifer') as Record<string, Record<string, unknown>>;
    expect(c.hydraulics.preset).toBe('conifer');
    expect(c.scaling.seed).toBe(7);
    expect(c.batch).toBeUndefined();
  });
});

describe('batchConfig', () => {
  it('fills the batch defaults and names the key path of a bad value', () => {
    expect(batchConfig(undefined).confidence).toBe(0.95);
    expect(() => batchConfig({ batch: { fit_dbh_source: 'tape' } }, 'x.yaml')).toThrow(/fit_dbh_source|scan, field/);
  });
});
