import { basename } from 'node:path';
import { formatFurcationsCsv } from '../scaling/furcations-csv.js';
import { cylindersMesh } from '../io/cylinders-mesh.js';
import { formatGraphml } from '../io/graphml.js';
import { encodeLas, lasOptionsLike, type LasWriteOptions } from '../io/las-write.js';
import { formatNetworkJson } from '../io/network-json.js';
import { encodePlyMesh } from '../io/ply.js';
import { resolvePreset } from '../io/presets.js';
import { readCloud } from '../io/read-cloud.js';
import { readViewerBundle } from '../io/report-assets.js';
import { formatSegmentsCsv } from '../io/segments-csv.js';
import { checkInputFile, hashFile, writeTreeOutputs, TREE_OUTPUT_FILES, type TreeOutputs } from '../io/tree-outputs.js';
import { buildReportHtml } from '../report/build-report.js';
import type { Network } from '../types/network.js';
import type { PointCloud } from '../types/point-cloud.js';
import { VERSION } from '../version.js';
import { resolveConfig } from './config.js';
import { CONFIG_DECLARATIONS } from './declarations.js';
import { reportDataFromResults } from './report-input.js';
import { PIPELINE, type PipelineConfig, type PipelineContext, type ProgressCallback } from './stages.js';

export interface RunInput {
  /** Point cloud file (LAS, LAZ, PLY or ASCII). */
  path: string;
  /** Output folder; when absent, nothing is written and the outputs are only returned. */
  outDir?: string;
}

export interface RunResult {
  /** File name → contents, for every per-tree output. */
  outputs: TreeOutputs;
  /** Paths written (empty without `outDir`). */
  written: string[];
  /** The summary.json object. */
  summary: Record<string, unknown>;
  /** Wall time per stage, ms (also in run.json; nothing else holds timings, so other outputs repeat exactly). */
  timingsMs: Record<string, number>;
  config: PipelineConfig;
}

/**
 * Resolve a configuration for `run`: every stage's options validated (unknown keys and out-of-range
 * values throw a XylemapError naming the key path), defaults filled in.
 * @param input parsed YAML object, or undefined for all defaults
 * @param file the configuration file, named in errors
 */
export function resolvePipelineConfig(input: unknown, file?: string): PipelineConfig {
  return resolveConfig(input, CONFIG_DECLARATIONS, file) as unknown as PipelineConfig;
}

/** JSON with NaN/±Infinity as null (JSON has no such numbers), 2-space indent, trailing newline. */
export function stableJson(value: unknown): string {
  return `${JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2)}\n`;
}

/** Segments with the hydraulics columns attached as `extra` (→ extra columns of segments.csv). */
function withColumns(network: Network, columns: Record<string, Float64Array> | undefined): Network {
  if (!columns) return network;
  const keys = Object.keys(columns);
  return {
    ...network,
    segments: network.segments.map((s, i) => ({ ...s, extra: { ...(s.extra ?? {}), ...Object.fromEntries(keys.map((k) => [k, columns[k][i]])) } })),
  };
}

/**
 * labeled-points.las: the input points with `segment_id` (int32 extra bytes, −1 = not in the
 * network), LAS 1.4 — the layout `xylemap reconstruct` writes (core/io/reconstruct-outputs.ts), but
 * with the creation date taken from the source (or 0/0, "unknown") instead of today, so that a
 * rerun repeats byte for byte.
 */
function encodeLabeledPointsRepeatable(cloud: PointCloud, pointSegmentId: Int32Array): Uint8Array {
  const like = cloud.source.format === 'las' || cloud.source.format === 'laz' ? lasOptionsLike(cloud) : null;
  const options: LasWriteOptions = {
    version: '1.4',
    pointFormat: cloud.attributes.red !== undefined ? 7 : 6,
    ...(like?.scale ? { scale: like.scale } : {}),
    ...(like?.offset ? { offset: like.offset } : {}),
    ...(like?.vlrs ? { vlrs: like.vlrs } : {}),
    extraBytes: ['segment_id'],
    creation: like?.creation ?? { day: 0, year: 0 },
  };
  return encodeLas({ ...cloud, extra: { ...cloud.extra, segment_id: pointSegmentId }, rawExtraBytes: undefined }, options);
}

function time<T>(timings: Record<string, number>, name: string, f: () => T): T {
  const t0 = performance.now();
  try {
    return f();
  } finally {
    timings[name] = Math.round((performance.now() - t0) * 10) / 10;
  }
}

