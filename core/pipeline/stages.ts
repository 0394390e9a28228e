import { analyseHydraulics, type HydraulicsResult } from '../hydraulics/analyse.js';
import type { HydraulicsOptionValues } from '../hydraulics/options.js';
import { hydraulicsOptions } from '../hydraulics/options.js';
import type { SpeciesPreset } from '../hydraulics/preset.js';
import type { CleanOptionValues } from '../clean/options.js';
import { cleanOptions } from '../clean/options.js';
import { reconstructOptions } from '../reconstruct/options.js';
import { reconstructTree, type ProgressCallback, type ReconstructResult } from '../reconstruct/reconstruct-tree.js';
import { reportOptions } from '../report/options.js';
import type { ReportOptionValues } from '../report/build-report.js';
import { analyseScaling, type ScalingResult } from '../scaling/analyse.js';
import { scalingOptions, type ScalingOptionValues } from '../scaling/options.js';
import type { OptionValues } from '../options/declare.js';
import type { PointCloud } from '../types/point-cloud.js';
import type { StageDeclaration } from './config.js';

export type { ProgressCallback } from '../reconstruct/reconstruct-tree.js';

/** Resolved options of the pipeline's stages (defaults filled in). */
export interface PipelineConfig {
  clean: CleanOptionValues;
  reconstruct: OptionValues<typeof reconstructOptions.specs>;
  scaling: ScalingOptionValues;
  hydraulics: HydraulicsOptionValues;
  report: ReportOptionValues;
}

/** What the stages read and fill in, in order. */
export interface PipelineContext {
  cloud: PointCloud;
  config: PipelineConfig;
  /** Species preset, loaded (and validated) before any point was read. */
  preset: SpeciesPreset;
  progress: ProgressCallback;
  reconstruction?: ReconstructResult;
  scaling?: ScalingResult;
  hydraulics?: HydraulicsResult;
}

export interface PipelineStage extends StageDeclaration {
  /** Run the stage on the context; absent when the stage runs inside another one (`runsIn`). */
  run?: (ctx: PipelineContext) => void;
  /** Name of the stage that carries this one out (clean runs inside reconstruct: they share the neighbourhood graph). */
  runsIn?: string;
  /** Stage that only shapes outputs (report): it runs when the files are assembled. */
  output?: boolean;
}

function need<T>(value: T | undefined, what: string): T {
  if (value === undefined) throw new Error(`pipeline order: ${what} has not run`);
  return value;
}

/**
 * The pipeline as data: stages in order, each with its option declaration and what it does.
 * A run is fully described by this list plus the resolved options (recorded in run.json).
 */
export const PIPELINE: readonly PipelineStage[] = [
  { name: 'clean', options: cleanOptions, runsIn: 'reconstruct' },
  {
    name: 'reconstruct',
    options: reconstructOptions,
    run: (ctx) => {
      ctx.reconstruction = reconstructTree(ctx.cloud, { clean: ctx.config.clean, reconstruct: ctx.config.reconstruct }, ctx.progress);
    },
  },
  {
    name: 'scaling',
    options: scalingOptions,
    run: (ctx) => {
      ctx.progress('scaling', 0, 1);
      ctx.scaling = analyseScaling(need(ctx.reconstruction, 'reconstruct').network, ctx.config.scaling);
      ctx.progress('scaling', 1, 1);
    },
  },
  {
    name: 'hydraulics',
    options: hydraulicsOptions,
    run: (ctx) => {
      ctx.progress('hydraulics', 0, 1);
      ctx.hydraulics = analyseHydraulics(need(ctx.reconstruction, 'reconstruct').network, ctx.config.hydraulics, ctx.preset);
      ctx.progress('hydraulics', 1, 1);
    },
  },
  { name: 'report', options: reportOptions, output: true },
];
