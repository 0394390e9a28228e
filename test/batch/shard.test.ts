import { describe, expect, it } from 'vitest';
import { fnv1a32, parseShardFlag, selectShard, shardFromEnv, shardOfTree } from '../../core/batch/shard.js';
import { XylemapError } from '../../core/util/errors.js';

describe('fnv1a32', () => {
  it('matches the published FNV-1a 32-bit test vectors (draft-eastlake-fnv, "" / "a" / "foobar")', () => {
    expect(fnv1a32('')).toBe(0x811c9dc5);
    expect(fnv1a32('a')).toBe(0xe40c292c);
    expect(fnv1a32('foobar')).toBe(0xbf9cf968);
  });
});

describe('shardOfTree', () => {
  it('puts every tree in exactly one shard in 0 … n−1, independent of manifest order', () => {
    const ids = Array.from({ length: 200 }, (_, i) => `tree-${i}`);
    const a = ids.map((id) => shardOfTree(id, 4));
    const b = ids.slice().reverse().map((id) => shardOfTree(id, 4)).reverse();
    expect(a).toEqual(b);
    expect(a.every((s) => s >= 0 && s < 4)).toBe(true);
    // A stable hash spreads 200 ids roughly evenly: no shard empty (common practice, no source)
    for (let s = 0; s < 4; s++) expect(a.filter((x) => x === s).length).toBeGreaterThan(20);
  });
});

describe('parseShardFlag', () => {
  it('reads "i/n" 0-based and rejects i ≥ n, n = 0 and junk with a XylemapError', () => {
    expect(parseShardFlag('2/4')).toEqual({ index: 2, count: 4, source: 'flag' });
    for (const bad of ['4/4', '0/0', 'x', '1/', '-1/3']) expect(() => parseShardFlag(bad)).toThrow(XylemapError);
  });
});

describe('shardFromEnv', () => {
  it('takes the Slurm array task relative to SLURM_ARRAY_TASK_MIN (sbatch(1) OUTPUT ENVIRONMENT VARIABLES)', () => {
    expect(shardFromEnv({ SLURM_ARRAY_TASK_ID: '5', SLURM_ARRAY_TASK_MIN: '3', SLURM_ARRAY_TASK_COUNT: '4' })).toEqual({
      index: 2,
      count: 4,
      source: 'slurm',
    });
    expect(shardFromEnv({ SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_MAX: '2' })?.count).toBe(3);
  });
  it('takes the Kubernetes indexed-Job JOB_COMPLETION_INDEX with the count from the flag or XYLEMAP_SHARD_COUNT', () => {
    expect(shardFromEnv({ JOB_COMPLETION_INDEX: '3' }, 5)).toEqual({ index: 3, count: 5, source: 'kubernetes' });
    expect(shardFromEnv({ JOB_COMPLETION_INDEX: '0', XYLEMAP_SHARD_COUNT: '2' })?.count).toBe(2);
    expect(() => shardFromEnv({ JOB_COMPLETION_INDEX: '3' })).toThrow(/shard count/);
  });
  it('returns undefined outside a scheduler', () => {
    expect(shardFromEnv({ PATH: '/bin' })).toBeUndefined();
  });
});

describe('selectShard', () => {
  it('splits the rows into disjoint shards whose union is the manifest', () => {
    const rows = Array.from({ length: 37 }, (_, i) => ({ treeId: `t${i}` }));
    const parts = [0, 1, 2].map((index) => selectShard(rows, { index, count: 3, source: 'flag' }));
    expect(parts.flat().map((r) => r.treeId).sort()).toEqual(rows.map((r) => r.treeId).sort());
    expect(selectShard(rows, undefined)).toHaveLength(37);
  });
});
