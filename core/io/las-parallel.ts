import { closeSync, existsSync, openSync, readSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { AttributeArray, PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { decodeRecords, type LasLayout } from './las-points.js';

/** Records per read/decode block (≈ 2 MB), small enough to stay in cache across the column passes. */
export const BLOCK_RECORDS = 65_536;
/**
 * Below this many points one thread is faster than starting workers (a worker costs ≈ 30–50 ms to
 * start here; one thread decodes ≈ 1 M points in that time).
 */
export const PARALLEL_MIN_POINTS = 2_000_000;

/** Everything a thread needs to decode a record range into shared arrays. */
export interface RangeJob {
  path: string;
  offsetToPointData: number;
  layout: LasLayout;
  start: number;
  end: number;
  count: number;
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
  attributes: PointCloud['attributes'];
  extra: Record<string, AttributeArray>;
  rawExtraBytes?: Uint8Array;
}

/** Decode records [job.start, job.end) with blocking reads of one block at a time. */
export function decodeRangeFromFile(job: RangeJob): void {
  const rl = job.layout.recordLength;
  const cloud: PointCloud = {
    count: job.count,
    x: job.x,
    y: job.y,
    z: job.z,
    attributes: job.attributes,
    extra: job.extra,
    rawExtraBytes: job.rawExtraBytes,
    source: { format: 'las' },
  };
  const block = new Uint8Array(BLOCK_RECORDS * rl);
  const fd = openSync(job.path, 'r');
  try {
    for (let s = job.start; s < job.end; s += BLOCK_RECORDS) {
      const n = Math.min(BLOCK_RECORDS, job.end - s);
      const want = n * rl;
      let done = 0;
      while (done < want) {
        const got = readSync(fd, block, done, want - done, job.offsetToPointData + s * rl + done);
        if (got === 0) throw new XylemapError('file ended inside the point data', { file: job.path, hint: 'the file is truncated; copy or export it again' });
        done += got;
      }
      decodeRecords(block, 0, n, cloud, s, job.layout);
    }
  } finally {
    closeSync(fd);
  }
}

/** URL of the compiled worker, or null when running from TypeScript sources (tests): then decode on one thread. */
function workerUrl(): URL | null {
  const url = new URL('./las-decode-worker.js', import.meta.url);
  return import.meta.url.endsWith('.js') && existsSync(fileURLToPath(url)) ? url : null;
}

/**
 * Threads to use for `count` points: `requested`, else XYLEMAP_IO_THREADS, else 1 (capped at the
 * core count); always 1 for small files. One is the default because on the shared 2-core machine
 * this was measured on, 2 threads were slower (10 M points: 1.42–1.65 s vs 0.82–0.97 s wall).
 */
export function decodeThreads(count: number, requested?: number): number {
  const env = Number(process.env.XYLEMAP_IO_THREADS);
  const wanted = Math.min(requested ?? (Number.isInteger(env) && env > 0 ? env : 1), availableParallelism());
  if (count < PARALLEL_MIN_POINTS || wanted <= 1 || !workerUrl()) return 1;
  return wanted;
}

/**
 * Decode all records of an uncompressed LAS with `threads` threads (the main thread takes one
 * range, each worker another). `cloud` must be allocated with shared memory.
 */
export async function decodeParallel(path: string, offsetToPointData: number, layout: LasLayout, cloud: PointCloud, threads: number): Promise<void> {
  const url = workerUrl();
  const n = cloud.count;
  const base = (start: number, end: number): RangeJob => ({
    path,
    offsetToPointData,
    layout,
    start,
    end,
    count: n,
    x: cloud.x,
    y: cloud.y,
    z: cloud.z,
    attributes: cloud.attributes,
    extra: cloud.extra,
    rawExtraBytes: cloud.rawExtraBytes,
  });
  // Ranges aligned to whole blocks so every thread reads full blocks.
  const per = Math.ceil(n / threads / BLOCK_RECORDS) * BLOCK_RECORDS;
  const jobs: RangeJob[] = [];
  for (let s = 0; s < n; s += per) jobs.push(base(s, Math.min(n, s + per)));
  if (!url || jobs.length === 1) {
    for (const j of jobs) decodeRangeFromFile(j);
    return;
  }
  const running = jobs.slice(1).map(
    (job) =>
      new Promise<void>((resolve, reject) => {
        const w = new Worker(url, { workerData: job });
        w.once('message', (m: { ok: boolean; message?: string }) => {
          void w.terminate();
          if (m.ok) resolve();
          else reject(new XylemapError(m.message ?? 'worker failed', { file: path }));
        });
        w.once('error', (e) => reject(new XylemapError(`decode worker failed: ${e.message}`, { file: path })));
        // A worker that dies without a message (e.g. out of memory) must not leave the read hanging.
        w.once('exit', (code) => reject(new XylemapError(`decode worker exited with code ${code} before finishing`, { file: path })));
      }),
  );
  decodeRangeFromFile(jobs[0]);
  await Promise.all(running);
}
