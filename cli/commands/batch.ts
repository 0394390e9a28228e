import { availableParallelism } from 'node:os';
import { join, relative, resolve, isAbsolute } from 'node:path';
import type { Command } from 'commander';
import { formatK8sJob, formatSlurmScript, type ArrayJobSpec } from '../../core/batch/emit.js';
import { createTreePool } from '../../core/batch/pool.js';
import { formatProgress, type BatchProgress } from '../../core/batch/run-batch.js';
import { parseShardFlag, shardFromEnv, type ShardSpec } from '../../core/batch/shard.js';
import { writeFileAtomic } from '../../core/io/atomic.js';
import { readManifestFile } from '../../core/io/batch-files.js';
import { batchConfig, runBatchFolder } from '../../core/io/batch-driver.js';
import { readOptionalConfig } from '../../core/io/config-file.js';
import { listPresets } from '../../core/io/presets.js';
import { wholeNumberFlag } from '../shared/whole-number-flag.js';

interface BatchFlags {
  out: string;
  workers?: string;
  treeTimeoutS?: string;
  config?: string;
  inventory?: string;
  shard?: string;
  shardCount?: string;
  emitSlurm?: boolean;
  emitK8s?: boolean;
  jobTime: string;
  jobMem?: string;
  partition?: string;
  image: string;
  claim: string;
  mount: string;
  xylemapCmd?: string;
  json?: boolean;
}

function positiveInt(text: string | undefined, flag: string): number | undefined {
  return wholeNumberFlag(text, flag, { stage: 'batch', option: flag.replace(/^--/, '') });
}

/** Progress on stderr, redrawn in place, only on a terminal and never with --json. */
function progressLine(quiet: boolean): { update: (p: BatchProgress) => void; done: () => void } {
  if (quiet || !process.stderr.isTTY) return { update: () => {}, done: () => {} };
  let drawn = false;
  return {
    update: (p) => {
      process.stderr.write(`\r\x1b[2Kbatch: ${formatProgress(p)}`);
      drawn = true;
    },
    done: () => {
      if (drawn) process.stderr.write('\n');
    },
  };
}

/** A path as seen inside the Kubernetes volume: relative to the current folder, under the mount. */
function inVolume(path: string, mount: string): string {
  const rel = relative(process.cwd(), resolve(path));
  return rel.startsWith('..') || isAbsolute(rel) ? resolve(path) : `${mount.replace(/\/+$/, '')}/${rel}`;
}

function emitJobFiles(manifest: string, flags: BatchFlags, workers: number): Record<string, unknown> {
  const rawConfig = readOptionalConfig(flags.config);
  const options = batchConfig(rawConfig, flags.config);
  const rows = readManifestFile(manifest, { knownPresets: listPresets(), maxPlausibleDbhM: options.max_plausible_dbh_m });
  const shards = positiveInt(flags.shardCount, '--shard-count') ?? Math.min(rows.length, 32);
  const out = resolve(flags.out);
  const mem = flags.jobMem ?? `${4 * workers}G`;
  const base: ArrayJobSpec = {
    shards,
    workers,
    memory: mem,
    time: flags.jobTime,
    jobName: 'xylemap-batch',
    xylemap: flags.xylemapCmd ?? `node ${resolve(process.argv[1])}`,
    manifest: resolve(manifest),
    out,
    config: flags.config ? resolve(flags.config) : undefined,
    inventory: flags.inventory ? resolve(flags.inventory) : undefined,
    logDir: join(out, 'logs'),
    partition: flags.partition,
  };
  const written: string[] = [];
  if (flags.emitSlurm) {
    const p = join(out, 'xylemap-batch.sbatch');
    writeFileAtomic(p, formatSlurmScript(base));
    // sbatch does not create the log folder; an empty marker file creates it.
    writeFileAtomic(join(out, 'logs', '.keep'), '');
    written.push(p);
  }
  if (flags.emitK8s) {
    const p = join(out, 'xylemap-batch.yaml');
    writeFileAtomic(
      p,
      formatK8sJob({
        ...base,
        xylemap: flags.xylemapCmd ?? 'xylemap',
        manifest: inVolume(manifest, flags.mount),
        out: inVolume(flags.out, flags.mount),
        config: flags.config ? inVolume(flags.config, flags.mount) : undefined,
        inventory: flags.inventory ? inVolume(flags.inventory, flags.mount) : undefined,
        image: flags.image,
        claim: flags.claim,
        mountPath: flags.mount,
        parallelism: shards,
      }),
    );
    written.push(p);
  }
  return { ok: true, trees: rows.length, shards, files: written };
}

