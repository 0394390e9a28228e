import type { Command } from 'commander';
import { register as batch } from './batch.js';
import { register as config } from './config.js';
import { register as hydraulics } from './hydraulics.js';
import { register as inspect } from './inspect.js';
import { register as merge } from './merge.js';
import { register as reconstruct } from './reconstruct.js';
import { register as run } from './run.js';
import { register as scaling } from './scaling.js';
import { register as score } from './score.js';
import { register as simulate } from './simulate.js';

/** Each command module exports one `register(program)`; the order here is the order in --help. */
export type RegisterCommand = (program: Command) => void;

export const commands: RegisterCommand[] = [run, inspect, reconstruct, scaling, hydraulics, simulate, score, batch, merge, config];
