/**
 * File-system side of `xylemap batch` / `xylemap merge`: reading the manifest and inventory,
 * hashing inputs, looking at a tree's output folder, and writing the batch record and the stand
 * tables (all atomic). The logic itself lives in core/batch/.
 */
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { parseManifest, type ManifestRow } from '../batch/manifest.js';
import type { FailedTree } from '../batch/outputs.js';
import type { TreeRecord } from '../batch/stand.js';
import type { TreeResult } from '../batch/run-batch.js';
import { parseInventory, type InventoryStem } from '../batch/upscale.js';
import { XylemapError } from '../util/errors.js';
import { writeFileAtomic } from './atomic.js';

function readText(path: string, what: string, hint: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new XylemapError(code === 'ENOENT' ? `${what} not found` : `cannot read ${what} (${code})`, { file: path, stage: 'batch', hint });
  }
}

function isFile(path: string): boolean {
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

/** Read and check a manifest (every row checked, files must exist). */
export function readManifestFile(path: string, check: { knownPresets?: readonly string[]; maxPlausibleDbhM: number }): ManifestRow[] {
  const text = readText(path, 'manifest', 'give a CSV with columns tree_id, species, file');
  return parseManifest(text, path, { ...check, fileExists: isFile });
}

/** Read and check an inventory. */
export function readInventoryFile(path: string, maxPlausibleDbhM: number): InventoryStem[] {
  const text = readText(path, 'inventory', 'give a CSV with columns plot_id, plot_area_m2, species, dbh_m');
  return parseInventory(text, path, maxPlausibleDbhM);
}

/** Names of the files in a tree's output folder and its parsed run.json (undefined if absent/unreadable). */
export function treeFolderState(dir: string): { present: string[]; runJson: unknown } {
  if (!existsSync(dir)) return { present: [], runJson: undefined };
  const present = readdirSync(dir).filter((f) => !f.startsWith('.'));
  let runJson: unknown;
  try {
    runJson = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8'));
  } catch {
    runJson = undefined;
  }
  return { present, runJson };
}

/** A tree's summary.json, or undefined when it is missing or not JSON. */
export function readTreeSummary(dir: string): unknown {
  try {
    return JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8'));
  } catch {
    return undefined;
  }
}

/** The record a batch leaves in its output folder so that `merge` can rebuild the tables. */
export interface BatchRecord {
  schema: 'xylemap.batch/1';
  manifest: string;
  shard: { index: number; count: number; source: string } | null;
  /** The resolved `batch` options of the run (merge uses them unless given a configuration). */
  batch_options?: Record<string, unknown>;
  trees: {
    index: number;
    tree_id: string;
    species: string;
    file: string;
    plot: string;
    preset: string;
    field_dbh_m: number | null;
    status: TreeResult['status'];
    seconds: number;
    error?: string;
  }[];
}

export function writeBatchRecord(outDir: string, record: BatchRecord): void {
  writeFileAtomic(join(outDir, 'batch.json'), JSON.stringify(record, null, 2) + '\n');
}

/** Write every table (file name → text) into the folder, each atomically. */
export function writeTables(outDir: string, files: Record<string, string>): string[] {
  const written: string[] = [];
  for (const [name, text] of Object.entries(files)) {
    const p = join(outDir, name);
    writeFileAtomic(p, text);
    written.push(p);
  }
  return written;
}

/**
 * Read a batch output folder (a single run or one shard): its batch.json and each finished tree's
 * summary.json.
 * @throws XylemapError when batch.json is missing or not a batch record
 */
export function readBatchFolder(dir: string): { record: BatchRecord; trees: TreeRecord[]; failures: FailedTree[] } {
  const file = join(dir, 'batch.json');
  const text = readText(file, 'batch record', 'give folders written by `xylemap batch` (one per shard)');
  let record: BatchRecord;
  try {
    record = JSON.parse(text) as BatchRecord;
  } catch {
    throw new XylemapError('batch record is not valid JSON', { file, stage: 'batch', hint: 'rerun that shard' });
  }
  if (record?.schema !== 'xylemap.batch/1' || !Array.isArray(record.trees)) {
    throw new XylemapError('not a xylemap batch record (schema xylemap.batch/1)', { file, stage: 'batch', hint: 'give folders written by `xylemap batch`' });
  }
  const trees: TreeRecord[] = [];
  const failures: FailedTree[] = [];
  for (const t of record.trees) {
    const base = { index: t.index, treeId: t.tree_id, species: t.species, file: t.file };
    if (t.status === 'failed') {
      failures.push({ ...base, error: t.error ?? 'failed' });
      continue;
    }
    const summary = readTreeSummary(join(dir, 'trees', t.tree_id));
    if (summary === undefined) {
      failures.push({ ...base, error: `summary.json missing in ${join(dir, 'trees', t.tree_id)}` });
      continue;
    }
    trees.push({ ...base, plot: t.plot, preset: t.preset, fieldDbhM: t.field_dbh_m ?? NaN, summary });
  }
  return { record, trees, failures };
}
