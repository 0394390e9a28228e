import type { Network } from '../types/network.js';
import { SegmentTree } from '../topology/node-tree.js';
import { XylemapError } from '../util/errors.js';
import { resolvePreset } from '../io/presets.js';
import { conduitLayout, type ConduitLayout, type ConduitRule, type CountRule, type SapwoodRule } from './conduits.js';
import { segmentConductanceKgPerSPerPa } from './conductance.js';
import { criticalTranspiration, steadyFlow, type FlowSetup } from './flow.js';
import { pathGeometry, type PathGeometry } from './geometry.js';
import { treeConductanceByKirchhoff } from './kirchhoff.js';
import { hydraulicsOptions, type HydraulicsOptionValues } from './options.js';
import type { SpeciesPreset } from './preset.js';
import { treeConductanceByReduction } from './reduction.js';
import { M_PER_UM, mmolPerSToKgPerS, perPaToPerMpa } from './units.js';
import { vulnerabilityCurve, type VulnerabilityCurveName } from './vulnerability.js';
import { waterProperties, type WaterProperties } from './water.js';
import { ruleRadiiM } from './what-if.js';

/** Said wherever hydraulics results are shown (CLI help and output, README, summary block). */
export const HYDRAULICS_CAUTION =
  'Model estimates from the scanned geometry plus assumed xylem anatomy (species preset), not measurements, and not a tree-safety assessment.';

/** Per-segment columns the stage adds to segments.csv (through segment.extra). */
export const HYDRAULICS_COLUMNS = ['conduit_diameter_um', 'conduit_count', 'conductance_kg_s_mpa', 'flow_kg_s', 'water_potential_mpa', 'plc_percent'] as const;

export interface HydraulicsResult {
  /** The `hydraulics` block of summary.json (snake_case keys). */
  summary: Record<string, unknown>;
  /** Per-segment values, indexed like network.segments, keyed by segments.csv column name. */
  segmentColumns: Record<(typeof HYDRAULICS_COLUMNS)[number], Float64Array>;
}

/**
 * The hydraulics stage: conduit sizes and counts per segment, segment and whole-tree conductance
 * (series–parallel reduction, checked by a Kirchhoff solve), steady water potentials with embolism
 * feedback at the given transpiration, the critical transpiration, the safety margin, and the
 * conductance the same tree would have under da Vinci's rule or Murray's law.
 * @param network segments with radii (m) and lengths (m); z is taken as up
 * @param options hydraulics options (partial; validated, defaults filled)
 * @param preset species preset; default: the one the options name (built-in or preset_file)
 * @throws XylemapError on invalid options, preset or network
 */
