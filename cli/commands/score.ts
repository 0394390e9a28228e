import { existsSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import type { Command } from 'commander';
import { readConfigBlock } from '../../core/io/config-file.js';
import { parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { scoreOptions } from '../../core/simulate/options.js';
import { scoreNetworks, summariesFrom, type ScoreResult } from '../../core/simulate/score.js';
import { addDeclaredFlags, givenFlags } from '../shared/declared-flags.js';
import { readOptionalJson, readTextFile } from '../shared/files.js';
import { textTable } from '../shared/text-table.js';

/**
 * `xylemap score <reconstruction-folder> <truth-folder>`: compare a reconstruction with the truth
 * of a virtual scan. Reads segments.csv of both folders, summary.json where present and the
 * truth folder's truth.json.
 */
export function register(program: Command): void {
  const cmd = program
    .command('score')
    .argument('<reconstruction>', 'folder with segments.csv (and summary.json) of a reconstruction, or a segments.csv')
    .argument('<truth>', 'folder written by `xylemap simulate` (segments.csv, truth.json), or a segments.csv')
    .summary('scan lab: score a reconstruction against the truth of a virtual scan')
    .description(
      [
        'Match reconstructed segments to true ones by axis proximity and direction, and report DBH, height, wood volume, radius errors (median, RMSE, relative) and recovered length per radius class (<1, 1–2.5, 2.5–5, 5–10, >10 cm), furcations found, branching-order agreement and — when the summaries have them — exponent and conductance errors.',
        'Precedence: defaults < --config (its "score" mapping) < flags.',
      ].join('\n\n'),
    )
    .option('--config <file>', 'YAML configuration; its "score" mapping sets the options below')
    .option('--json', 'print one JSON object to stdout instead of a table');
  const attributes = addDeclaredFlags(cmd, scoreOptions);
  cmd.action((reconPath: string, truthPath: string, flags: Record<string, unknown>, self: Command) => {
    const config = flags.config ? readConfigBlock(flags.config as string, 'score') : {};
    const options = scoreOptions.resolve({ ...config, ...givenFlags(self, flags, attributes) });
    const recon = folderOf(reconPath);
    const truth = folderOf(truthPath);
    const reconNet = parseSegmentsCsv(readTextFile(recon.segments, 'a reconstruction folder needs segments.csv'), recon.segments);
    const truthNet = parseSegmentsCsv(readTextFile(truth.segments, 'a truth folder is written by `xylemap simulate --out DIR`'), truth.segments);
    const summaries = summariesFrom(readOptionalJson(join(truth.dir, 'summary.json')), readOptionalJson(join(truth.dir, 'truth.json')), readOptionalJson(join(recon.dir, 'summary.json')));
    const result = scoreNetworks(truthNet, reconNet, options, summaries);
    if (flags.json) process.stdout.write(`${JSON.stringify({ score: result })}\n`);
    else process.stdout.write(textReport(result));
  });
}

function folderOf(path: string): { dir: string; segments: string } {
  const p = resolve(path);
  if (existsSync(p) && statSync(p).isFile()) return { dir: dirname(p), segments: p };
  return { dir: p, segments: join(p, 'segments.csv') };
}

const num = (v: number | null | undefined, digits = 3): string => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : 'n/a');
const pct = (v: number | null | undefined): string => (typeof v === 'number' && Number.isFinite(v) ? `${(100 * v).toFixed(1)} %` : 'n/a');
const signedPct = (v: number | null | undefined): string => (typeof v === 'number' && Number.isFinite(v) ? `${v >= 0 ? '+' : ''}${(100 * v).toFixed(1)} %` : 'n/a');

function textReport(r: ScoreResult): string {
  const lines = [
    `score: ${r.segments.reconstructed} reconstructed vs ${r.segments.true} true segments`,
    `  DBH           true ${num(r.dbh.true_m)} m, reconstructed ${num(r.dbh.reconstructed_m)} m, error ${num(r.dbh.error_m)} m (${signedPct(r.dbh.relative_error)})`,
    `  height        true ${num(r.height.true_m, 2)} m, reconstructed ${num(r.height.reconstructed_m, 2)} m, error ${num(r.height.error_m, 2)} m`,
    `  wood volume   true ${num(r.wood_volume.true_m3, 4)} m³, reconstructed ${num(r.wood_volume.reconstructed_m3, 4)} m³ (${signedPct(r.wood_volume.relative_error)})`,
    `  length        true ${num(r.length.true_m, 1)} m, reconstructed ${num(r.length.reconstructed_m, 1)} m, true length recovered ${pct(r.length.recovered_fraction)}`,
    `  radius        median error ${signedPct(r.radius.median_relative_error)}, RMSE ${pct(r.radius.rmse_relative_error)} (${r.radius.samples} samples)`,
    `  furcations    ${r.furcations.found} of ${r.furcations.true} true found (${pct(r.furcations.found_fraction)}); ${r.furcations.reconstructed} reconstructed`,
    `  branch order  agreement ${pct(r.branch_order_agreement)}, within ±1 ${pct(r.branch_order_within_one)}`,
    `  exponent      ${r.exponent ? `true ${num(r.exponent.true)}, reconstructed ${num(r.exponent.reconstructed)}, error ${num(r.exponent.error)}` : 'n/a (needs scaling.exponent.estimate in the reconstruction summary.json)'}`,
    `  conductance   ${r.conductance ? `true ${num(r.conductance.true_kg_s_mpa, 5)}, reconstructed ${num(r.conductance.reconstructed_kg_s_mpa, 5)} kg s⁻¹ MPa⁻¹ (${signedPct(r.conductance.relative_error)})` : 'n/a (needs hydraulics.tree_conductance_kg_s_mpa in both summary.json)'}`,
    '',
    'by radius class',
    ...textTable(
      ['class', 'true length m', 'recovered', 'radius median', 'radius RMSE', 'true vol m³', 'recon vol m³', 'volume error', 'furcations', 'found'],
      r.by_radius_class.map((c) => [
        c.radius_class,
        num(c.true_length_m, 1),
        pct(c.recovered_fraction),
        signedPct(c.radius_median_relative_error),
        pct(c.radius_rmse_relative_error),
        num(c.true_volume_m3, 4),
        num(c.reconstructed_volume_m3, 4),
        signedPct(c.volume_relative_error),
        String(c.furcations_true),
        pct(c.furcations_found_fraction),
      ]),
    ),
  ];
  return `${lines.join('\n')}\n`;
}
