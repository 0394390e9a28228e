/**
 * The worker pool of `xylemap batch`: piscina worker threads, one tree per task. Worker threads
 * (not child processes) because a tree is CPU-bound and the inputs/outputs are files, so only a
 * small task object crosses the thread boundary.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Piscina } from 'piscina';
import type { TreeJob, TreeOutcome } from './run-batch.js';
import type { WorkerTask } from './worker.js';

export interface TreePool {
  processTree: (job: TreeJob) => Promise<TreeOutcome>;
  /** Run the no-op task (for measuring the pool's overhead). */
  noop: () => Promise<TreeOutcome>;
  close: () => Promise<void>;
}

/** Path of the compiled worker module beside this file. */
export function workerFile(): string {
  return fileURLToPath(new URL('./worker.js', import.meta.url));
}

/**
 * Start a pool of `workers` threads.
 * @param treeTimeoutS stop a tree (its worker thread is terminated and replaced) after this many
 *   seconds and record it as failed; 0 = no limit
 * @throws Error when the compiled worker is missing (run `npm run build`)
 */
export function createTreePool(workers: number, treeTimeoutS = 0): TreePool {
  const filename = workerFile();
  if (!existsSync(filename)) throw new Error(`batch worker not built: ${filename} is missing — run \`npm run build\``);
  const n = Math.max(1, Math.floor(workers));
  const pool = new Piscina<WorkerTask, TreeOutcome>({ filename, minThreads: n, maxThreads: n, idleTimeout: 60_000 });
  return {
    processTree: async (job) => {
      const task: WorkerTask = { kind: 'tree', path: job.path, outDir: job.outDir, config: job.config };
      if (!(treeTimeoutS > 0)) return pool.run(task);
      try {
        return await pool.run(task, { signal: AbortSignal.timeout(treeTimeoutS * 1000) });
      } catch (e) {
        if ((e as Error)?.name === 'AbortError') return { ok: false, error: `${job.path}: stopped after the tree time limit of ${treeTimeoutS} s` };
        throw e;
      }
    },
    noop: () => pool.run({ kind: 'noop' }),
    close: () => pool.destroy(),
  };
}