export function analyseHydraulics(network: Network, options?: unknown, preset?: SpeciesPreset): HydraulicsResult {
  const opts = hydraulicsOptions.resolve(options);
  const chosen = preset ? { preset, source: sourceOf(preset, opts) } : resolvePreset(opts);
  const sp = chosen.preset;
  const tree = SegmentTree.fromNetwork(network);
  const n = tree.size;
  const segs = tree.segments;
  const radii = Float64Array.from(segs, (s) => s.radiusM);
  for (let i = 0; i < n; i++) {
    if (!(radii[i] > 0)) {
      throw new XylemapError(`segment ${segs[i].segmentId}: radius must be > 0 m, got ${radii[i]}`, { stage: 'hydraulics' });
    }
  }
  const geometry = pathGeometry(tree);
  const water = waterProperties(opts.temperature_c);
  // The option declaration validated these against the same value lists.
  const rules = { conduit: opts.conduit_rule as ConduitRule, count: opts.count_rule as CountRule, sapwood: opts.sapwood_rule as SapwoodRule };
  const warnings: string[] = [];

  const conductanceOf = (r: ArrayLike<number>): { layout: ConduitLayout; g: Float64Array } =>
    networkConductances(tree, r, geometry, sp, rules, water);
  const { layout, g } = conductanceOf(radii);
  const kTree = treeConductanceByReduction(tree, g);
  const kirchhoff = treeConductanceByKirchhoff(tree, g);
  const solverDifference = Math.abs(kirchhoff.conductance - kTree) / kTree;
  if (!(solverDifference <= 1e-10)) {
    warnings.push(`series–parallel and Kirchhoff conductances differ by ${solverDifference.toExponential(2)} (relative)`);
  }

  const root = tree.root;
  const basalAreaM2 = Math.PI * radii[root] ** 2;
  const basalSapwoodM2 = layout.sapwoodAreaM2[root];
  const leafGiven = opts.leaf_area_m2 > 0;
  const leafAreaM2 = leafGiven ? opts.leaf_area_m2 : basalSapwoodM2 / sp.leaf.huber_value_m2_m2;
  const transpirationGiven = opts.transpiration_kg_s > 0;
  const transpirationKgS = transpirationGiven ? opts.transpiration_kg_s : mmolPerSToKgPerS(opts.transpiration_rate_mmol_m2_s * leafAreaM2);

  const setup = flowSetup(tree, g, water, opts, sp);
  const state = steadyFlow(setup, transpirationKgS);
  const kEmbolised = state.runaway ? 0 : treeConductanceByReduction(tree, state.conductance);
  const rg = setup.gravityGradientMpaPerM;
  const guess = kTree * Math.max(0.05, opts.soil_water_potential_mpa - rg * maxHeightAboveBase(setup.nodeZ) - sp.vulnerability.p50_mpa);
  const critical = criticalTranspiration(setup, guess, opts.critical_transpiration_rtol);
  if (state.runaway) {
    warnings.push(
      `no steady state at the transpiration of ${transpirationKgS.toPrecision(3)} kg/s (${state.outcome}): runaway embolism; the critical transpiration is ${critical.criticalKgS.toPrecision(3)} kg/s`,
    );
  }
  const unreliable = segs.filter((s) => !s.reliable).length;
  if (unreliable > 0) warnings.push(`${unreliable} of ${n} segments are flagged unreliable; their radii are used as they are`);

  const tips: number[] = [];
  for (let i = 0; i < n; i++) if (tree.isTip(i)) tips.push(i);
  const tipDiametersUm = tips.map((i) => layout.diameterM[i] / M_PER_UM).sort((a, b) => a - b);
  let maxPath = 0;
  for (const i of tips) maxPath = Math.max(maxPath, geometry.pathLengthToEndM[i]);
  let maxPlc = 0;
  for (let i = 0; i < n; i++) maxPlc = Math.max(maxPlc, state.plcPercent[i]);

  const whatIf = (exponent: number): Record<string, number> => {
    const k = treeConductanceByReduction(tree, conductanceOf(ruleRadiiM(tree, radii, exponent)).g);
    return { exponent, tree_conductance_kg_s_mpa: k, ratio_to_measured: k / kTree };
  };
  const finiteOrNull = (v: number): number | null => (state.runaway || !Number.isFinite(v) ? null : v);

  const summary: Record<string, unknown> = {
    caution: HYDRAULICS_CAUTION,
    preset: sp.name,
    preset_source: chosen.source,
    /** The anatomy actually assumed, so the block is reproducible without the preset file. */
    preset_values: { conduit: sp.conduit, sapwood: sp.sapwood, vulnerability: sp.vulnerability, leaf: sp.leaf },
    rules: {
      conduit_rule: opts.conduit_rule,
      count_rule: opts.count_rule,
      sapwood_rule: opts.sapwood_rule,
      vulnerability_curve: opts.vulnerability_curve,
      tip_flux_rule: opts.tip_flux_rule,
    },
    temperature_c: opts.temperature_c,
    water_density_kg_m3: water.densityKgM3,
    water_viscosity_pa_s: water.viscosityPaS,
    gravity_gradient_mpa_per_m: rg,
    end_wall_resistance_fraction: sp.conduit.end_wall_resistance_fraction,
    segment_count: n,
    tip_count: tips.length,
    tree_conductance_kg_s_mpa: kTree,
    tree_conductance_kirchhoff_kg_s_mpa: kirchhoff.conductance,
    solver_relative_difference: solverDifference,
    basal_area_m2: basalAreaM2,
    basal_sapwood_area_m2: basalSapwoodM2,
    conductance_per_basal_area_kg_s_mpa_m2: kTree / basalAreaM2,
    conductance_per_sapwood_area_kg_s_mpa_m2: kTree / basalSapwoodM2,
    leaf_area_m2: leafAreaM2,
    leaf_area_source: leafGiven ? 'given' : 'estimated: basal sapwood area / preset Huber value',
    leaf_specific_conductance_kg_s_mpa_m2: kTree / leafAreaM2,
    max_path_length_m: maxPath,
    conduit_diameter_base_um: layout.diameterM[root] / M_PER_UM,
    conduit_diameter_tips_um: median(tipDiametersUm),
    conduit_diameter_tips_min_um: tipDiametersUm[0],
    conduit_diameter_tips_max_um: tipDiametersUm[tipDiametersUm.length - 1],
    conduit_count_base: layout.count[root],
    transpiration_kg_s: transpirationKgS,
    transpiration_source: transpirationGiven ? 'given' : `leaf area × ${opts.transpiration_rate_mmol_m2_s} mmol m⁻² s⁻¹`,
    soil_water_potential_mpa: opts.soil_water_potential_mpa,
    steady_state: state.outcome,
    iterations: state.iterations,
    min_water_potential_mpa: finiteOrNull(state.minPsiMpa),
    min_water_potential_segment_id: state.runaway ? null : segs[state.minPsiSegment].segmentId,
    max_plc_percent: finiteOrNull(maxPlc),
    tree_plc_percent: state.runaway ? null : 100 * (1 - kEmbolised / kTree),
    critical_transpiration_kg_s: critical.criticalKgS,
    min_water_potential_at_critical_mpa: critical.state.minPsiMpa,
    p50_mpa: sp.vulnerability.p50_mpa,
    safety_margin_mpa: state.runaway ? null : state.minPsiMpa - sp.vulnerability.p50_mpa,
    what_if: {
      rule: 'radii from the measured stem-base radius outwards with Σ r_child^a = r_parent^a at every furcation (measured shares kept), same topology and lengths',
      da_vinci: whatIf(2),
      murray: whatIf(3),
    },
    warnings,
  };

  const nan = (): Float64Array => new Float64Array(n).fill(Number.NaN);
  const psiEnd = new Float64Array(n);
  for (let i = 0; i < n; i++) psiEnd[i] = state.nodePsiMpa[i + 1];
  const segmentColumns = {
    conduit_diameter_um: layout.diameterM.map((d) => d / M_PER_UM),
    conduit_count: layout.count,
    conductance_kg_s_mpa: g,
    flow_kg_s: state.runaway ? nan() : state.flowKgS,
    water_potential_mpa: state.runaway ? nan() : psiEnd,
    plc_percent: state.runaway ? nan() : state.plcPercent,
  };
  return { summary, segmentColumns };
}

