/**
 * xylemap as a library: the same pipeline the CLI runs, as a typed API, plus the stage functions
 * and types for scripting many trees.
 *
 * @example
 * import { runPipeline } from 'xylemap';
 * const { summary } = await runPipeline({ path: 'tree.laz', outDir: 'out/tree' }, { hydraulics: { preset: 'conifer' } });
 */
export { VERSION } from './version.js';
export { XylemapError, type ErrorContext } from './util/errors.js';
export { createRandom, type Random } from './util/random.js';

// The pipeline and its configuration.
export { runPipeline, resolvePipelineConfig, type RunInput, type RunResult } from './pipeline/run-pipeline.js';
export { PIPELINE, type PipelineConfig, type PipelineContext, type PipelineStage, type ProgressCallback } from './pipeline/stages.js';
export {
  resolveConfig,
  setConfigValue,
  formatDefaultsYaml,
  formatOptionsMarkdown,
  type ResolvedConfig,
  type StageDeclaration,
} from './pipeline/config.js';
export { CONFIG_DECLARATIONS, PIPELINE_DECLARATIONS } from './pipeline/declarations.js';
export { defineOptions, describeRule, type OptionSpecs, type OptionValues, type StageOptions } from './options/declare.js';

// Types.
export { createPointCloud, type PointCloud, type CloudSource } from './types/point-cloud.js';
export { segmentLength, segmentVolumeM3, type Network, type Segment, type Vec3 } from './types/network.js';

// Stages (each a plain function on typed data) and their option declarations.
export { cleanOptions } from './clean/options.js';
export { cleanCloud } from './clean/clean-cloud.js';
export { reconstructOptions } from './reconstruct/options.js';
export { reconstructTree, type ReconstructResult } from './reconstruct/reconstruct-tree.js';
export { SegmentTree } from './topology/node-tree.js';
export { annotateNetwork, furcations, type AnnotatedNetwork } from './topology/annotate.js';
export { treeMetrics, type TreeMetrics } from './topology/metrics.js';
export { scalingOptions } from './scaling/options.js';
export { analyseScaling, type ScalingResult, type ScalingSummary, type FurcationRow } from './scaling/analyse.js';
export { hydraulicsOptions } from './hydraulics/options.js';
export { analyseHydraulics, HYDRAULICS_CAUTION, type HydraulicsResult } from './hydraulics/analyse.js';
export { reportOptions } from './report/options.js';
export { buildReportHtml } from './report/build-report.js';
export { REPORT_CAUTION, type ReportData } from './report/report-data.js';
export { simulateOptions } from './simulate/options.js';
export { simulate, type VirtualScan } from './simulate/simulate.js';

// Reading and writing.
export { readCloud, readPlyMesh, sniffFormat, encodeLas, writeLas, encodePlyPoints, encodePlyMesh } from './io/index.js';
export { formatSegmentsCsv, parseSegmentsCsv, SEGMENT_COLUMNS } from './io/segments-csv.js';
export { formatNetworkJson, parseNetworkJson } from './io/network-json.js';
export { formatGraphml } from './io/graphml.js';
export { readConfigFile, parseConfigText } from './io/config-file.js';
export { writeTreeOutputs, hashFile, TREE_OUTPUT_FILES, type TreeOutputs } from './io/tree-outputs.js';
export { writeFileAtomic } from './io/atomic.js';
