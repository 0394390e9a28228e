#!/usr/bin/env node
import { Command, CommanderError } from 'commander';
import { XylemapError } from '../core/util/errors.js';
import { VERSION } from '../core/version.js';
import { commands } from './commands/index.js';

/**
 * Exit codes: 0 success; 1 bad input or a processing error (one line on stderr);
 * 2 wrong command-line usage; 3 an internal error (a bug: please report it with --debug output).
 */
export const EXIT = { ok: 0, badInput: 1, usage: 2, internal: 3 } as const;

const program = new Command();
program
  .name('xylemap')
  .description('Single-tree terrestrial laser scans to hydraulic architecture.')
  .version(VERSION)
  .option('--debug', 'print stack traces on errors')
  .exitOverride()
  .configureOutput({ outputError: (str, write) => write(str) });

for (const register of commands) register(program);

const debug = process.argv.includes('--debug');
try {
  await program.parseAsync(process.argv);
} catch (error) {
  process.exitCode = report(error);
}

function report(error: unknown): number {
  if (error instanceof CommanderError) {
    // Help and version print through commander and end with code 0.
    return error.exitCode === 0 ? EXIT.ok : EXIT.usage;
  }
  if (error instanceof XylemapError) {
    process.stderr.write(`xylemap: ${error.oneLine()}\n`);
    if (debug) process.stderr.write(`${error.stack}\n`);
    return EXIT.badInput;
  }
  const message = error instanceof Error ? error.message : String(error);
  process.stderr.write(`xylemap: internal error: ${message} — please report this with the output of --debug\n`);
  if (debug && error instanceof Error) process.stderr.write(`${error.stack}\n`);
  return EXIT.internal;
}
