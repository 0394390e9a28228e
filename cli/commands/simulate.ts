import type { Command } from 'commander';

/** `xylemap simulate`: not registered yet (work in progress). */
export function register(_program: Command): void {}
