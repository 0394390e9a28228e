import { extname, join, resolve } from 'node:path';
import type { Command } from 'commander';
import { writeFileAtomic } from '../../core/io/atomic.js';
import { readConfigBlock } from '../../core/io/config-file.js';
import { parseCsv } from '../../core/io/csv.js';
import { parseNetworkJson } from '../../core/io/network-json.js';
import { parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { analyseMeasuredFurcations, analyseScaling, type ScalingResult, type ScalingSummary } from '../../core/scaling/analyse.js';
import { formatFurcationsCsv } from '../../core/scaling/furcations-csv.js';
import { isMeasuredFurcationsHeader, MEASURED_COLUMNS, parseMeasuredFurcations } from '../../core/scaling/measured.js';
import { scalingOptions } from '../../core/scaling/options.js';
import { mergeSummaryBlock, readExistingSummary } from '../../core/io/summary-file.js';
import { addDeclaredFlags, givenFlags } from '../shared/declared-flags.js';
import { readTextFile } from '../shared/files.js';
import { textTable } from '../shared/text-table.js';

/**
 * `xylemap scaling <segments.csv | network.json | furcations-measured.csv>`: area-preservation
 * exponent with its interval, theory table, by-order table; with --out, furcations.csv and the
 * `scaling` block of summary.json (merged into an existing one).
 */
export function register(program: Command): void {
  const cmd = program
    .command('scaling')
    .argument('<input>', 'segments.csv or network.json of one tree, or a CSV of measured diameters at furcations')
    .summary('area-preservation exponent (da Vinci 2 … Murray 3) with an honest interval, by order; WBE ratios; taper')
    .description(
      `Solve Σ (r_child/r_parent)^a = 1 at every furcation and estimate the tree's exponent a
(median over furcations, and a pooled least-squares value) with an interval that combines the
spread over furcations (bootstrap) and each radius' standard error (Monte Carlo); compare it with
da Vinci (2), Murray (3), 11/4, 7/4 and (m + n)/2; by centrifugal order, Strahler order and parent
radius class, with a trend test; West–Brown–Enquist ratios; taper and pipe-model fits.

Measured diameters: a CSV with columns ${MEASURED_COLUMNS.join(', ')}
(one row per branch, role parent|child, the last four optional).
With --out DIR writes DIR/furcations.csv and the "scaling" block of DIR/summary.json.
Precedence: defaults < --config < flags.`,
    )
    .option('--config <file>', 'YAML configuration; its "scaling" mapping sets the options below')
    .option('--out <dir>', 'write furcations.csv and summary.json here')
    .option('--json', 'print one JSON object to stdout instead of tables');
  const attributes = addDeclaredFlags(cmd, scalingOptions, { booleans: 'switch' });
  cmd.action((inputPath: string, flags: Record<string, unknown>, self: Command) => {
    const input = resolve(inputPath);
    const config = flags.config ? readConfigBlock(flags.config as string, 'scaling') : {};
    const options = scalingOptions.resolve({ ...config, ...givenFlags(self, flags, attributes) });
    const result = analyseInput(input, readTextFile(input, 'give a segments.csv, network.json or measured-furcations CSV'), options);
    const written: string[] = [];
    if (flags.out) {
      const outDir = resolve(flags.out as string);
      const summaryPath = join(outDir, 'summary.json');
      const merged = mergeSummaryBlock(readExistingSummary(summaryPath), 'scaling', result.summary);
      const furcationsPath = join(outDir, 'furcations.csv');
      const csv = formatFurcationsCsv(result.furcationRows);
      writeFileAtomic(furcationsPath, csv);
      writeFileAtomic(summaryPath, `${JSON.stringify(merged, null, 2)}\n`);
      written.push(furcationsPath, summaryPath);
    }
    if (flags.json) process.stdout.write(`${JSON.stringify({ scaling: result.summary, outputs: written })}\n`);
    else process.stdout.write(textReport(result.summary, written));
  });
}

function analyseInput(path: string, text: string, options: ReturnType<typeof scalingOptions.resolve>): ScalingResult {
  if (extname(path).toLowerCase() === '.json') return analyseScaling(parseNetworkJson(text, path), options);
  const { header } = parseCsv(text.slice(0, text.indexOf('\n') >= 0 ? text.indexOf('\n') + 1 : text.length));
  if (isMeasuredFurcationsHeader(header)) return analyseMeasuredFurcations(parseMeasuredFurcations(text, path), options);
  return analyseScaling(parseSegmentsCsv(text, path), options);
}

const num = (v: number | null | undefined, digits = 3): string => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : 'n/a');
const ci = (c: [number | null, number | null]): string => `[${num(c[0])}, ${num(c[1])}]`;
const yes = (b: boolean | null): string => (b === null ? 'n/a' : b ? 'yes' : 'no');

