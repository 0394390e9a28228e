/**
 * Job files for existing cluster schedulers: a Slurm `sbatch` array script and a Kubernetes
 * indexed Job. Each array task / completion index runs `xylemap batch … ` on one shard (the task
 * reads its index from the scheduler's environment) into its own folder; `xylemap merge` then
 * joins the shard folders. Nothing here schedules anything itself.
 */
import { stringify } from 'yaml';

export interface ArrayJobSpec {
  /** Number of shards = array size / completions. */
  shards: number;
  /** Worker threads per task (= CPUs requested per task). */
  workers: number;
  /** Memory per task, e.g. "8G" (Slurm) — converted for Kubernetes. */
  memory: string;
  /** Wall-time limit per task, Slurm format "HH:MM:SS". */
  time: string;
  jobName: string;
  /** Command that runs xylemap on the cluster, e.g. "node /opt/xylemap/dist/cli/main.js" or "xylemap". */
  xylemap: string;
  manifest: string;
  /** Folder that receives one sub-folder per shard (`shard-<i>`) and the merged tables (`merged`). */
  out: string;
  config?: string;
  inventory?: string;
  /** Slurm: folder for the task logs. */
  logDir: string;
  partition?: string;
}

/** Quote a word for a POSIX shell when it holds anything but safe characters. */
export function shellQuote(word: string): string {
  return /^[A-Za-z0-9_./:=@%+-]+$/.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}

/** The per-shard xylemap command line (shell words; `shardOut` is inserted unquoted). */
function batchWords(s: ArrayJobSpec, shardOut: string, quote: (w: string) => string): string {
  const words = [s.xylemap, 'batch', quote(s.manifest), '--out', shardOut, '--shard-count', String(s.shards), '--workers', String(s.workers)];
  if (s.config) words.push('--config', quote(s.config));
  return words.join(' ');
}

/** A ready `sbatch` script for an array of `shards` tasks (indices 0 … shards−1). */
export function formatSlurmScript(s: ArrayJobSpec): string {
  const q = shellQuote;
  const out = s.out.replace(/\/+$/, '');
  const merge = [s.xylemap, 'merge', `${q(out)}/shard-*`, '--out', `${q(out)}/merged`];
  if (s.inventory) merge.push('--inventory', q(s.inventory));
  if (s.config) merge.push('--config', q(s.config));
  const lines = [
    '#!/bin/bash',
    `# xylemap batch as a Slurm array job: ${s.shards} task(s), one shard of the manifest each.`,
    `# Submit:  jobid=$(sbatch --parsable ${q(`${out}/${s.jobName}.sbatch`)})`,
    `# Merge when all tasks are done:`,
    `#   sbatch --dependency=afterany:$jobid --wrap ${q(merge.join(' '))}`,
    `#SBATCH --job-name=${s.jobName}`,
    `#SBATCH --array=0-${s.shards - 1}`,
    '#SBATCH --ntasks=1',
    `#SBATCH --cpus-per-task=${s.workers}`,
    `#SBATCH --mem=${s.memory}`,
    `#SBATCH --time=${s.time}`,
    `#SBATCH --output=${s.logDir.replace(/\/+$/, '')}/${s.jobName}-%A_%a.out`,
    `#SBATCH --error=${s.logDir.replace(/\/+$/, '')}/${s.jobName}-%A_%a.err`,
  ];
  if (s.partition) lines.push(`#SBATCH --partition=${s.partition}`);
  lines.push(
    'set -euo pipefail',
    '# The shard index comes from SLURM_ARRAY_TASK_ID (minus SLURM_ARRAY_TASK_MIN); xylemap reads it itself.',
    `${batchWords(s, `${q(out)}/shard-\${SLURM_ARRAY_TASK_ID}`, q)}`,
    '',
  );
  return lines.join('\n');
}

/** Kubernetes memory quantity from a Slurm-style size ("8G" → "8Gi", "500M" → "500Mi"). */
export function k8sMemory(memory: string): string {
  const m = /^(\d+)([KMGT]?)$/i.exec(memory.trim());
  if (!m) return memory;
  const unit = m[2].toUpperCase();
  return unit === '' ? `${m[1]}Mi` : `${m[1]}${unit}i`;
}

export interface K8sJobSpec extends ArrayJobSpec {
  image: string;
  /** PersistentVolumeClaim holding the manifest, the clouds, the config and the outputs. */
  claim: string;
  /** Where the claim is mounted in the container; paths in the spec are inside it. */
  mountPath: string;
  /** Tasks running at once. */
  parallelism: number;
}

/**
 * An indexed Job (completionMode: Indexed): completion index i runs shard i. The index reaches the
 * command line through the downward API (annotation batch.kubernetes.io/job-completion-index →
 * XYLEMAP_SHARD_INDEX), which Kubernetes expands in `args` as $(XYLEMAP_SHARD_INDEX).
 */
export function formatK8sJob(s: K8sJobSpec): string {
  const out = s.out.replace(/\/+$/, '');
  const args = ['batch', s.manifest, '--out', `${out}/shard-$(XYLEMAP_SHARD_INDEX)`, '--shard', `$(XYLEMAP_SHARD_INDEX)/${s.shards}`, '--workers', String(s.workers)];
  if (s.config) args.push('--config', s.config);
  const mergeArgs = ['merge', `${out}/shard-*`, '--out', `${out}/merged`];
  if (s.inventory) mergeArgs.push('--inventory', s.inventory);
  if (s.config) mergeArgs.push('--config', s.config);
  const job = {
    apiVersion: 'batch/v1',
    kind: 'Job',
    metadata: { name: s.jobName, labels: { app: 'xylemap' } },
    spec: {
      completionMode: 'Indexed',
      completions: s.shards,
      parallelism: Math.min(s.parallelism, s.shards),
      backoffLimit: Math.max(6, s.shards),
      template: {
        metadata: { labels: { app: 'xylemap' } },
        spec: {
          restartPolicy: 'Never',
          containers: [
            {
              name: 'xylemap',
              image: s.image,
              command: s.xylemap.split(/\s+/),
              args,
              env: [
                {
                  name: 'XYLEMAP_SHARD_INDEX',
                  valueFrom: { fieldRef: { fieldPath: "metadata.annotations['batch.kubernetes.io/job-completion-index']" } },
                },
                { name: 'XYLEMAP_SHARD_COUNT', value: String(s.shards) },
              ],
              resources: {
                requests: { cpu: String(s.workers), memory: k8sMemory(s.memory) },
                limits: { cpu: String(s.workers), memory: k8sMemory(s.memory) },
              },
              volumeMounts: [{ name: 'data', mountPath: s.mountPath }],
            },
          ],
          volumes: [{ name: 'data', persistentVolumeClaim: { claimName: s.claim } }],
        },
      },
    },
  };
  const head = [
    `# xylemap batch as a Kubernetes indexed Job: ${s.shards} completion(s), completion index i runs shard i.`,
    `# Apply: kubectl apply -f ${s.jobName}.yaml (the claim must hold the manifest, its clouds at paths relative to it, and the config); wait: kubectl wait --for=condition=complete job/${s.jobName} --timeout=24h`,
    `# Merge (e.g. in a one-off pod with the same volume): ${[s.xylemap, ...mergeArgs].join(' ')}`,
    '',
  ];
  return head.join('\n') + stringify(job);
}
