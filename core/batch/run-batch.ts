/**
 * The batch loop: run trees through an injected processor with at most `concurrency` in flight,
 * skip trees that are up to date, record every failure without stopping the others, and report
 * progress (done / failed / skipped / remaining and an ETA from the mean time per processed tree).
 */

export interface TreeJob {
  index: number;
  treeId: string;
  /** Input cloud path. */
  path: string;
  /** The tree's output folder. */
  outDir: string;
  /** The resolved pipeline configuration for this tree (plain data, passed to a worker). */
  config: unknown;
}

export type TreeOutcome = { ok: true } | { ok: false; error: string };

export type TreeStatus = 'done' | 'skipped' | 'failed';

export interface TreeResult {
  index: number;
  treeId: string;
  status: TreeStatus;
  /** Wall time of this tree, s (0 when skipped). */
  seconds: number;
  /** One-line error when failed. */
  error?: string;
}

export interface BatchProgress {
  total: number;
  done: number;
  skipped: number;
  failed: number;
  remaining: number;
  /** Estimated seconds to finish; NaN until one tree was processed. */
  etaSeconds: number;
}

export interface BatchRunner {
  processTree: (job: TreeJob) => Promise<TreeOutcome>;
  /** Trees processed at once (usually the worker count). */
  concurrency: number;
  /** True when the tree's outputs are complete and unchanged (then it is skipped). */
  isUpToDate?: (job: TreeJob) => boolean | Promise<boolean>;
  onProgress?: (p: BatchProgress) => void;
  /** Clock in ms (injected for tests). */
  now?: () => number;
}

/** Message of anything thrown, on one line. */
export function errorLine(e: unknown): string {
  const oneLine = (e as { oneLine?: () => string })?.oneLine;
  const text = typeof oneLine === 'function' ? oneLine.call(e) : e instanceof Error ? e.message : String(e);
  return text.replace(/\s*\n\s*/g, ' ');
}

/**
 * Run every job. Results come back in job order whatever the order of completion.
 * A processor that throws or rejects counts as a failed tree, like one returning `{ ok: false }`.
 */
export async function runBatch(jobs: readonly TreeJob[], runner: BatchRunner): Promise<TreeResult[]> {
  const now = runner.now ?? (() => Date.now());
  const start = now();
  const results: TreeResult[] = new Array(jobs.length);
  const counts = { done: 0, skipped: 0, failed: 0 };
  let processed = 0;
  const report = (): void => {
    if (!runner.onProgress) return;
    const finished = counts.done + counts.skipped + counts.failed;
    const remaining = jobs.length - finished;
    // Wall-clock rate over processed trees: elapsed time already reflects the parallelism.
    const elapsed = (now() - start) / 1000;
    const eta = processed > 0 ? (elapsed / processed) * remaining : NaN;
    runner.onProgress({ total: jobs.length, ...counts, remaining, etaSeconds: remaining === 0 ? 0 : eta });
  };
  report();
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < jobs.length) {
      const i = next++;
      const job = jobs[i];
      let upToDate = false;
      try {
        upToDate = runner.isUpToDate ? await runner.isUpToDate(job) : false;
      } catch {
        upToDate = false;
      }
      if (upToDate) {
        results[i] = { index: job.index, treeId: job.treeId, status: 'skipped', seconds: 0 };
        counts.skipped++;
        report();
        continue;
      }
      const t0 = now();
      let outcome: TreeOutcome;
      try {
        outcome = await runner.processTree(job);
      } catch (e) {
        outcome = { ok: false, error: errorLine(e) };
      }
      const seconds = (now() - t0) / 1000;
      processed++;
      if (outcome.ok) {
        results[i] = { index: job.index, treeId: job.treeId, status: 'done', seconds };
        counts.done++;
      } else {
        results[i] = { index: job.index, treeId: job.treeId, status: 'failed', seconds, error: outcome.error };
        counts.failed++;
      }
      report();
    }
  };
  const n = Math.max(1, Math.min(Math.floor(runner.concurrency) || 1, jobs.length));
  await Promise.all(Array.from({ length: n }, worker));
  return results;
}

/** "12 done, 1 failed, 3 skipped, 4 remaining, ETA 1m05s" */
export function formatProgress(p: BatchProgress): string {
  const eta = Number.isFinite(p.etaSeconds) ? formatDuration(p.etaSeconds) : '…';
  return `${p.done} done, ${p.failed} failed, ${p.skipped} skipped, ${p.remaining} remaining of ${p.total}, ETA ${eta}`;
}

export function formatDuration(seconds: number): string {
  const s = Math.max(0, Math.round(seconds));
  if (s < 60) return `${s}s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m}m${String(s % 60).padStart(2, '0')}s`;
  return `${Math.floor(m / 60)}h${String(m % 60).padStart(2, '0')}m`;
}
