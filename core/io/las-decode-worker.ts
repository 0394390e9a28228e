/**
 * Worker thread of the parallel LAS reader: decodes records [start, end) of an uncompressed LAS
 * file into SharedArrayBuffer-backed arrays the main thread allocated (see `las-parallel.ts`).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { decodeRangeFromFile, type RangeJob } from './las-parallel.js';

const job = workerData as RangeJob;
try {
  decodeRangeFromFile(job);
  parentPort!.postMessage({ ok: true });
} catch (e) {
  parentPort!.postMessage({ ok: false, message: e instanceof Error ? e.message : String(e) });
}
