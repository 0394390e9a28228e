import { batchOptions } from '../batch/options.js';
import { cleanOptions } from '../clean/options.js';
import { hydraulicsOptions } from '../hydraulics/options.js';
import type { OptionSpecs, StageOptions } from '../options/declare.js';
import { reconstructOptions } from '../reconstruct/options.js';
import { reportOptions } from '../report/options.js';
import { scalingOptions } from '../scaling/options.js';
import { scoreOptions, simulateOptions } from '../simulate/options.js';
import type { StageDeclaration } from './config.js';

const decl = (options: StageOptions<OptionSpecs>): StageDeclaration => ({ name: options.stage, options });

/** The stages of `xylemap run`, in order (their options are recorded in run.json). */
export const PIPELINE_DECLARATIONS: readonly StageDeclaration[] = [
  decl(cleanOptions),
  decl(reconstructOptions),
  decl(scalingOptions),
  decl(hydraulicsOptions),
  decl(reportOptions),
];

/**
 * Every stage a configuration file may hold: the pipeline plus batch and the scan lab, so one YAML
 * file serves `run`, `batch`, `simulate` and `score`.
 */
export const CONFIG_DECLARATIONS: readonly StageDeclaration[] = [
  ...PIPELINE_DECLARATIONS,
  decl(batchOptions),
  decl(simulateOptions),
  decl(scoreOptions),
];
