import type { Command } from 'commander';
import { formatInspectTable, inspectCloud } from '../../core/io/inspect.js';
import { readCloud } from '../../core/io/read-cloud.js';

/** `xylemap inspect <file>`: what a scan file holds (format, counts, bounds from the points, CRS, spacing, histograms, warnings). */
export function register(program: Command): void {
  program
    .command('inspect')
    .description('describe a point-cloud file (LAS/LAZ, PLY, ASCII): format, counts, bounds, CRS, spacing, warnings')
    .argument('<file>', 'point-cloud file; the format is read from the content, not the name')
    .option('--json', 'print one JSON object instead of the table')
    .option('--columns <list>', 'ASCII column names in file order, e.g. x,y,z,intensity (- skips a column)')
    .action(async (file: string, opts: { json?: boolean; columns?: string }) => {
      const cloud = await readCloud(file, { columns: opts.columns, allowEmpty: true });
      const report = inspectCloud(cloud);
      process.stdout.write(opts.json ? `${JSON.stringify(report)}\n` : `${formatInspectTable(report)}\n`);
    });
}
