/**
 * Deterministic shard assignment. A tree goes to shard FNV-1a-32(tree_id) mod n, so the same tree
 * always lands in the same shard whatever the order of the manifest rows, and adding trees never
 * moves the others. Shard indices are 0-based (0 … n−1), as Kubernetes completion indices are.
 */
import { XylemapError } from '../util/errors.js';

export interface ShardSpec {
  /** 0-based shard index. */
  index: number;
  count: number;
  /** Where the index came from: "flag", "slurm" or "kubernetes". */
  source: string;
}

/** 32-bit FNV-1a hash of the UTF-8 bytes of a string (Fowler–Noll–Vo, IETF draft-eastlake-fnv). */
export function fnv1a32(text: string): number {
  let h = 0x811c9dc5;
  for (const byte of new TextEncoder().encode(text)) {
    h ^= byte;
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h >>> 0;
}

/** The shard (0 … count−1) of a tree id. */
export function shardOfTree(treeId: string, count: number): number {
  return fnv1a32(treeId) % count;
}

/**
 * Parse `--shard i/n` (0-based i).
 * @throws XylemapError when not "i/n" with integers 0 ≤ i < n.
 */
export function parseShardFlag(text: string): ShardSpec {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!(count >= 1) || !(index >= 0 && index < count)) {
    throw new XylemapError(`--shard must be "i/n" with 0 ≤ i < n (0-based), got "${text}"`, {
      stage: 'batch',
      option: 'shard',
      hint: 'e.g. --shard 0/4 … --shard 3/4 for four shards',
    });
  }
  return { index, count, source: 'flag' };
}

/**
 * The shard from the scheduler's environment, if any: a Slurm array task
 * (`SLURM_ARRAY_TASK_ID` − `SLURM_ARRAY_TASK_MIN`, count `SLURM_ARRAY_TASK_COUNT`, or MAX − MIN + 1)
 * or a Kubernetes indexed Job (`JOB_COMPLETION_INDEX`, count from `shardCount` or
 * `XYLEMAP_SHARD_COUNT`).
 * @throws XylemapError when the variables are present but inconsistent.
 */
export function shardFromEnv(env: Record<string, string | undefined>, shardCount?: number): ShardSpec | undefined {
  const int = (v: string | undefined): number => (v !== undefined && /^\s*\d+\s*$/.test(v) ? Number(v) : NaN);
  if (env.SLURM_ARRAY_TASK_ID !== undefined) {
    const id = int(env.SLURM_ARRAY_TASK_ID);
    const min = env.SLURM_ARRAY_TASK_MIN !== undefined ? int(env.SLURM_ARRAY_TASK_MIN) : 0;
    const max = int(env.SLURM_ARRAY_TASK_MAX);
    let count = shardCount ?? int(env.SLURM_ARRAY_TASK_COUNT);
    if (!(count >= 1) && max >= min) count = max - min + 1;
    const index = id - min;
    if (!(count >= 1) || !(index >= 0 && index < count)) {
      throw new XylemapError(
        `Slurm array variables do not give a shard: SLURM_ARRAY_TASK_ID=${env.SLURM_ARRAY_TASK_ID}, ` +
          `SLURM_ARRAY_TASK_MIN=${env.SLURM_ARRAY_TASK_MIN}, SLURM_ARRAY_TASK_COUNT=${env.SLURM_ARRAY_TASK_COUNT}`,
        { stage: 'batch', option: 'shard', hint: 'submit a contiguous array (e.g. --array=0-3, no step) or pass --shard i/n' },
      );
    }
    return { index, count, source: 'slurm' };
  }
  if (env.JOB_COMPLETION_INDEX !== undefined) {
    const index = int(env.JOB_COMPLETION_INDEX);
    const count = shardCount ?? int(env.XYLEMAP_SHARD_COUNT);
    if (!(count >= 1) || !(index >= 0 && index < count)) {
      throw new XylemapError(
        `Kubernetes completion index ${env.JOB_COMPLETION_INDEX} needs a shard count above it, got ${Number.isNaN(count) ? 'none' : count}`,
        { stage: 'batch', option: 'shard-count', hint: 'pass --shard-count N (the Job\'s completions) or set XYLEMAP_SHARD_COUNT' },
      );
    }
    return { index, count, source: 'kubernetes' };
  }
  return undefined;
}

/** Rows of the manifest that belong to a shard (all rows when no shard). */
export function selectShard<T extends { treeId: string }>(rows: readonly T[], shard: ShardSpec | undefined): T[] {
  if (!shard) return rows.slice();
  return rows.filter((r) => shardOfTree(r.treeId, shard.count) === shard.index);
}
