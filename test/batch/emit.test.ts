import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { formatK8sJob, formatSlurmScript, k8sMemory, shellQuote } from '../../core/batch/emit.js';

const spec = {
  shards: 4,
  workers: 2,
  memory: '8G',
  time: '02:00:00',
  jobName: 'xylemap-stand',
  xylemap: 'node /opt/xylemap/dist/cli/main.js',
  manifest: '/data/my campaign/manifest.csv',
  out: '/data/out',
  config: '/data/xylemap.yaml',
  logDir: '/data/logs',
};

describe('shellQuote', () => {
  it('leaves safe words alone and single-quotes the rest', () => {
    expect(shellQuote('/a/b.csv')).toBe('/a/b.csv');
    expect(shellQuote("it's here")).toBe(`'it'\\''s here'`);
  });
});

describe('formatSlurmScript', () => {
  const text = formatSlurmScript(spec);
  it('declares the array, resources and log paths as #SBATCH lines (sbatch(1) options)', () => {
    expect(text.startsWith('#!/bin/bash\n')).toBe(true);
    expect(text).toContain('#SBATCH --array=0-3');
    expect(text).toContain('#SBATCH --cpus-per-task=2');
    expect(text).toContain('#SBATCH --mem=8G');
    expect(text).toContain('#SBATCH --output=/data/logs/xylemap-stand-%A_%a.out');
  });
  it('runs the exact xylemap command per task with a quoted manifest path and a per-task folder', () => {
    expect(text).toContain(
      "node /opt/xylemap/dist/cli/main.js batch '/data/my campaign/manifest.csv' --out /data/out/shard-${SLURM_ARRAY_TASK_ID} --shard-count 4 --workers 2 --config /data/xylemap.yaml",
    );
  });
  it('is a script bash can parse (bash -n)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'xylemap-emit-'));
    const f = join(dir, 'job.sbatch');
    writeFileSync(f, text);
    try {
      expect(() => execFileSync('bash', ['-n', f])).not.toThrow();
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('k8sMemory', () => {
  it('turns Slurm sizes into Kubernetes binary quantities', () => {
    expect(k8sMemory('8G')).toBe('8Gi');
    expect(k8sMemory('500M')).toBe('500Mi');
    expect(k8sMemory('2048')).toBe('2048Mi');
  });
});

describe('formatK8sJob', () => {
  it('is an Indexed batch/v1 Job whose completion index picks the shard (Kubernetes Job API reference)', () => {
    const doc = parse(formatK8sJob({ ...spec, image: 'registry.example/xylemap:0.1', claim: 'stand-data', mountPath: '/data', parallelism: 2 }));
    expect(doc.apiVersion).toBe('batch/v1');
    expect(doc.kind).toBe('Job');
    expect(doc.spec.completionMode).toBe('Indexed');
    expect(doc.spec.completions).toBe(4);
    expect(doc.spec.parallelism).toBe(2);
    const c = doc.spec.template.spec.containers[0];
    expect(doc.spec.template.spec.restartPolicy).toBe('Never');
    expect(c.args).toContain('/data/out/shard-$(XYLEMAP_SHARD_INDEX)');
    expect(c.args).toContain('$(XYLEMAP_SHARD_INDEX)/4');
    // the downward-API field that carries the completion index (Kubernetes Indexed Job docs)
    expect(c.env[0].valueFrom.fieldRef.fieldPath).toBe("metadata.annotations['batch.kubernetes.io/job-completion-index']");
    expect(c.resources.requests).toEqual({ cpu: '2', memory: '8Gi' });
    expect(doc.spec.template.spec.volumes[0].persistentVolumeClaim.claimName).toBe('stand-data');
  });
});
