import { availableParallelism } from 'node:os';
import { join, resolve } from 'node:path';
import type { Command } from 'commander';
import { writeFileAtomic } from '../../core/io/atomic.js';
import { readConfigBlock } from '../../core/io/config-file.js';
import { encodeLas } from '../../core/io/las-write.js';
import { formatSegmentsCsv } from '../../core/io/segments-csv.js';
import { simulateOptions } from '../../core/simulate/options.js';
import { PRESETS, presetOptions } from '../../core/simulate/presets.js';
import { simulateParallel, type VirtualScan } from '../../core/simulate/simulate.js';
import { addDeclaredFlags, givenFlags } from '../shared/declared-flags.js';
import { wholeNumberFlag } from '../shared/whole-number-flag.js';

/**
 * `xylemap simulate --preset NAME --seed N --out DIR`: a virtual scan — a generated tree with
 * known architecture, scanned by the simulated terrestrial scanner. Writes DIR/scan.las (or
 * --las FILE), DIR/segments.csv (the truth) and DIR/truth.json.
 */
export function register(program: Command): void {
  const cmd = program
    .command('simulate')
    .summary('scan lab: generate a tree with known architecture and scan it virtually')
    .description(
      [
        'Generate a tree (exact area-preservation exponent at every furcation) and scan it with a simulated terrestrial scanner (occlusion, range noise, beam divergence with mixed pixels, ground, clutter, registration error, optional leaves).',
        'Writes <out>/scan.las (LAS 1.4, point format 6, extra bytes segment_id and label: 0 wood, 1 ground, 2 clutter, 3 mixed pixel, 4 leaf), <out>/segments.csv and <out>/truth.json.',
        `Presets: ${Object.entries(PRESETS)
          .map(([k, p]) => `${k} (${p.summary})`)
          .join('; ')}.`,
        'Precedence: defaults < --preset < --config (its "simulate" mapping) < flags.',
      ].join('\n\n'),
    )
    .requiredOption('--out <dir>', 'folder for segments.csv, truth.json and (by default) scan.las')
    .option('--preset <name>', `starting parameters: ${Object.keys(PRESETS).join(', ')}`)
    .option('--config <file>', 'YAML configuration; its "simulate" mapping sets the options below')
    .option('--las <file>', 'write the scan here instead of <out>/scan.las')
    .option('--threads <n>', 'worker threads for the scan positions (same result for any number; default: available cores)')
    .option('--json', 'print one JSON object to stdout instead of text');
  const attributes = addDeclaredFlags(cmd, simulateOptions);
  cmd.action(async (flags: Record<string, unknown>, self: Command) => {
    const threads = wholeNumberFlag(flags.threads as string | undefined, '--threads', { stage: 'simulate', hint: 'e.g. --threads 2' }) ?? availableParallelism();
    const preset = typeof flags.preset === 'string' ? flags.preset : null;
    const fromPreset = preset ? presetOptions(preset) : {};
    const config = flags.config ? readConfigBlock(flags.config as string, 'simulate') : {};
    const options = simulateOptions.resolve({ ...fromPreset, ...config, ...givenFlags(self, flags, attributes) });
    const started = performance.now();
    const scan = await simulateParallel(options, preset, threads);
    const seconds = (performance.now() - started) / 1000;
    const outDir = resolve(flags.out as string);
    const lasPath = flags.las ? resolve(flags.las as string) : join(outDir, 'scan.las');
    // Encode everything before writing anything, so a failure leaves no partial output.
    const las = encodeLas(scan.cloud, { version: '1.4', pointFormat: 6, extraBytes: ['segment_id', 'label'] });
    const csv = formatSegmentsCsv(scan.tree.network);
    const truth = `${JSON.stringify(scan.truth, null, 2)}\n`;
    writeFileAtomic(lasPath, las);
    writeFileAtomic(join(outDir, 'segments.csv'), csv);
    writeFileAtomic(join(outDir, 'truth.json'), truth);
    const outputs = [lasPath, join(outDir, 'segments.csv'), join(outDir, 'truth.json')];
    if (flags.json) process.stdout.write(`${JSON.stringify({ simulate: { tree: scan.truth.tree, scan: scan.truth.scan, seconds }, outputs })}\n`);
    else process.stdout.write(textReport(scan, seconds, outputs));
  });
}

function textReport(scan: VirtualScan, seconds: number, outputs: string[]): string {
  const t = scan.truth.tree;
  const s = scan.truth.scan;
  const f = (v: number | null, d = 3): string => (v === null ? 'n/a' : v.toFixed(d));
  const lines = [
    `virtual scan (seed ${scan.truth.seed}${scan.truth.preset ? `, preset ${scan.truth.preset}` : ''}), ${seconds.toFixed(1)} s`,
    `  tree     height ${f(t.height_m, 2)} m, DBH ${f(t.dbh_m)} m, wood volume ${f(t.wood_volume_m3)} m³, branch length ${f(t.total_branch_length_m, 1)} m`,
    `           ${t.segment_count} segments, ${t.branch_count} branches, ${t.furcation_count} furcations, ${t.tip_count} tips, max order ${t.max_branch_order}, exponent a ${scan.truth.exponent_a}`,
    `  scan     ${s.positions.length} positions, ${s.rays} rays, ${s.points} points (${Object.entries(s.points_per_label)
      .map(([k, n]) => `${k} ${n}`)
      .join(', ')})`,
    `  coverage (share of true axis length with returns in 5 cm bins; share of circumference seen; returns per m):`,
    ...s.coverage_by_radius_class
      .filter((c) => c.true_length_m > 0)
      .map((c) => `    ${c.radius_class.padEnd(8)} ${f(c.true_length_m, 1).padStart(8)} m  ${(100 * (c.covered_fraction ?? 0)).toFixed(1).padStart(5)} %  arc ${(100 * (c.arc_fraction ?? 0)).toFixed(1).padStart(5)} %  ${f(c.points_per_m, 0).padStart(6)} /m`),
    `wrote ${outputs.join(', ')}`,
  ];
  return `${lines.join('\n')}\n`;
}
