import { existsSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import type { Command } from 'commander';
import { analyseHydraulics, HYDRAULICS_CAUTION, HYDRAULICS_COLUMNS } from '../../core/hydraulics/analyse.js';
import { BUILTIN_PRESETS, hydraulicsOptions } from '../../core/hydraulics/options.js';
import { writeFileAtomic } from '../../core/io/atomic.js';
import { readConfigBlock } from '../../core/io/config-file.js';
import { formatSegmentsCsv, parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { mergeSummaryBlock, readExistingSummary } from '../../core/io/summary-file.js';
import { withFile } from '../../core/util/errors.js';
import { addDeclaredFlags, givenFlags } from '../shared/declared-flags.js';
import { readTextFile } from '../shared/files.js';

/**
 * `xylemap hydraulics <DIR/segments.csv>`: adds conduit, conductance, water-potential and PLC
 * columns to segments.csv and the `hydraulics` block to summary.json (merged if present).
 */
export function register(program: Command): void {
  const cmd = program
    .command('hydraulics')
    .argument('<segments>', 'segments.csv of one tree (from reconstruct or simulate), or the folder holding it')
    .summary('conduit sizes, whole-tree conductance, water potentials and safety margin (model estimates)')
    .description(
      [
        'Estimate conduit sizes, segment and whole-tree hydraulic conductance, steady water potentials, embolism (PLC), the critical transpiration and the hydraulic safety margin of a tree network.',
        `CAUTION: ${HYDRAULICS_CAUTION}`,
        `Writes <out>/segments.csv with the added columns ${HYDRAULICS_COLUMNS.join(', ')}, and the "hydraulics" block of <out>/summary.json (merged into an existing one).`,
        `Built-in species presets: ${BUILTIN_PRESETS.join(', ')}. --preset-file FILE uses your own YAML with the keys of core/hydraulics/presets/*.yaml. Precedence: defaults < --config < flags.`,
      ].join('\n\n'),
    )
    .option('--config <file>', 'YAML configuration; its "hydraulics" mapping sets the options below')
    .option('--out <dir>', 'output folder (default: the folder of the input)')
    .option('--json', 'print one JSON object to stdout instead of text');
  const attributes = addDeclaredFlags(cmd, hydraulicsOptions, { booleans: 'switch' });
  cmd.action((segmentsPath: string, flags: Record<string, unknown>, self: Command) => {
    // A tree's output folder works as well as its segments.csv.
    const given = resolve(segmentsPath);
    const input = existsSync(given) && statSync(given).isDirectory() ? join(given, 'segments.csv') : given;
    const outDir = resolve((flags.out as string | undefined) ?? dirname(input));
    const config = flags.config ? readConfig(flags.config as string) : {};
    // Only flags typed on the command line override the configuration (not commander's implied defaults).
    const options = hydraulicsOptions.resolve({ ...config, ...givenFlags(self, flags, attributes) });
    const network = parseSegmentsCsv(readTextFile(input, 'check the path', 'segments table'), input);
    const { summary, segmentColumns } = analyseHydraulics(network, options);
    network.segments.forEach((s, i) => {
      const extra = { ...(s.extra ?? {}) };
      for (const col of HYDRAULICS_COLUMNS) extra[col] = segmentColumns[col][i];
      s.extra = extra;
    });
    const summaryPath = join(outDir, 'summary.json');
    const merged = mergeSummaryBlock(readExistingSummary(summaryPath, join(dirname(input), 'summary.json')), 'hydraulics', summary);
    // Everything is computed before the first write, so a failure leaves no partial output.
    const segmentsOut = join(outDir, 'segments.csv');
    writeFileAtomic(segmentsOut, formatSegmentsCsv(network));
    writeFileAtomic(summaryPath, `${JSON.stringify(merged, null, 2)}\n`);
    if (flags.json) {
      process.stdout.write(`${JSON.stringify({ hydraulics: summary, outputs: { segments_csv: segmentsOut, summary_json: summaryPath } })}\n`);
    } else {
      process.stdout.write(textReport(summary, [segmentsOut, summaryPath]));
    }
  });
}

/** The `hydraulics` mapping of a YAML configuration, validated on its own so errors name the file. */
function readConfig(path: string): Record<string, unknown> {
  const block = readConfigBlock(path, 'hydraulics');
  try {
    hydraulicsOptions.resolve(block);
  } catch (e) {
    throw withFile(e, path);
  }
  return block;
}

function textReport(s: Record<string, unknown>, outputs: string[]): string {
  const num = (v: unknown, digits = 3): string => {
    if (typeof v !== 'number' || !Number.isFinite(v)) return 'n/a';
    const a = Math.abs(v);
    return a !== 0 && (a < 1e-2 || a >= 1e5) ? v.toExponential(digits - 1) : v.toPrecision(digits);
  };
  const whatIf = s.what_if as { da_vinci: Record<string, number>; murray: Record<string, number> };
  const lines = [
    `CAUTION: ${HYDRAULICS_CAUTION}`,
    `preset ${s.preset} (${s.preset_source}); rules ${Object.values(s.rules as object).join(', ')}`,
    `tree conductance           ${num(s.tree_conductance_kg_s_mpa)} kg s⁻¹ MPa⁻¹ (Kirchhoff check: relative difference ${num(s.solver_relative_difference, 2)})`,
    `  per basal area           ${num(s.conductance_per_basal_area_kg_s_mpa_m2)} kg s⁻¹ MPa⁻¹ m⁻²`,
    `  per sapwood area         ${num(s.conductance_per_sapwood_area_kg_s_mpa_m2)} kg s⁻¹ MPa⁻¹ m⁻²`,
    `  leaf-specific            ${num(s.leaf_specific_conductance_kg_s_mpa_m2)} kg s⁻¹ MPa⁻¹ m⁻² (leaf area ${num(s.leaf_area_m2)} m², ${s.leaf_area_source})`,
    `max path length            ${num(s.max_path_length_m)} m`,
    `conduit D_h base / tips    ${num(s.conduit_diameter_base_um)} / ${num(s.conduit_diameter_tips_um)} µm (tips median)`,
    `transpiration              ${num(s.transpiration_kg_s)} kg s⁻¹ (${s.transpiration_source})`,
    `min water potential        ${num(s.min_water_potential_mpa)} MPa (soil ${num(s.soil_water_potential_mpa)} MPa; ${s.steady_state})`,
    `safety margin (min Ψ − P50) ${num(s.safety_margin_mpa)} MPa (P50 ${num(s.p50_mpa)} MPa)`,
    `critical transpiration     ${num(s.critical_transpiration_kg_s)} kg s⁻¹`,
    `what if da Vinci / Murray  ${num(whatIf.da_vinci.tree_conductance_kg_s_mpa)} / ${num(whatIf.murray.tree_conductance_kg_s_mpa)} kg s⁻¹ MPa⁻¹ (× ${num(whatIf.da_vinci.ratio_to_measured)} / × ${num(whatIf.murray.ratio_to_measured)} of measured)`,
    ...(s.warnings as string[]).map((w) => `warning: ${w}`),
    `wrote ${outputs.join(', ')}`,
  ];
  return `${lines.join('\n')}\n`;
}
