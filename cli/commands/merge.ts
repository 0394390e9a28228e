import type { Command } from 'commander';
import { mergeBatchFolders } from '../../core/io/batch-driver.js';
import { readOptionalConfig } from '../../core/io/config-file.js';

interface MergeFlags {
  out: string;
  config?: string;
  inventory?: string;
  json?: boolean;
}

/** `xylemap merge`: the stand tables of a sharded batch, identical to those of a single run. */
export function register(program: Command): void {
  program
    .command('merge')
    .description('join the folders of a sharded `xylemap batch` into one stand table, species comparison and plot upscaling')
    .argument('<folders...>', 'output folders of the shards (each holds batch.json and trees/)')
    .requiredOption('--out <dir>', 'folder for stand.csv, species.csv, species-pairs.csv, species.json, stand.json, failures.csv (+ plots.csv, stems.csv)')
    .option('--config <file>', 'YAML configuration whose batch: block sets the statistics (default: the batch options the shards recorded)')
    .option('--inventory <file>', 'CSV plot_id, plot_area_m2, species, dbh_m (one row per stem) to upscale conductance per ground area')
    .option('--json', 'print one JSON object')
    .action((folders: string[], flags: MergeFlags) => {
      const rawConfig = readOptionalConfig(flags.config);
      const r = mergeBatchFolders(folders, flags.out, rawConfig, flags.config, flags.inventory);
      if (flags.json) {
        process.stdout.write(`${JSON.stringify(r)}\n`);
        return;
      }
      const lines = [
        `merged ${folders.length} folder${folders.length > 1 ? 's' : ''}: ${r.tree_count} trees, ${r.failed_count} failed`,
        `  tables in ${r.out}: ${r.files.map((f) => f.slice(r.out.length + 1)).join(', ')}`,
        ...r.warnings.map((w) => `  warning: ${w}`),
      ];
      process.stdout.write(`${lines.join('\n')}\n`);
    });
}
