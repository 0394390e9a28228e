import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';

/**
 * Write a file so that readers never see a partial one: write a temp file beside the target,
 * then rename (atomic on one file system). The temp file is removed if writing fails.
 */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const dir = dirname(path);
  mkdirSync(dir, { recursive: true });
  const tmp = join(dir, `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
}

/** Write several byte chunks as one file atomically (avoids concatenating large buffers). */
export function writeChunksAtomic(path: string, chunks: Uint8Array[]): void {
  const total = chunks.reduce((n, c) => n + c.byteLength, 0);
  const all = new Uint8Array(total);
  let o = 0;
  for (const c of chunks) {
    all.set(c, o);
    o += c.byteLength;
  }
  writeFileAtomic(path, all);
}