function textReport(s: ScalingSummary, written: string[]): string {
  const e = s.exponent;
  const pct = Math.round(e.confidence * 100);
  const reasons = Object.entries(e.excluded_by_reason)
    .filter(([, n]) => n > 0)
    .map(([r, n]) => `${r} ${n}`)
    .join(', ');
  const censored = Object.entries(e.censored_by_reason)
    .filter(([, n]) => n > 0)
    .map(([r, n]) => `${r} ${n}`)
    .join(', ');
  const lines = [
    `area-preservation exponent a (Σ r_child^a = r_parent^a)`,
    `  estimate (median)   ${num(e.estimate)}  ${pct} % interval ${ci(e.ci95)}   Huber ${num(e.huber)}`,
    `  pooled (LS)         ${num(s.pooled.estimate)}  ${pct} % interval ${ci(s.pooled.ci95)}`,
    `  furcations          ${e.n_used} used of ${e.n_furcations} (${e.n_solved} solved, ${e.n_used - e.n_solved} censored${censored ? `: ${censored}` : ''}); excluded ${e.n_excluded}${reasons ? ` (${reasons})` : ''}`,
    `  spread              observed SD ${num(e.observed_sd)}, from radius errors ${num(e.measurement_sd)}`,
    '',
    'theory',
    ...textTable(
      ['name', 'a', 'difference', `inside ${pct} % (median)`, `inside ${pct} % (pooled)`],
      s.theory.map((t) => [t.name, num(t.value), num(t.difference), yes(t.inside_ci95), yes(t.inside_pooled_ci95)]),
    ),
    '',
    'by order',
    ...textTable(
      ['grouping', 'group', 'n used', 'excluded', 'estimate', `${pct} % interval`, 'pooled'],
      s.by_order.map((r) => [r.grouping, r.group, String(r.n_used), String(r.n_excluded), num(r.estimate), ci(r.ci95), num(r.pooled)]),
    ),
    '',
    'trend across orders (Spearman, permutation p)',
    ...textTable(
      ['variable', 'n', 'rho', 'p'],
      s.trend.map((t) => [t.variable, String(t.n), num(t.spearman_rho), num(t.p_value)]),
    ),
    '',
    `WBE: n ${num(s.wbe.pooled.branching_ratio_n)}, β ${num(s.wbe.pooled.radius_ratio_beta)}, γ ${num(s.wbe.pooled.length_ratio_gamma)}, a from β ${num(s.wbe.pooled.exponent_from_beta)}, θ ${num(s.wbe.pooled.theta)} ${ci(s.wbe.pooled.theta_ci95)}`,
  ];
  if (s.taper) {
    const t = s.taper;
    lines.push(
      `taper: r ∝ (distance from apex)^${num(t.radius_vs_distance_from_apex.exponent)} ${ci(t.radius_vs_distance_from_apex.ci95)}; r ∝ (path from base)^${num(t.radius_vs_path_length_from_base.exponent)}; per branch median ${num(t.per_branch.median_exponent)} (${t.per_branch.n_branches} branches)`,
      `pipe model: area ∝ tips^${num(t.area_vs_tips_supplied.exponent)} ${ci(t.area_vs_tips_supplied.ci95)}, area ∝ length supplied^${num(t.area_vs_length_supplied.exponent)} ${ci(t.area_vs_length_supplied.ci95)} (pipe model: 1)`,
    );
  }
  for (const w of s.warnings) lines.push(`warning: ${w}`);
  if (written.length > 0) lines.push(`wrote ${written.join(', ')}`);
  return `${lines.join('\n')}\n`;
}
