import type { PointCloud } from '../types/point-cloud.js';
import type { ReconstructResult } from '../reconstruct/reconstruct-tree.js';
import { formatSegmentsCsv } from './segments-csv.js';
import { formatNetworkJson } from './network-json.js';
import { formatGraphml } from './graphml.js';
import { cylindersMesh } from './cylinders-mesh.js';
import { encodePlyMesh } from './ply.js';
import { encodeLas, lasOptionsLike, type LasWriteOptions } from './las-write.js';
import type { TreeOutputs } from './tree-outputs.js';
import { VERSION } from '../version.js';

export const SUMMARY_SCHEMA = 'xylemap.summary/1';
export const RUN_SCHEMA = 'xylemap.run/1';

/** What run.json records besides the result. */
export interface RunRecord {
  command: string;
  input: { path: string; sha256: string; bytes: number };
  options: Record<string, unknown>;
  /** Wall time per stage, ms (reading and writing included by the caller). */
  timingsMs: Record<string, number>;
  startedAt: string;
}

/** The summary.json object of a reconstruction (other stages add their blocks to it). */
export function reconstructSummary(result: ReconstructResult, source?: string): Record<string, unknown> {
  return {
    schema: SUMMARY_SCHEMA,
    ...(source ? { source } : {}),
    tree: result.tree,
    reliability: result.reliability,
    warnings: result.warnings,
  };
}

/** labeled-points.las: the input points with `segment_id` (int32 extra bytes, -1 = not in the network), LAS 1.4. */
export function encodeLabeledPoints(cloud: PointCloud, pointSegmentId: Int32Array): Uint8Array {
  const like = cloud.source.format === 'las' || cloud.source.format === 'laz' ? lasOptionsLike(cloud) : null;
  const hasRgb = cloud.attributes.red !== undefined;
  const options: LasWriteOptions = {
    version: '1.4',
    pointFormat: hasRgb ? 7 : 6,
    ...(like?.scale ? { scale: like.scale } : {}),
    ...(like?.offset ? { offset: like.offset } : {}),
    ...(like?.vlrs ? { vlrs: like.vlrs } : {}),
    extraBytes: ['segment_id'],
  };
  const labelled: PointCloud = { ...cloud, extra: { ...cloud.extra, segment_id: pointSegmentId }, rawExtraBytes: undefined };
  return encodeLas(labelled, options);
}

/**
 * All output files of `xylemap reconstruct`, encoded in memory (nothing is written here, so a
 * failure leaves no partial output). run.json lists the others.
 */
export function reconstructOutputs(cloud: PointCloud, result: ReconstructResult, run: RunRecord): TreeOutputs {
  const t0 = performance.now();
  const source = run.input.path;
  const outputs: TreeOutputs = {
    'segments.csv': formatSegmentsCsv(result.network),
    'network.json': formatNetworkJson(result.network, { source, tool_version: VERSION }),
    'network.graphml': formatGraphml(result.network),
    'cylinders.ply': encodePlyMesh(cylindersMesh(result.network)),
    'labeled-points.las': encodeLabeledPoints(cloud, result.pointSegmentId),
    'summary.json': JSON.stringify(reconstructSummary(result, source), null, 1) + '\n',
  };
  const timings = { ...run.timingsMs, encode_outputs: Math.round(performance.now() - t0) };
  outputs['run.json'] =
    JSON.stringify(
      {
        schema: RUN_SCHEMA,
        tool: 'xylemap',
        version: VERSION,
        command: run.command,
        started_at: run.startedAt,
        input: { path: run.input.path, sha256: run.input.sha256, bytes: run.input.bytes, point_count: cloud.count },
        options: run.options,
        timings_ms: timings,
        outputs: Object.keys(outputs),
      },
      null,
      1,
    ) + '\n';
  return outputs;
}
