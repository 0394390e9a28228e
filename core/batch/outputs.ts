/**
 * Every stand-level table of a batch, as text, from the finished trees alone. A single run and a
 * merge of shard folders both call this one function, which is why their tables are identical.
 */
import { formatCsv } from '../io/csv.js';
import type { BatchOptionValues } from './options.js';
import { compareSpecies, formatSpeciesCsv, formatSpeciesPairsCsv } from './species.js';
import { formatStandCsv, inManifestOrder, standRow, type TreeRecord } from './stand.js';
import { formatPlotsCsv, formatStemsCsv, upscaleInventory, type InventoryStem, type Upscaling } from './upscale.js';
import { XylemapError } from '../util/errors.js';

export interface FailedTree {
  index: number;
  treeId: string;
  species: string;
  file: string;
  error: string;
}

/** failures.csv text (header only when nothing failed), in manifest order. */
export function formatFailuresCsv(failures: readonly FailedTree[]): string {
  return formatCsv(
    ['tree_id', 'species', 'file', 'error'],
    inManifestOrder(failures).map((f) => [f.treeId, f.species, f.file, f.error]),
  );
}

const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

/**
 * The stand outputs by file name: stand.csv, stand.json, species.csv, species-pairs.csv,
 * species.json, failures.csv, and with an inventory plots.csv and stems.csv.
 */
export function standOutputs(
  records: readonly TreeRecord[],
  failures: readonly FailedTree[],
  options: BatchOptionValues,
  inventory?: readonly InventoryStem[],
): { files: Record<string, string>; warnings: string[] } {
  const warnings: string[] = [];
  const { comparison, fits } = compareSpecies(records, options);
  const out: Record<string, string> = {
    'stand.csv': formatStandCsv(records),
    'species.csv': formatSpeciesCsv(comparison),
    'species-pairs.csv': formatSpeciesPairsCsv(comparison),
    'species.json': JSON.stringify(comparison, null, 2) + '\n',
    'failures.csv': formatFailuresCsv(failures),
  };
  let upscaling: unknown = null;
  const u = inventory ? tryUpscale(inventory, fits, options, warnings) : undefined;
  if (inventory && !u) upscaling = { error: warnings[warnings.length - 1] };
  if (u) {
    out['plots.csv'] = formatPlotsCsv(u);
    out['stems.csv'] = formatStemsCsv(u);
    upscaling = {
      confidence: u.confidence,
      method: u.method,
      bootstrap_replicates: u.bootstrapReplicates,
      bootstrap_failed: u.bootstrapFailed,
      plots: u.plots.map((p) => ({
        plot_id: p.plotId,
        plot_area_m2: p.plotAreaM2,
        stem_count: p.stemCount,
        stems_species_fit: p.stemsSpeciesFit,
        stems_pooled_fit: p.stemsPooledFit,
        stems_outside_scanned_dbh: p.stemsOutsideScannedRange,
        conductance_kg_s_mpa: finite(p.conductanceKgPerSPerMPa),
        conductance_per_ground_area_kg_s_mpa_m2: finite(p.conductancePerAreaKgPerSPerMPaPerM2),
        ci: [finite(p.ci[0]), finite(p.ci[1])],
      })),
      stems: u.stems.map((s) => ({
        line: s.line,
        plot_id: s.plotId,
        species: s.species,
        dbh_m: s.dbhM,
        fit: s.fit,
        conductance_kg_s_mpa: finite(s.conductanceKgPerSPerMPa),
        outside_scanned_dbh: s.outsideScannedRange,
      })),
    };
  }
  const stand = {
    schema: 'xylemap.stand/1',
    tree_count: records.length,
    failed_count: failures.length,
    options,
    trees: inManifestOrder(records).map((t) => {
      const r = standRow(t);
      return {
        tree_id: r.treeId,
        species: r.species,
        plot: r.plot,
        preset: r.preset,
        file: r.file,
        field_dbh_m: finite(r.fieldDbhM),
        dbh_m: finite(r.dbhM),
        height_m: finite(r.heightM),
        wood_volume_m3: finite(r.woodVolumeM3),
        total_length_m: finite(r.totalLengthM),
        segment_count: finite(r.segmentCount),
        furcation_count: finite(r.furcationCount),
        max_branch_order: finite(r.maxBranchOrder),
        reliable_fraction: finite(r.reliableFraction),
        exponent: finite(r.exponent),
        exponent_ci95: [finite(r.exponentCiLow), finite(r.exponentCiHigh)],
        tree_conductance_kg_s_mpa: finite(r.treeConductanceKgPerSPerMPa),
        conductance_per_basal_area_kg_s_mpa_m2: finite(r.conductancePerBasalAreaKgPerSPerMPaPerM2),
        leaf_specific_conductance_kg_s_mpa_m2: finite(r.leafSpecificConductanceKgPerSPerMPaPerM2),
        critical_transpiration_kg_s: finite(r.criticalTranspirationKgPerS),
        min_water_potential_mpa: finite(r.minWaterPotentialMPa),
        safety_margin_mpa: finite(r.safetyMarginMPa),
        warning_count: r.warningCount,
      };
    }),
    failures: inManifestOrder(failures).map((f) => ({ tree_id: f.treeId, error: f.error })),
    upscaling,
  };
  out['stand.json'] = JSON.stringify(stand, null, 2) + '\n';
  return { files: out, warnings };
}

/** Upscaling that cannot stop the other tables: a XylemapError becomes a warning. */
function tryUpscale(
  inventory: readonly InventoryStem[],
  fits: ReturnType<typeof compareSpecies>['fits'],
  options: BatchOptionValues,
  warnings: string[],
): Upscaling | undefined {
  try {
    return upscaleInventory(inventory, fits, options);
  } catch (e) {
    if (!(e instanceof XylemapError)) throw e;
    warnings.push(`inventory not upscaled: ${e.message}`);
    return undefined;
  }
}