/**
 * The main job in one call: read the cloud, run every stage (clean → reconstruct → scaling →
 * hydraulics), assemble all per-tree outputs in memory, then (with `outDir`) write each file
 * atomically. Options and the species preset are validated before any point is read. Seeded
 * throughout: the same input and options give byte-identical outputs except run.json (timings).
 *
 * @param input the cloud path and the optional output folder
 * @param config parsed YAML object (or an already resolved configuration); undefined = defaults
 * @param options.progress called with (stage, done, total)
 * @throws XylemapError on bad options, a bad input file, or a stage that cannot go on
 * @example const { summary } = await runPipeline({ path: 'tree.laz', outDir: 'out/tree' }, undefined);
 */
export async function runPipeline(input: RunInput, config?: unknown, options: { progress?: ProgressCallback } = {}): Promise<RunResult> {
  const progress = options.progress ?? (() => {});
  const timingsMs: Record<string, number> = {};
  const t0 = performance.now();
  const cfg = resolvePipelineConfig(config);
  const { preset } = resolvePreset(cfg.hydraulics);
  const viewer = readViewerBundle();
  checkInputFile(input.path);
  const { sha256, bytes } = time(timingsMs, 'hash', () => hashFile(input.path));

  progress('read', 0, 1);
  const t = performance.now();
  const cloud = await readCloud(input.path);
  timingsMs.read = Math.round((performance.now() - t) * 10) / 10;
  progress('read', 1, 1);

  const ctx: PipelineContext = { cloud, config: cfg, preset, progress };
  for (const stage of PIPELINE) if (stage.run) time(timingsMs, stage.name, () => stage.run!(ctx));
  const rec = ctx.reconstruction!;
  const network = withColumns(rec.network, ctx.hydraulics?.segmentColumns);
  const hydraulicsSummary = ctx.hydraulics?.summary ?? null;
  // Stage warnings carry the stage name, as `mergeSummaryBlock` writes them for single-stage commands.
  const stageWarnings = (stage: string, block: { warnings?: unknown } | null | undefined): string[] =>
    Array.isArray(block?.warnings) ? block.warnings.map((w) => `${stage}: ${String(w)}`) : [];
  const warnings = [...rec.warnings, ...stageWarnings('scaling', ctx.scaling?.summary), ...stageWarnings('hydraulics', hydraulicsSummary)];

  const file = basename(input.path);
  const summary: Record<string, unknown> = {
    schema: 'xylemap.summary/1',
    input: { file, sha256 },
    tree: rec.tree,
    reliability: rec.reliability,
    scaling: ctx.scaling?.summary ?? null,
    hydraulics: hydraulicsSummary,
    warnings,
  };
  const pipelineOptions = Object.fromEntries(PIPELINE.map((s) => [s.name, cfg[s.name as keyof PipelineConfig]])) as Record<
    string,
    Record<string, unknown>
  >;

  progress('outputs', 0, 2);
  const outputs: TreeOutputs = time(timingsMs, 'outputs', () => {
    const out: TreeOutputs = {};
    out['segments.csv'] = formatSegmentsCsv(network);
    out['furcations.csv'] = formatFurcationsCsv(ctx.scaling?.furcationRows ?? []);
    out['network.json'] = formatNetworkJson(network, { source: file, tool_version: VERSION });
    out['network.graphml'] = formatGraphml(network);
    out['cylinders.ply'] = encodePlyMesh(cylindersMesh(network));
    out['labeled-points.las'] = encodeLabeledPointsRepeatable(cloud, rec.pointSegmentId);
    out['summary.json'] = stableJson(summary);
    return out;
  });
  progress('outputs', 1, 2);
  outputs['report.html'] = time(timingsMs, 'report', () =>
    buildReportHtml(
      reportDataFromResults({
        title: cfg.report.title || file,
        file,
        sha256,
        network,
        reconstruction: rec,
        scaling: ctx.scaling ?? null,
        hydraulics: ctx.hydraulics ?? null,
        options: pipelineOptions,
        warnings,
      }),
      cfg.report,
      viewer,
    ),
  );
  timingsMs.total = Math.round((performance.now() - t0) * 10) / 10;
  const run = {
    schema: 'xylemap.run/1',
    tool: { name: 'xylemap', version: VERSION },
    node: process.version,
    input: { path: input.path, file, sha256, bytes, points: cloud.count },
    pipeline: PIPELINE.map((s) => ({ stage: s.name, ...(s.runsIn ? { runs_in: s.runsIn } : {}) })),
    options: pipelineOptions,
    outputs: TREE_OUTPUT_FILES.filter((n) => n === 'run.json' || outputs[n] !== undefined),
    timings_ms: { ...timingsMs, reconstruct_stages: rec.timingsMs },
  };
  outputs['run.json'] = stableJson(run);
  progress('outputs', 2, 2);
  const written = input.outDir ? writeTreeOutputs(input.outDir, outputs) : [];
  return { outputs, written, summary, timingsMs, config: cfg };
}
