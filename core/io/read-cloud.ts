import { closeSync, openSync, readSync, statSync } from 'node:fs';
import type { PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { readAsciiFd } from './ascii.js';
import { readLas } from './las-read.js';
import { readPlyFd, readPlyMeshFd, type TriangleMesh } from './ply.js';

export interface ReadOptions {
  /** ASCII column mapping in file order, e.g. "x,y,z,intensity" ("-" skips a column). */
  columns?: string;
  /** Accept a file with zero points (default false: an empty cloud is an error). `inspect` sets it. */
  allowEmpty?: boolean;
  /** Decode threads for large uncompressed LAS (default: env XYLEMAP_IO_THREADS, else 1; workers need the compiled build). */
  threads?: number;
}

export type CloudFormat = 'las' | 'ply' | 'ascii';

/**
 * Guess the format from the content, never the name: "LASF" → LAS/LAZ (compression is read from
 * the header), "ply" + newline → PLY, otherwise text → ASCII; binary junk is refused.
 */
export function sniffFormat(head: Uint8Array): CloudFormat | 'binary' | 'empty' {
  if (head.length === 0) return 'empty';
  if (head[0] === 0x4c && head[1] === 0x41 && head[2] === 0x53 && head[3] === 0x46) return 'las';
  if (head[0] === 0x70 && head[1] === 0x6c && head[2] === 0x79 && (head[3] === 0x0a || head[3] === 0x0d)) return 'ply';
  for (let i = 0; i < head.length; i++) {
    const b = head[i];
    if (b === 0 || (b < 9 && b !== 0) || (b > 13 && b < 32 && b !== 27)) return 'binary';
  }
  return 'ascii';
}

/** Open a path for reading with one clear error for each way it can fail. */
function openForReading(path: string): { fd: number; size: number } {
  let size: number;
  try {
    const st = statSync(path);
    if (st.isDirectory()) {
      throw new XylemapError('is a directory, not a point-cloud file', { file: path, hint: 'give the path of a .las, .laz, .ply, .xyz, .csv or .txt file' });
    }
    size = st.size;
  } catch (e) {
    if (e instanceof XylemapError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    const what = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (e as Error).message;
    throw new XylemapError(`cannot read: ${what}`, { file: path, hint: 'check the path and permissions' });
  }
  try {
    return { fd: openSync(path, 'r'), size };
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new XylemapError(`cannot open: ${code === 'EACCES' ? 'permission denied' : (e as Error).message}`, { file: path, hint: 'check the path and permissions' });
  }
}

/**
 * Read one point cloud from LAS/LAZ, PLY or ASCII (format sniffed from the content).
 * @param path file to read.
 * @param options ASCII column mapping; `allowEmpty` to accept zero points.
 * @throws XylemapError naming the file, the problem and what to do.
 */
export async function readCloud(path: string, options: ReadOptions = {}): Promise<PointCloud> {
  const { fd, size } = openForReading(path);
  let cloud: PointCloud;
  let open = true;
  try {
    const head = new Uint8Array(Math.min(size, 4096));
    readSync(fd, head, 0, head.length, 0);
    const format = sniffFormat(head);
    if (format === 'empty') throw new XylemapError('file is empty (0 bytes)', { file: path, hint: 'copy or export the scan again' });
    if (format === 'binary') {
      throw new XylemapError('unknown file format (not LAS/LAZ, PLY or text)', {
        file: path,
        hint: 'xylemap reads LAS 1.0–1.4, LAZ, PLY and ASCII XYZ/CSV/TXT; convert the file to one of these',
      });
    }
    if (format === 'las') {
      closeSync(fd);
      open = false;
      cloud = await readLas(path, { threads: options.threads });
    } else if (format === 'ply') {
      cloud = readPlyFd(fd, path);
    } else {
      cloud = readAsciiFd(fd, path, options.columns);
    }
  } finally {
    if (open) closeSync(fd);
  }
  if (cloud.count === 0 && !options.allowEmpty) {
    throw new XylemapError('file holds no points', { file: path, hint: 'check that the export contains the tree (and the right columns for text files)' });
  }
  return cloud;
}

/** Read a PLY triangle mesh (positions, optional per-vertex rgb, triangle faces). */
export function readPlyMesh(path: string): TriangleMesh {
  const { fd } = openForReading(path);
  try {
    return readPlyMeshFd(fd, path);
  } finally {
    closeSync(fd);
  }
}