/** `xylemap batch`: many trees, one worker pool, stand and species tables; shards for cluster array jobs. */
export function register(program: Command): void {
  program
    .command('batch')
    .description('run many trees from a manifest in a worker pool; write the stand table, species comparison and (with an inventory) plot upscaling')
    .argument('<manifest>', 'CSV with columns tree_id, species, file (+ optional field_dbh_m, plot, preset, notes); files relative to the manifest')
    .requiredOption('--out <dir>', 'output folder: trees/<tree_id>/ per tree, stand.csv, species.csv, species.json, stand.json, failures.csv, batch.json')
    .option('--workers <n>', `trees processed at once (worker threads; default: the CPUs, here ${availableParallelism()})`)
    .option('--tree-timeout-s <s>', 'stop a tree that runs longer than this and record it as failed (default: no limit)')
    .option('--config <file>', 'YAML configuration for every tree (its batch: block sets the statistics); checked before any tree')
    .option('--inventory <file>', 'CSV plot_id, plot_area_m2, species, dbh_m (one row per stem) to upscale conductance per ground area')
    .option('--shard <i/n>', 'run only shard i of n (0-based; tree goes to shard FNV-1a(tree_id) mod n); default from SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX')
    .option('--shard-count <n>', 'number of shards when the index comes from the environment (Kubernetes), or the array size for --emit-*')
    .option('--emit-slurm', 'write <out>/xylemap-batch.sbatch (an sbatch array script) instead of processing')
    .option('--emit-k8s', 'write <out>/xylemap-batch.yaml (a Kubernetes indexed Job) instead of processing')
    .option('--job-time <HH:MM:SS>', 'wall-time limit per array task (--emit-slurm)', '04:00:00')
    .option('--job-mem <size>', 'memory per array task, e.g. 8G (--emit-*; default 4G per worker)')
    .option('--partition <name>', 'Slurm partition (--emit-slurm)')
    .option('--image <ref>', 'container image with xylemap on PATH (--emit-k8s)', 'xylemap:latest')
    .option('--claim <name>', 'PersistentVolumeClaim holding manifest, clouds and outputs (--emit-k8s)', 'xylemap-data')
    .option('--mount <path>', 'where the claim is mounted; paths below the current folder map under it (--emit-k8s)', '/data')
    .option('--xylemap-cmd <command>', 'how tasks start xylemap (default: this node + this script for Slurm, "xylemap" for Kubernetes)')
    .option('--json', 'print one JSON object (counts, per-tree status, files) and no progress')
    .addHelpText(
      'after',
      '\nRe-running resumes: a tree whose folder is complete and whose run.json has the same input sha256 and options is skipped.\n' +
        'A failed tree is recorded in failures.csv and never stops the others; the exit code is then 1.\n' +
        'Sharded: run each shard into its own folder, then `xylemap merge <folders…> --out DIR` (same tables as one run).',
    )
    .action(async (manifest: string, flags: BatchFlags) => {
      const workers = positiveInt(flags.workers, '--workers') ?? availableParallelism();
      if (flags.emitSlurm || flags.emitK8s) {
        const r = emitJobFiles(manifest, flags, workers);
        if (flags.json) process.stdout.write(`${JSON.stringify(r)}\n`);
        else process.stdout.write(`${(r.files as string[]).map((f) => `wrote ${f}`).join('\n')}\n  ${r.trees} trees in ${r.shards} shards\n`);
        return;
      }
      const shardCount = positiveInt(flags.shardCount, '--shard-count');
      const shard: ShardSpec | undefined = flags.shard ? parseShardFlag(flags.shard) : shardFromEnv(process.env, shardCount);
      const rawConfig = readOptionalConfig(flags.config);
      // Validate everything before starting threads (runBatchFolder checks again; it is cheap).
      batchConfig(rawConfig, flags.config);
      const progress = progressLine(Boolean(flags.json));
      const timeout = positiveInt(flags.treeTimeoutS, '--tree-timeout-s') ?? 0;
      const pool = createTreePool(workers, timeout);
      let result;
      try {
        result = await runBatchFolder({
          manifestPath: manifest,
          outDir: flags.out,
          workers,
          rawConfig,
          configFile: flags.config,
          inventoryPath: flags.inventory,
          shard,
          processTree: pool.processTree,
          onProgress: progress.update,
        });
      } finally {
        progress.done();
        await pool.close();
      }
      if (flags.json) process.stdout.write(`${JSON.stringify(result)}\n`);
      else {
        const c = result.counts;
        const where = shard ? ` (shard ${shard.index}/${shard.count} from ${shard.source})` : '';
        const lines = [
          `batch${where}: ${c.done} done, ${c.skipped} skipped (up to date), ${c.failed} failed of ${c.total} trees`,
          `  tables in ${result.out}: ${result.files.map((f) => f.slice(result.out.length + 1)).join(', ')}`,
          ...result.trees.filter((t) => t.status === 'failed').map((t) => `  failed ${t.tree_id}: ${t.error}`),
          ...result.warnings.map((w) => `  warning: ${w}`),
        ];
        process.stdout.write(`${lines.join('\n')}\n`);
      }
      if (result.counts.failed > 0) {
        process.stderr.write(`xylemap: ${result.counts.failed} of ${result.counts.total} trees failed — see ${join(result.out, 'failures.csv')}\n`);
        process.exitCode = 1;
      }
    });
}
