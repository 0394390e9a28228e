/**
 * `xylemap batch` and `xylemap merge` end to end: validate everything (configuration, manifest,
 * inventory) before the first tree, run the trees through an injected processor (the worker pool in
 * the CLI, a fake in tests), resume finished trees, and write the batch record and stand tables.
 */
import { join, resolve } from 'node:path';
import { batchOptions, type BatchOptionValues } from '../batch/options.js';
import type { ManifestRow } from '../batch/manifest.js';
import { standOutputs, type FailedTree } from '../batch/outputs.js';
import { canonicalJson, resumeDecision } from '../batch/resume.js';
import { runBatch, type BatchProgress, type TreeJob, type TreeOutcome, type TreeResult } from '../batch/run-batch.js';
import { selectShard, type ShardSpec } from '../batch/shard.js';
import type { TreeRecord } from '../batch/stand.js';
import type { InventoryStem } from '../batch/upscale.js';
import { resolveConfig, setConfigValue } from '../pipeline/config.js';
import { CONFIG_DECLARATIONS, PIPELINE_DECLARATIONS } from '../pipeline/declarations.js';
import { XylemapError } from '../util/errors.js';
import {
  readBatchFolder,
  readInventoryFile,
  readManifestFile,
  readTreeSummary,
  treeFolderState,
  writeBatchRecord,
  writeTables,
  type BatchRecord,
} from './batch-files.js';
import { listPresets } from './presets.js';
import { hashFile } from './tree-outputs.js';

/** Files a finished tree folder must hold to be skipped on a rerun. */
export const REQUIRED_TREE_FILES = ['summary.json', 'run.json'] as const;

export interface BatchRunInput {
  manifestPath: string;
  outDir: string;
  workers: number;
  /** Parsed YAML configuration (not yet validated), undefined for defaults. */
  rawConfig?: unknown;
  configFile?: string;
  inventoryPath?: string;
  shard?: ShardSpec;
  /** Runs one tree into job.outDir (summary.json, run.json, …). */
  processTree: (job: TreeJob) => Promise<TreeOutcome>;
  onProgress?: (p: BatchProgress) => void;
  /** Files that must exist in a tree folder to skip it (default REQUIRED_TREE_FILES). */
  requiredFiles?: readonly string[];
}

export interface BatchRunResult {
  schema: 'xylemap.batch-result/1';
  out: string;
  shard: ShardSpec | null;
  counts: { total: number; done: number; skipped: number; failed: number };
  trees: { tree_id: string; status: TreeResult['status']; seconds: number; error?: string }[];
  files: string[];
  warnings: string[];
}

/** Pick the pipeline stages' blocks out of a resolved full configuration. */
function pipelinePart(full: Record<string, unknown>): Record<string, unknown> {
  return Object.fromEntries(PIPELINE_DECLARATIONS.map((d) => [d.name, full[d.name]]));
}

/**
 * The pipeline configuration of one tree: the file's options, with the manifest's preset (if any)
 * as hydraulics.preset.
 */
export function treeConfig(rawConfig: unknown, preset: string, configFile?: string): Record<string, unknown> {
  const raw = preset ? setConfigValue(rawConfig, 'hydraulics.preset', preset) : rawConfig;
  return pipelinePart(resolveConfig(raw, CONFIG_DECLARATIONS, configFile));
}

/** The batch options (the `batch:` block) of a configuration, validated with every other block. */
export function batchConfig(rawConfig: unknown, configFile?: string): BatchOptionValues {
  return resolveConfig(rawConfig, CONFIG_DECLARATIONS, configFile).batch as BatchOptionValues;
}

function recordOf(row: ManifestRow, summary: unknown): TreeRecord {
  return {
    index: row.index,
    treeId: row.treeId,
    species: row.species,
    file: row.file,
    plot: row.plot,
    preset: row.preset,
    fieldDbhM: row.fieldDbhM,
    summary,
  };
}

