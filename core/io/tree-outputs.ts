import { createHash } from 'node:crypto';
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { XylemapError } from '../util/errors.js';
import { writeFileAtomic } from './atomic.js';

/** The per-tree output files, in the order they are written (run.json last: it lists the others). */
export const TREE_OUTPUT_FILES = [
  'segments.csv',
  'furcations.csv',
  'network.json',
  'network.graphml',
  'cylinders.ply',
  'labeled-points.las',
  'summary.json',
  'report.html',
  'run.json',
] as const;
export type TreeOutputName = (typeof TREE_OUTPUT_FILES)[number];

/** Output file contents, computed in memory before anything is written. */
export type TreeOutputs = Partial<Record<TreeOutputName, string | Uint8Array>>;

/**
 * Write the outputs of one tree into `dir`, each file atomically (temp + rename), in the order of
 * TREE_OUTPUT_FILES. Everything is computed before this is called, so a failing stage leaves no
 * partial output.
 * @returns the paths written
 * @throws XylemapError when the folder cannot be written
 */
export function writeTreeOutputs(dir: string, outputs: TreeOutputs): string[] {
  const written: string[] = [];
  for (const name of TREE_OUTPUT_FILES) {
    const data = outputs[name];
    if (data === undefined) continue;
    const path = join(dir, name);
    try {
      writeFileAtomic(path, data);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code ?? String(e);
      throw new XylemapError(`cannot write output (${code})`, { file: path, hint: 'choose an --out folder you can write to' });
    }
    written.push(path);
  }
  return written;
}

/**
 * SHA-256 of a file, read in 8 MiB chunks (large scans never sit in memory twice).
 * @returns lowercase hex digest and the size in bytes
 */
export function hashFile(path: string): { sha256: string; bytes: number } {
  const hash = createHash('sha256');
  const fd = openSync(path, 'r');
  try {
    const buf = Buffer.allocUnsafe(8 << 20);
    for (;;) {
      const n = readSync(fd, buf, 0, buf.length, null);
      if (n === 0) break;
      hash.update(buf.subarray(0, n));
    }
  } finally {
    closeSync(fd);
  }
  return { sha256: hash.digest('hex'), bytes: statSync(path).size };
}

/** Fail early, before any point is read, when the input is missing or not a file. */
export function checkInputFile(path: string): void {
  let ok = false;
  try {
    ok = statSync(path).isFile();
  } catch {
    throw new XylemapError('input file not found', { file: path, hint: 'give the path of a LAS, LAZ, PLY or ASCII point cloud' });
  }
  if (!ok) throw new XylemapError('input is not a file', { file: path, hint: 'give the path of a LAS, LAZ, PLY or ASCII point cloud' });
}
