import { Worker } from 'node:worker_threads';
import type { PointCloud } from '../types/point-cloud.js';
import type { SimulateOptions } from './options.js';
import type { Scene } from './scene.js';
import { assembleScan, prepareScan, scanOnePosition, type PositionScan, type ScanPosition, type ScanStats } from './scanner.js';

/**
 * `scanScene` with the positions spread over worker threads. The result is identical to the
 * sequential scan (each position has its own random stream; parts are joined in position order).
 * Plain `worker_threads` rather than a pool library: a handful of long tasks, started once.
 * Falls back to the calling thread when `threads` ≤ 1, with a single position, or when running
 * from TypeScript sources (tests), where the compiled worker module does not exist.
 *
 * @param threads number of worker threads (at most one per position)
 */
export async function scanSceneParallel(
  scene: Scene,
  o: SimulateOptions,
  positions: ScanPosition[],
  threads: number,
): Promise<{ cloud: PointCloud; stats: ScanStats }> {
  const ctx = prepareScan(scene, o, positions);
  const k = Math.min(Math.floor(threads), positions.length);
  const compiled = import.meta.url.endsWith('.js');
  if (!(k > 1) || !compiled) return assembleScan(positions.map((p) => scanOnePosition(ctx, p)));
  const groups: ScanPosition[][] = Array.from({ length: k }, () => []);
  positions.forEach((p, i) => groups[i % k].push(p));
  let parts: PositionScan[];
  try {
    const results = await Promise.all(groups.map((g) => runWorker({ ctx, positions: g })));
    parts = results.flat();
  } catch {
    // A worker that cannot start (e.g. a bundled build without the worker file): scan here.
    parts = positions.map((p) => scanOnePosition(ctx, p));
  }
  const byId = new Map(parts.map((p) => [p.id, p]));
  return assembleScan(positions.map((p) => byId.get(p.id)!));
}

function runWorker(data: unknown): Promise<PositionScan[]> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('./scan-worker.js', import.meta.url), { workerData: data });
    worker.once('message', (parts: PositionScan[]) => resolve(parts));
    worker.once('error', reject);
    worker.once('exit', (code) => {
      if (code !== 0) reject(new Error(`scan worker stopped with exit code ${code}`));
    });
  });
}
