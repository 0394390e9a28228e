/**
 * Worker-thread entry of the batch pool (loaded by piscina from the compiled dist/core/batch/worker.js):
 * runs the full pipeline for one tree into its folder. Errors come back as values, so one bad
 * tree never takes the pool down.
 */
import { runPipeline } from '../pipeline/run-pipeline.js';
import { errorLine, type TreeOutcome } from './run-batch.js';

export type WorkerTask =
  | { kind: 'tree'; path: string; outDir: string; config: unknown }
  /** Does nothing: measures the pool's own overhead per task (bench/batch.ts). */
  | { kind: 'noop' };

export default async function processTask(task: WorkerTask): Promise<TreeOutcome> {
  if (task.kind === 'noop') return { ok: true };
  try {
    await runPipeline({ path: task.path, outDir: task.outDir }, task.config);
    return { ok: true };
  } catch (e) {
    return { ok: false, error: errorLine(e) };
  }
}
