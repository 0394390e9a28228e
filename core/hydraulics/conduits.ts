import type { SegmentTree } from '../topology/node-tree.js';
import type { PathGeometry } from './geometry.js';
import type { SpeciesPreset } from './preset.js';
import { M2_PER_MM2, M_PER_UM } from './units.js';

export type ConduitRule = 'apex_widening' | 'murray';
export type CountRule = 'conduit_density' | 'lumen_fraction' | 'pipe_model';
export type SapwoodRule = 'sapwood_depth' | 'sapwood_fraction';

/**
 * Conducting (sapwood) cross-section of a stem of radius r, m².
 * `sapwood_depth`: the outer ring of the preset depth (the whole disc when r ≤ depth);
 * `sapwood_fraction`: the preset share of π r².
 */
export function sapwoodAreaM2(radiusM: number, rule: SapwoodRule, preset: SpeciesPreset): number {
  const disc = Math.PI * radiusM * radiusM;
  if (rule === 'sapwood_fraction') return preset.sapwood.fraction * disc;
  const inner = Math.max(0, radiusM - preset.sapwood.depth_m);
  return disc - Math.PI * inner * inner;
}

/**
 * Conduit widening with distance from the apex: D_h = D_apex · (L / L_ref)^b, clamped to the preset
 * range (Anfodillo et al. 2006 New Phytol. 169:279; Anfodillo et al. 2013 IAWA J. 34:352).
 * @param distanceFromApexM L, m
 * @returns hydraulically weighted diameter D_h, m
 */
export function widenedDiameterM(distanceFromApexM: number, preset: SpeciesPreset): number {
  const c = preset.conduit;
  const dUm = c.apex_diameter_um * (distanceFromApexM / c.reference_length_m) ** c.widening_exponent;
  return clampUm(dUm, preset) * M_PER_UM;
}

function clampUm(dUm: number, preset: SpeciesPreset): number {
  return Math.min(preset.conduit.max_diameter_um, Math.max(preset.conduit.min_diameter_um, dUm));
}

export interface ConduitLayout {
  /** Hydraulically weighted conduit diameter D_h = (Σ D⁴ / N)^¼ (Tyree et al. 1994), m. */
  diameterM: Float64Array;
  /** Expected number of conduits in the cross-section (not rounded). */
  count: Float64Array;
  sapwoodAreaM2: Float64Array;
}

/**
 * Conduit diameter and count of every segment.
 *
 * Counts: N = c · D^(−q) with, per rule, `conduit_density`: c = density × sapwood area, q = 0;
 * `lumen_fraction`: c = 4 f A_sapwood / π, q = 2 (lumen area f·A shared by conduits of area π D²/4);
 * `pipe_model`: the base count (density × base sapwood area) shared among segments in proportion to
 * the tips they supply (Shinozaki et al. 1964 pipe model), q = 0.
 *
 * Diameters: `apex_widening` uses the widening law at each segment's distance from the apex;
 * `murray` starts from the widening law at the stem base and keeps Σ N D³ at every furcation and
 * along every chain (McCulloh et al. 2003 Nature 421:939), siblings sharing one diameter:
 * D_child = D_parent · (c_parent / Σ c_children)^(1/(3−q)).
 *
 * @param radiiM segment radii, m, indexed like tree.segments
 */
export function conduitLayout(
  tree: SegmentTree,
  radiiM: ArrayLike<number>,
  geometry: PathGeometry,
  preset: SpeciesPreset,
  rules: { conduit: ConduitRule; count: CountRule; sapwood: SapwoodRule },
): ConduitLayout {
  const n = tree.size;
  const sapwood = new Float64Array(n);
  for (let i = 0; i < n; i++) sapwood[i] = sapwoodAreaM2(radiiM[i], rules.sapwood, preset);
  const densityPerM2 = preset.conduit.density_per_mm2 / M2_PER_MM2;
  const q = rules.count === 'lumen_fraction' ? 2 : 0;
  const coef = new Float64Array(n);
  const tipsTotal = geometry.tipsSupplied[tree.root];
  for (let i = 0; i < n; i++) {
    if (rules.count === 'conduit_density') coef[i] = densityPerM2 * sapwood[i];
    else if (rules.count === 'lumen_fraction') coef[i] = (4 * preset.conduit.lumen_fraction * sapwood[i]) / Math.PI;
    else coef[i] = (densityPerM2 * sapwood[tree.root] * geometry.tipsSupplied[i]) / tipsTotal;
  }
  const diameterM = new Float64Array(n);
  if (rules.conduit === 'apex_widening') {
    for (let i = 0; i < n; i++) diameterM[i] = widenedDiameterM(geometry.distanceFromApexM[i], preset);
  } else {
    diameterM[tree.root] = widenedDiameterM(geometry.distanceFromApexM[tree.root], preset);
    tree.eachBefore((i) => {
      const kids = tree.children[i];
      if (kids.length === 0) return;
      let sum = 0;
      for (const c of kids) sum += coef[c];
      const dUm = (diameterM[i] / M_PER_UM) * (coef[i] / sum) ** (1 / (3 - q));
      const d = clampUm(dUm, preset) * M_PER_UM;
      for (const c of kids) diameterM[c] = d;
    });
  }
  const count = new Float64Array(n);
  for (let i = 0; i < n; i++) count[i] = coef[i] * diameterM[i] ** -q;
  return { diameterM, count, sapwoodAreaM2: sapwood };
}
