import type { HydraulicsResult } from '../hydraulics/analyse.js';
import type { ReconstructResult } from '../reconstruct/reconstruct-tree.js';
import type { KeyFigure, ReportData } from '../report/report-data.js';
import { reliabilityFromNetwork } from '../report/report-data.js';
import type { ScalingResult } from '../scaling/analyse.js';
import type { Network } from '../types/network.js';
import { VERSION } from '../version.js';

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/**
 * Gather what report.html shows from the stage results. Kept apart from the report builder so the
 * report depends only on its own plain `ReportData` shape, not on each stage's result types.
 */
export function reportDataFromResults(input: {
  title: string;
  file: string;
  sha256?: string;
  network: Network;
  reconstruction: Pick<ReconstructResult, 'tree' | 'reliability'>;
  scaling: ScalingResult | null;
  hydraulics: HydraulicsResult | null;
  options: Record<string, Record<string, unknown>>;
  warnings: string[];
}): ReportData {
  const { tree } = input.reconstruction;
  const sc = input.scaling?.summary;
  const hy = input.hydraulics?.summary ?? {};
  const cols = input.hydraulics?.segmentColumns;
  const ex = sc?.exponent;
  const ci = ex?.ci95;
  const interval: [number, number] | null = ci && num(ci[0]) !== null && num(ci[1]) !== null ? [ci[0]!, ci[1]!] : null;

  const keyFigures: KeyFigure[] = [
    { id: 'dbh', label: 'DBH', value: num(tree.dbh_m), unit: 'm', digits: 3, note: tree.dbh_m === null ? 'stem shorter than 1.3 m' : undefined },
    { id: 'height', label: 'Height', value: num(tree.height_m), unit: 'm', digits: 3 },
    { id: 'volume', label: 'Wood volume', value: num(tree.wood_volume_m3), unit: 'm³', digits: 3 },
    {
      id: 'exponent',
      label: 'Exponent a',
      value: num(ex?.estimate),
      unit: '',
      digits: 3,
      interval,
      note: ex ? `${Math.round(100 * ex.confidence)} % interval, ${ex.n_used} of ${ex.n_furcations} furcations` : 'scaling not run',
    },
    {
      id: 'conductance',
      label: 'Tree conductance',
      value: num(hy.tree_conductance_kg_s_mpa),
      unit: 'kg s⁻¹ MPa⁻¹',
      digits: 3,
      note: input.hydraulics ? `preset ${String(hy.preset ?? '')}` : 'hydraulics not run',
    },
    {
      id: 'safety-margin',
      label: 'Safety margin',
      value: num(hy.safety_margin_mpa),
      unit: 'MPa',
      digits: 3,
      note: input.hydraulics ? 'min. water potential − P50' : 'hydraulics not run',
    },
    { id: 'min-water-potential', label: 'Min. water potential', value: num(hy.min_water_potential_mpa), unit: 'MPa', digits: 3 },
    { id: 'segments', label: 'Segments', value: input.network.segments.length, unit: '', digits: 6 },
  ];

  const perFurcation = (input.scaling?.furcationRows ?? []).filter((r) => r.weight > 0 && Number.isFinite(r.exponent)).map((r) => r.exponent);
  const excluded = ex
    ? Object.entries(ex.excluded_by_reason)
        .filter(([, n]) => n > 0)
        .map(([reason, n]) => `${reason} ${n}`)
        .join(', ')
    : '';
  const notes: string[] = [];
  if (ex && ex.n_excluded > 0) notes.push(`${ex.n_excluded} of ${ex.n_furcations} furcations excluded from the exponent (${excluded}).`);
  const corrections = Object.entries(input.reconstruction.reliability.corrections ?? {});
  for (const [code, n] of corrections) notes.push(`${n} segment radii replaced by correction "${code}".`);

  return {
    title: input.title,
    source: { file: input.file, sha256: input.sha256, version: VERSION },
    network: input.network,
    layers: {
      conduitDiameterUm: cols?.conduit_diameter_um ?? null,
      waterPotentialMPa: cols?.water_potential_mpa ?? null,
      plcPercent: cols?.plc_percent ?? null,
    },
    exponent: {
      perFurcation,
      estimate: num(ex?.estimate),
      interval,
      intervalLabel: ex ? `${Math.round(100 * ex.confidence)} % interval` : '',
      excludedNote: ex ? `Exponent: ${ex.method}. ${ex.n_used} furcations used${excluded ? `; excluded: ${excluded}` : ''}.` : undefined,
    },
    keyFigures,
    reliability: reliabilityFromNetwork(input.network, notes),
    options: input.options,
    warnings: input.warnings,
  };
}
