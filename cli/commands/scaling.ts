import { existsSync, readFileSync } from 'node:fs';
import { extname, join, resolve } from 'node:path';
import { Option, type Command } from 'commander';
import { writeFileAtomic } from '../../core/io/atomic.js';
import { readConfigFile } from '../../core/io/config-file.js';
import { parseCsv } from '../../core/io/csv.js';
import { parseNetworkJson } from '../../core/io/network-json.js';
import { parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { describeRule, type OptionSpec } from '../../core/options/declare.js';
import { analyseMeasuredFurcations, analyseScaling, type ScalingResult, type ScalingSummary } from '../../core/scaling/analyse.js';
import { formatFurcationsCsv } from '../../core/scaling/furcations-csv.js';
import { isMeasuredFurcationsHeader, MEASURED_COLUMNS, parseMeasuredFurcations } from '../../core/scaling/measured.js';
import { scalingOptions } from '../../core/scaling/options.js';
import { XylemapError } from '../../core/util/errors.js';

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
  const attribute = new Map<string, string>();
  for (const [key, spec] of Object.entries(scalingOptions.specs)) {
    const option = flagFor(key, spec as OptionSpec);
    attribute.set(key, option.attributeName());
    cmd.addOption(option);
  }
  cmd.action((inputPath: string, flags: Record<string, unknown>, self: Command) => {
    const input = resolve(inputPath);
    const config = flags.config ? configBlock(readConfigFile(flags.config as string), flags.config as string) : {};
    const fromFlags: Record<string, unknown> = {};
    for (const [key, attr] of attribute) if (self.getOptionValueSource(attr) === 'cli') fromFlags[key] = flags[attr];
    const options = scalingOptions.resolve({ ...config, ...fromFlags });
    const result = analyseInput(input, readText(input), options);
    const written: string[] = [];
    if (flags.out) {
      const outDir = resolve(flags.out as string);
      const summaryPath = join(outDir, 'summary.json');
      const base = existingSummary(summaryPath) ?? { schema: 'xylemap.summary/1' };
      const others = Array.isArray(base.warnings) ? base.warnings.filter((w) => !(typeof w === 'string' && w.startsWith('scaling: '))) : [];
      const merged = { ...base, scaling: result.summary, warnings: [...others, ...result.summary.warnings.map((w) => `scaling: ${w}`)] };
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

/** `--radius-window-segments <number>` etc. from the declarations. */
function flagFor(key: string, spec: OptionSpec): Option {
  const flag = `--${key.replace(/_/g, '-')}`;
  const unit = spec.type === 'number' && spec.unit !== '1' ? ` [${spec.unit}]` : '';
  if (spec.type === 'boolean') {
    return spec.default ? new Option(`--no-${key.replace(/_/g, '-')}`, `do not: ${spec.help}`) : new Option(flag, spec.help);
  }
  const option = new Option(`${flag} <${spec.type === 'number' ? 'number' : 'value'}>`, `${spec.help}${unit} (default ${JSON.stringify(spec.default)})`);
  if (spec.type === 'enum') return option.choices([...spec.values]);
  if (spec.type === 'number') {
    return option.argParser((raw: string) => {
      const v = Number(raw);
      if (raw.trim() === '' || !Number.isFinite(v)) {
        throw new XylemapError(`must be ${describeRule(spec)}, got "${raw}"`, { stage: 'scaling', option: `scaling.${key}`, hint: spec.help });
      }
      return v;
    });
  }
  return option;
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'read error';
    throw new XylemapError(code === 'ENOENT' ? 'file not found' : `cannot read file (${code})`, {
      file: path,
      hint: 'give a segments.csv, network.json or measured-furcations CSV',
    });
  }
}

function configBlock(value: unknown, file: string): Record<string, unknown> {
  if (value === undefined || value === null) return {};
  if (typeof value !== 'object' || Array.isArray(value)) {
    throw new XylemapError('a configuration must be a YAML mapping of stage names to options', { file });
  }
  const block = (value as Record<string, unknown>).scaling;
  if (block === undefined || block === null) return {};
  if (typeof block !== 'object' || Array.isArray(block)) {
    throw new XylemapError('"scaling" must be a mapping of option keys to values', { file, option: 'scaling' });
  }
  return block as Record<string, unknown>;
}

function existingSummary(path: string): Record<string, unknown> | null {
  if (!existsSync(path)) return null;
  try {
    const value = JSON.parse(readFileSync(path, 'utf8'));
    if (value && typeof value === 'object' && !Array.isArray(value)) return value as Record<string, unknown>;
  } catch {
    // reported below
  }
  throw new XylemapError('existing summary.json is not a JSON object', { file: path, hint: 'fix or remove it, then run again' });
}

const num = (v: number | null | undefined, digits = 3): string => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(digits) : 'n/a');
const ci = (c: [number | null, number | null]): string => `[${num(c[0])}, ${num(c[1])}]`;
const yes = (b: boolean | null): string => (b === null ? 'n/a' : b ? 'yes' : 'no');

function table(header: string[], rows: string[][]): string[] {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)];
}

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
    ...table(
      ['name', 'a', 'difference', `inside ${pct} % (median)`, `inside ${pct} % (pooled)`],
      s.theory.map((t) => [t.name, num(t.value), num(t.difference), yes(t.inside_ci95), yes(t.inside_pooled_ci95)]),
    ),
    '',
    'by order',
    ...table(
      ['grouping', 'group', 'n used', 'excluded', 'estimate', `${pct} % interval`, 'pooled'],
      s.by_order.map((r) => [r.grouping, r.group, String(r.n_used), String(r.n_excluded), num(r.estimate), ci(r.ci95), num(r.pooled)]),
    ),
    '',
    'trend across orders (Spearman, permutation p)',
    ...table(
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
