import type { Command } from 'commander';
import { readOptionalConfig } from '../../core/io/config-file.js';
import { setConfigValue } from '../../core/pipeline/config.js';
import { runPipeline } from '../../core/pipeline/run-pipeline.js';
import { BUILTIN_PRESETS } from '../../core/hydraulics/options.js';
import { createProgressBar } from '../progress.js';

interface RunFlags {
  out: string;
  config?: string;
  preset?: string;
  json?: boolean;
}

/** `xylemap run`: the main job in one command (all stages, all per-tree outputs, report.html). */
export function register(program: Command): void {
  program
    .command('run')
    .description('the main job: clean → reconstruct → scaling → hydraulics → exports → report.html, for one tree')
    .argument('<cloud>', 'point cloud of one tree (LAS, LAZ, PLY or ASCII)')
    .requiredOption('--out <dir>', 'output folder (created if missing; files in it are replaced)')
    .option('--config <file>', 'YAML configuration (see `xylemap config --print-defaults`); all options are checked before any point is read')
    .option('--preset <name>', `hydraulics species preset (${BUILTIN_PRESETS.join(', ')}); overrides hydraulics.preset of the configuration`)
    .option('--json', 'print one JSON object (files written, key figures, timings) and no progress bar')
    .addHelpText(
      'after',
      '\nOutputs: segments.csv, furcations.csv, network.json, network.graphml, cylinders.ply, labeled-points.las, summary.json, report.html, run.json.\n' +
        'Exit codes: 0 ok, 1 bad input or options (one line on stderr), 2 wrong usage, 3 internal error.\n' +
        'Results are model estimates from geometry plus assumed anatomy, not measurements and not a tree-safety assessment.',
    )
    .action(async (cloud: string, flags: RunFlags) => {
      let config: unknown = readOptionalConfig(flags.config);
      if (flags.preset !== undefined) config = setConfigValue(config, 'hydraulics.preset', flags.preset);
      const bar = createProgressBar(Boolean(flags.json));
      let result;
      try {
        result = await runPipeline({ path: cloud, outDir: flags.out }, config, { progress: bar.update });
      } finally {
        bar.done();
      }
      const s = result.summary as { tree?: Record<string, unknown>; scaling?: { exponent?: Record<string, unknown> } | null; hydraulics?: Record<string, unknown> | null; warnings: string[] };
      const key = {
        dbh_m: s.tree?.dbh_m ?? null,
        height_m: s.tree?.height_m ?? null,
        segment_count: s.tree?.segment_count ?? null,
        exponent: s.scaling?.exponent?.estimate ?? null,
        exponent_ci95: s.scaling?.exponent?.ci95 ?? null,
        tree_conductance_kg_s_mpa: s.hydraulics?.tree_conductance_kg_s_mpa ?? null,
        safety_margin_mpa: s.hydraulics?.safety_margin_mpa ?? null,
      };
      if (flags.json) {
        process.stdout.write(`${JSON.stringify({ ok: true, out: flags.out, files: result.written, key_figures: key, warnings: s.warnings, timings_ms: result.timingsMs })}\n`);
        return;
      }
      const fmt = (v: unknown, unit: string): string => (typeof v === 'number' ? `${Number(v.toPrecision(4))}${unit ? ` ${unit}` : ''}` : '–');
      const ci = Array.isArray(key.exponent_ci95) ? ` [${key.exponent_ci95.map((v) => fmt(v, '')).join(', ')}]` : '';
      const lines = [
        `wrote ${result.written.length} files to ${flags.out}`,
        `  segments ${fmt(key.segment_count, '')}, DBH ${fmt(key.dbh_m, 'm')}, height ${fmt(key.height_m, 'm')}`,
        `  exponent a ${fmt(key.exponent, '')}${ci}; conductance ${fmt(key.tree_conductance_kg_s_mpa, 'kg s⁻¹ MPa⁻¹')}; safety margin ${fmt(key.safety_margin_mpa, 'MPa')}`,
        ...s.warnings.map((w) => `  warning: ${w}`),
        `  open ${flags.out}/report.html (model estimates, not measurements and not a tree-safety assessment)`,
      ];
      process.stdout.write(`${lines.join('\n')}\n`);
    });
}
