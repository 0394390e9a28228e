import { describe, expect, it } from 'vitest';
import { createTreePool, workerFile } from '../../core/batch/pool.js';
import processTask from '../../core/batch/worker.js';

describe('processTask', () => {
  it('does nothing for a no-op task', async () => {
    expect(await processTask({ kind: 'noop' })).toEqual({ ok: true });
  });
  it('returns a failed outcome with the pipeline\'s one-line error instead of throwing', async () => {
    const r = await processTask({ kind: 'tree', path: '/nonexistent/tree.las', outDir: '/nonexistent/out', config: undefined });
    expect(r.ok).toBe(false);
    const error = r.ok ? '' : r.error;
    expect(error.length).toBeGreaterThan(0);
    expect(error).not.toContain('\n');
  });
});

describe('workerFile', () => {
  it('points at worker.js beside the pool module', () => {
    expect(workerFile()).toMatch(/core\/batch\/worker\.js$/);
  });
});

describe('createTreePool', () => {
  it('refuses to start when the compiled worker is missing (sources run under vitest have no worker.js)', () => {
    expect(() => createTreePool(1)).toThrow(/npm run build/);
  });
});
