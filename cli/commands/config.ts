import type { Command } from 'commander';
import { readConfigFile } from '../../core/io/config-file.js';
import { formatDefaultsYaml, formatOptionsMarkdown, resolveConfig } from '../../core/pipeline/config.js';
import { CONFIG_DECLARATIONS } from '../../core/pipeline/declarations.js';

/** `xylemap config`: print the commented default YAML or the options docs, or check a file. */
export function register(program: Command): void {
  program
    .command('config')
    .description('print the default configuration (commented YAML) or the options reference, or check a configuration file')
    .option('--print-defaults', 'print every option of every stage with its default, as commented YAML')
    .option('--print-docs', 'print the options reference as Markdown tables')
    .option('--check <file>', 'validate a YAML configuration file (unknown keys and out-of-range values are errors)')
    .option('--json', 'print one JSON object (with --check: the resolved configuration)')
    .action((opts: { printDefaults?: boolean; printDocs?: boolean; check?: string; json?: boolean }, cmd: Command) => {
      const chosen = [opts.printDefaults, opts.printDocs, opts.check !== undefined].filter(Boolean).length;
      if (chosen !== 1) {
        cmd.error('xylemap config: choose exactly one of --print-defaults, --print-docs, --check FILE', { exitCode: 2 });
      }
      if (opts.printDefaults) {
        process.stdout.write(formatDefaultsYaml(CONFIG_DECLARATIONS));
        return;
      }
      if (opts.printDocs) {
        process.stdout.write(formatOptionsMarkdown(CONFIG_DECLARATIONS));
        return;
      }
      const file = opts.check!;
      const resolved = resolveConfig(readConfigFile(file), CONFIG_DECLARATIONS, file);
      const count = Object.values(resolved).reduce((n, o) => n + Object.keys(o).length, 0);
      if (opts.json) process.stdout.write(`${JSON.stringify({ ok: true, file, config: resolved })}\n`);
      else process.stdout.write(`${file}: ok (${count} options in ${Object.keys(resolved).length} stages, defaults filled in)\n`);
    });
}