/**
 * Run a batch (or one shard of it) into `outDir`: `trees/<tree_id>/` per tree, `batch.json`, and the
 * stand tables of the trees of this run. The inventory is upscaled only in an unsharded run (shards
 * have too few trees; `merge --inventory` does it); in a shard it is still checked up front.
 * @throws XylemapError for any bad input, before any tree is processed
 */
export async function runBatchFolder(input: BatchRunInput): Promise<BatchRunResult> {
  const options = batchConfig(input.rawConfig, input.configFile);
  const rows = readManifestFile(input.manifestPath, { knownPresets: listPresets(), maxPlausibleDbhM: options.max_plausible_dbh_m });
  const inventory = input.inventoryPath ? readInventoryFile(input.inventoryPath, options.max_plausible_dbh_m) : undefined;
  const configs = new Map<string, Record<string, unknown>>();
  const configOf = (preset: string): Record<string, unknown> => {
    let c = configs.get(preset);
    if (!c) configs.set(preset, (c = treeConfig(input.rawConfig, preset, input.configFile)));
    return c;
  };
  for (const r of rows) configOf(r.preset);

  const mine = selectShard(rows, input.shard);
  const outDir = resolve(input.outDir);
  const jobs: TreeJob[] = mine.map((r) => ({
    index: r.index,
    treeId: r.treeId,
    path: r.path,
    outDir: join(outDir, 'trees', r.treeId),
    config: configOf(r.preset),
  }));
  const required = input.requiredFiles ?? REQUIRED_TREE_FILES;
  const results = await runBatch(jobs, {
    concurrency: input.workers,
    processTree: input.processTree,
    onProgress: input.onProgress,
    isUpToDate: (job) => {
      const state = treeFolderState(job.outDir);
      if (state.runJson === undefined) return false;
      const decision = resumeDecision(state.present, required, state.runJson, {
        inputSha256: hashFile(job.path).sha256,
        options: job.config,
      });
      return decision.skip;
    },
  });

  const byId = new Map(mine.map((r) => [r.treeId, r]));
  const records: TreeRecord[] = [];
  const failures: FailedTree[] = [];
  for (const res of results) {
    const row = byId.get(res.treeId) as ManifestRow;
    if (res.status !== 'failed') {
      const summary = readTreeSummary(join(outDir, 'trees', res.treeId));
      if (summary !== undefined) {
        records.push(recordOf(row, summary));
        continue;
      }
      res.status = 'failed';
      res.error = 'the pipeline finished without a readable summary.json';
    }
    failures.push({ index: row.index, treeId: row.treeId, species: row.species, file: row.file, error: res.error ?? 'failed' });
  }
  const record: BatchRecord = {
    schema: 'xylemap.batch/1',
    manifest: resolve(input.manifestPath),
    shard: input.shard ? { index: input.shard.index, count: input.shard.count, source: input.shard.source } : null,
    batch_options: options,
    trees: results.map((res) => {
      const row = byId.get(res.treeId) as ManifestRow;
      return {
        index: row.index,
        tree_id: row.treeId,
        species: row.species,
        file: row.file,
        plot: row.plot,
        preset: row.preset,
        field_dbh_m: Number.isFinite(row.fieldDbhM) ? row.fieldDbhM : null,
        status: res.status,
        seconds: res.seconds,
        ...(res.error ? { error: res.error } : {}),
      };
    }),
  };
  writeBatchRecord(outDir, record);
  const warnings: string[] = [];
  if (input.shard && inventory) warnings.push('inventory checked but not upscaled in a shard: pass --inventory to `xylemap merge`');
  const tables = standOutputs(records, failures, options, input.shard ? undefined : inventory);
  warnings.push(...tables.warnings);
  const files = [join(outDir, 'batch.json'), ...writeTables(outDir, tables.files)];
  const count = (s: TreeResult['status']): number => results.filter((r) => r.status === s).length;
  return {
    schema: 'xylemap.batch-result/1',
    out: outDir,
    shard: input.shard ?? null,
    counts: { total: results.length, done: count('done'), skipped: count('skipped'), failed: count('failed') },
    trees: results.map((r) => ({ tree_id: r.treeId, status: r.status, seconds: r.seconds, ...(r.error ? { error: r.error } : {}) })),
    files,
    warnings,
  };
}

