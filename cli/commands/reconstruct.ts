import type { Command } from 'commander';
import { cleanOptions } from '../../core/clean/options.js';
import { reconstructOptions } from '../../core/reconstruct/options.js';
import { reconstructTree } from '../../core/reconstruct/reconstruct-tree.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { readOptionalConfig } from '../../core/io/config-file.js';
import { checkInputFile, hashFile, writeTreeOutputs } from '../../core/io/tree-outputs.js';
import { reconstructOutputs, reconstructSummary } from '../../core/io/reconstruct-outputs.js';
import { XylemapError } from '../../core/util/errors.js';
import { createProgressBar } from '../progress.js';
import { addStageFlags, stageFlagValues } from '../shared/declared-flags.js';

const STAGES = [cleanOptions, reconstructOptions];

/** `xylemap reconstruct <scan> --out DIR`: scan → cleaned cloud → cylinder network and its files. */
export function register(program: Command): void {
  const cmd = program
    .command('reconstruct')
    .description('reconstruct a single-tree scan into a cylinder network (segments.csv, network.json, summary.json, cylinders.ply, labeled-points.las, network.graphml, run.json)')
    .argument('<scan>', 'point cloud of one tree (LAS/LAZ, PLY or ASCII)')
    .requiredOption('--out <dir>', 'output folder (created if needed)')
    .option('--config <file>', 'YAML file with `clean:` and `reconstruct:` blocks (flags override it)')
    .option('--columns <list>', 'ASCII column names in file order, e.g. x,y,z (- skips a column)')
    .option('--json', 'print one JSON object (the summary and the files written) instead of text');
  addStageFlags(cmd, STAGES);
  cmd.action(async (scan: string, opts: Record<string, unknown>) => {
    const startedAt = new Date().toISOString();
    checkInputFile(scan);
    const fromFile = (readOptionalConfig(opts.config as string | undefined) as Record<string, unknown> | undefined) ?? {};
    if (typeof fromFile !== 'object' || Array.isArray(fromFile)) {
      throw new XylemapError('configuration must be a mapping of stage names to options', { file: String(opts.config) });
    }
    const flags = stageFlagValues(opts, STAGES);
    const clean = cleanOptions.resolve({ ...asObject(fromFile.clean), ...flags.clean });
    const reconstruct = reconstructOptions.resolve({ ...asObject(fromFile.reconstruct), ...flags.reconstruct });

    const t0 = performance.now();
    const cloud = await readCloud(scan, { columns: opts.columns as string | undefined });
    const readMs = Math.round(performance.now() - t0);
    const bar = createProgressBar(Boolean(opts.json));
    let result;
    try {
      result = reconstructTree(cloud, { clean, reconstruct }, bar.update);
    } finally {
      bar.done();
    }
    const hash = hashFile(scan);
    const outputs = reconstructOutputs(cloud, result, {
      command: 'reconstruct',
      input: { path: scan, ...hash },
      options: { clean, reconstruct },
      timingsMs: { read: readMs, ...result.timingsMs },
      startedAt,
    });
    const written = writeTreeOutputs(String(opts.out), outputs);
    if (opts.json) {
      process.stdout.write(`${JSON.stringify({ ...reconstructSummary(result, scan), files: written })}\n`);
      return;
    }
    const t = result.tree;
    const lines = [
      `segments ${t.segment_count}, branches ${t.branch_count}, furcations ${t.furcation_count}, tips ${t.tip_count}`,
      `DBH ${t.dbh_m === null ? 'n/a' : `${(t.dbh_m * 100).toFixed(1)} cm`}, height ${t.height_m.toFixed(2)} m, wood volume ${t.wood_volume_m3.toFixed(4)} m³, total length ${t.total_length_m.toFixed(1)} m`,
      `reliable segments ${result.reliability.reliable_count}/${result.reliability.segment_count} (${Math.round(100 * result.reliability.reliable_volume_fraction)} % of volume)`,
      ...result.warnings.map((w) => `warning: ${w}`),
      `wrote ${written.length} files to ${String(opts.out)}`,
    ];
    process.stdout.write(lines.join('\n') + '\n');
  });
}

function asObject(v: unknown): Record<string, unknown> {
  return v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
}