/** Conduit layout and per-segment conductance (kg s⁻¹ MPa⁻¹) for a set of radii. */
function networkConductances(
  tree: SegmentTree,
  radiiM: ArrayLike<number>,
  geometry: PathGeometry,
  preset: SpeciesPreset,
  rules: Parameters<typeof conduitLayout>[4],
  water: WaterProperties,
): { layout: ConduitLayout; g: Float64Array } {
  const layout = conduitLayout(tree, radiiM, geometry, preset, rules);
  const g = new Float64Array(tree.size);
  const f = preset.conduit.end_wall_resistance_fraction;
  for (let i = 0; i < tree.size; i++) {
    g[i] = perPaToPerMpa(segmentConductanceKgPerSPerPa(layout.diameterM[i], layout.count[i], geometry.lengthM[i], f, water));
  }
  return { layout, g };
}

function flowSetup(tree: SegmentTree, g: Float64Array, water: WaterProperties, opts: HydraulicsOptionValues, sp: SpeciesPreset): FlowSetup {
  const n = tree.size;
  const nodeZ = new Float64Array(n + 1);
  nodeZ[0] = tree.segments[tree.root].start[2];
  for (let i = 0; i < n; i++) nodeZ[i + 1] = tree.segments[i].end[2];
  const weight = new Float64Array(n);
  let total = 0;
  for (let i = 0; i < n; i++) {
    if (!tree.isTip(i)) continue;
    weight[i] = opts.tip_flux_rule === 'equal' ? 1 : tree.segments[i].radiusM ** 2;
    total += weight[i];
  }
  for (let i = 0; i < n; i++) weight[i] /= total;
  return {
    tree,
    maxConductance: g,
    nodeZ,
    gravityGradientMpaPerM: opts.gravity ? water.gravityGradientMpaPerM : 0,
    soilWaterPotentialMpa: opts.soil_water_potential_mpa,
    tipShare: weight,
    plc: vulnerabilityCurve(opts.vulnerability_curve as VulnerabilityCurveName, { p50Mpa: sp.vulnerability.p50_mpa, slopePercentPerMpa: sp.vulnerability.slope_percent_per_mpa }),
    toleranceMpa: opts.convergence_tolerance_mpa,
    maxIterations: opts.max_iterations,
  };
}

/** Where a preset handed in by the caller came from, as far as the options tell. */
function sourceOf(preset: SpeciesPreset, opts: HydraulicsOptionValues): string {
  if (opts.preset_file) return opts.preset_file;
  return preset.name === opts.preset ? `built-in:${preset.name}` : 'given by the caller';
}

function maxHeightAboveBase(nodeZ: Float64Array): number {
  let h = 0;
  for (let v = 1; v < nodeZ.length; v++) h = Math.max(h, nodeZ[v] - nodeZ[0]);
  return h;
}

function median(sorted: number[]): number {
  const m = sorted.length >> 1;
  return sorted.length % 2 ? sorted[m] : 0.5 * (sorted[m - 1] + sorted[m]);
}
