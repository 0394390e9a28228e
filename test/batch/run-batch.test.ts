import { describe, expect, it } from 'vitest';
import { errorLine, formatDuration, formatProgress, runBatch, type BatchProgress, type TreeJob } from '../../core/batch/run-batch.js';
import { XylemapError } from '../../core/util/errors.js';

const jobs = (n: number): TreeJob[] =>
  Array.from({ length: n }, (_, i) => ({ index: i, treeId: `t${i}`, path: `/in/t${i}.las`, outDir: `/out/t${i}`, config: {} }));
const tick = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('runBatch', () => {
  it('records failed trees (returned or thrown) and still processes every other tree', async () => {
    const seen: string[] = [];
    const results = await runBatch(jobs(6), {
      concurrency: 2,
      processTree: async (j) => {
        seen.push(j.treeId);
        if (j.treeId === 't1') return { ok: false, error: 'no stem found' };
        if (j.treeId === 't4') throw new XylemapError('bad header', { file: j.path });
        return { ok: true };
      },
    });
    expect(seen.sort()).toEqual(['t0', 't1', 't2', 't3', 't4', 't5']);
    expect(results.map((r) => r.status)).toEqual(['done', 'failed', 'done', 'done', 'failed', 'done']);
    expect(results[4].error).toBe('/in/t4.las: bad header');
  });
  it('never has more trees in flight than the concurrency', async () => {
    let inFlight = 0;
    let most = 0;
    await runBatch(jobs(9), {
      concurrency: 3,
      processTree: async () => {
        inFlight++;
        most = Math.max(most, inFlight);
        await tick(5);
        inFlight--;
        return { ok: true };
      },
    });
    expect(most).toBe(3);
  });
  it('skips up-to-date trees without calling the processor', async () => {
    let calls = 0;
    const r = await runBatch(jobs(4), {
      concurrency: 2,
      isUpToDate: (j) => j.index % 2 === 0,
      processTree: async () => {
        calls++;
        return { ok: true };
      },
    });
    expect(calls).toBe(2);
    expect(r.map((x) => x.status)).toEqual(['skipped', 'done', 'skipped', 'done']);
  });
  it('reports done / failed / remaining and an ETA from the elapsed time per processed tree', async () => {
    let clock = 0;
    const reports: BatchProgress[] = [];
    await runBatch(jobs(4), {
      concurrency: 1,
      now: () => clock,
      onProgress: (p) => reports.push(p),
      processTree: async (j) => {
        clock += 10_000;
        return j.index === 2 ? { ok: false, error: 'x' } : { ok: true };
      },
    });
    expect(reports[0]).toMatchObject({ total: 4, done: 0, remaining: 4 });
    expect(reports[0].etaSeconds).toBeNaN();
    // after the first tree: 10 s per tree, 3 left → 30 s
    expect(reports[1]).toMatchObject({ done: 1, remaining: 3, etaSeconds: 30 });
    expect(reports.at(-1)).toMatchObject({ done: 3, failed: 1, remaining: 0, etaSeconds: 0 });
  });
});

describe('errorLine', () => {
  it('uses XylemapError.oneLine and folds newlines', () => {
    expect(errorLine(new XylemapError('m', { file: 'f' }))).toBe('f: m');
    expect(errorLine(new Error('a\n  b'))).toBe('a b');
  });
});

describe('formatProgress', () => {
  it('shows counts and the ETA', () => {
    expect(formatProgress({ total: 10, done: 3, failed: 1, skipped: 2, remaining: 4, etaSeconds: 65 })).toBe(
      '3 done, 1 failed, 2 skipped, 4 remaining of 10, ETA 1m05s',
    );
  });
});

describe('formatDuration', () => {
  it('writes seconds, minutes and hours', () => {
    expect(formatDuration(42)).toBe('42s');
    expect(formatDuration(3725)).toBe('1h02m');
  });
});