export interface MergeResult {
  schema: 'xylemap.merge-result/1';
  out: string;
  sources: string[];
  tree_count: number;
  failed_count: number;
  files: string[];
  warnings: string[];
}

/**
 * Merge the folders of a sharded batch into the stand tables a single run would have written
 * (same trees → byte-identical stand.csv and species.csv). The statistics use the `batch` options
 * the shards recorded, unless a configuration is given.
 * @throws XylemapError when a folder is not a batch folder, a tree appears in two folders, or the
 *   shards ran with different batch options and no configuration settles it
 */
export function mergeBatchFolders(dirs: readonly string[], outDir: string, rawConfig?: unknown, configFile?: string, inventoryPath?: string): MergeResult {
  if (dirs.length === 0) throw new XylemapError('no shard folders given', { stage: 'batch', hint: 'xylemap merge OUT/shard-* --out OUT/merged' });
  const parts = dirs.map((dir) => ({ dir, ...readBatchFolder(dir) }));
  let options: BatchOptionValues;
  if (rawConfig !== undefined) options = batchConfig(rawConfig, configFile);
  else {
    const recorded = [...new Set(parts.map((p) => canonicalJson(p.record.batch_options ?? null)))];
    if (recorded.length > 1) {
      throw new XylemapError('the folders were run with different batch options', {
        stage: 'batch',
        option: 'batch',
        hint: 'pass --config with the batch: block to use for the merged tables',
      });
    }
    options = batchOptions.resolve(parts[0].record.batch_options ?? undefined);
  }
  const inventory: InventoryStem[] | undefined = inventoryPath ? readInventoryFile(inventoryPath, options.max_plausible_dbh_m) : undefined;
  const trees: TreeRecord[] = [];
  const failures: FailedTree[] = [];
  const seen = new Map<string, string>();
  const duplicates: string[] = [];
  const shardsSeen = new Map<number, Set<number>>();
  const warnings: string[] = [];
  for (const part of parts) {
    const dir = part.dir;
    for (const t of [...part.trees, ...part.failures]) {
      const first = seen.get(t.treeId);
      if (first !== undefined) duplicates.push(`tree_id "${t.treeId}" in ${first} and ${dir}`);
      else seen.set(t.treeId, dir);
    }
    trees.push(...part.trees);
    failures.push(...part.failures);
    const s = part.record.shard;
    if (s) {
      const set = shardsSeen.get(s.count) ?? new Set<number>();
      set.add(s.index);
      shardsSeen.set(s.count, set);
    }
  }
  if (duplicates.length > 0) {
    throw new XylemapError(`the same tree is in more than one folder: ${duplicates.join('; ')}`, {
      stage: 'batch',
      hint: 'give each shard folder once, all from the same manifest and shard count',
    });
  }
  if (shardsSeen.size > 1) warnings.push(`folders come from different shard counts: ${[...shardsSeen.keys()].join(', ')}`);
  for (const [count, set] of shardsSeen) {
    const missing = Array.from({ length: count }, (_, i) => i).filter((i) => !set.has(i));
    if (missing.length > 0) warnings.push(`shard${missing.length > 1 ? 's' : ''} ${missing.map((i) => `${i}/${count}`).join(', ')} not among the folders: the tables lack those trees`);
  }
  const tables = standOutputs(trees, failures, options, inventory);
  warnings.push(...tables.warnings);
  const out = resolve(outDir);
  const files = writeTables(out, tables.files);
  return {
    schema: 'xylemap.merge-result/1',
    out,
    sources: dirs.map((d) => resolve(d)),
    tree_count: trees.length,
    failed_count: failures.length,
    files,
    warnings,
  };
}
