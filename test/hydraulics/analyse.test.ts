import { describe, expect, it } from 'vitest';
import { analyseHydraulics, HYDRAULICS_COLUMNS } from '../../core/hydraulics/analyse.js';
import { binaryTree, singlePipe } from './helpers.js';

/**
 * A generated tree of stem-base diameter D: symmetric binary branching with da Vinci radii
 * (r ratio 2^-½), WBE length ratio 2^-⅓ (West, Brown & Enquist 1999 Nature 400:664), trunk
 * internode 30·D long, branching until twigs of ~2 mm radius, 3 cylinders per internode.
 * For D = 0.1 m: 1024 tips, about 13 m of path from base to tip (a small tree).
 */
function treeOfDiameter(diameterM: number) {
  const levels = Math.ceil(Math.log2((diameterM / 2 / 0.002) ** 2));
  return binaryTree({ levels, baseRadiusM: diameterM / 2, baseLengthM: 30 * diameterM, radiusRatio: 2 ** -0.5, lengthRatio: 2 ** (-1 / 3), cylindersPerInternode: 3 });
}

describe('analyseHydraulics', () => {
  const small = treeOfDiameter(0.05);
  const result = analyseHydraulics(small, { preset: 'diffuse-porous' });
  const s = result.summary as Record<string, any>;

  it.each([0.05, 0.1])('is within an order of magnitude of the Yang & Tyree whole-shoot regression for D = %s m', (d) => {
    // Yang & Tyree 1993 Tree Physiol. (Acer saccharum, a diffuse-porous maple): whole-shoot
    // conductance K ≈ 6.0·10⁻² D^1.40 kg s⁻¹ MPa⁻¹ for stem-base diameter D in m.
    const k = (analyseHydraulics(treeOfDiameter(d), { preset: 'diffuse-porous' }).summary as Record<string, number>).tree_conductance_kg_s_mpa;
    const published = 6.0e-2 * d ** 1.4;
    expect(k / published).toBeGreaterThan(0.1);
    expect(k / published).toBeLessThan(10);
  });

  it('agrees with its own Kirchhoff check to 1e-10', () => {
    expect(s.solver_relative_difference).toBeLessThan(1e-10);
    expect(Math.abs(s.tree_conductance_kirchhoff_kg_s_mpa / s.tree_conductance_kg_s_mpa - 1)).toBeLessThan(1e-10);
  });

  it('returns every per-segment column for every segment', () => {
    for (const col of HYDRAULICS_COLUMNS) {
      expect(result.segmentColumns[col].length).toBe(small.segments.length);
      expect(result.segmentColumns[col].every(Number.isFinite)).toBe(true);
    }
  });

  it('puts the lowest water potential below the soil potential minus the hydrostatic drop to the top', () => {
    // With flow, friction adds to the ρ g h drop (hydrostatics + Darcy/Ohm analogy).
    const top = Math.max(...small.segments.map((x) => x.end[2]));
    expect(s.min_water_potential_mpa).toBeLessThan(s.soil_water_potential_mpa - s.gravity_gradient_mpa_per_m * top);
    expect(s.safety_margin_mpa).toBeCloseTo(s.min_water_potential_mpa - s.p50_mpa, 12);
  });

  it('transpires below its critical transpiration and reports a steady state', () => {
    expect(s.steady_state).toBe('converged');
    expect(s.transpiration_kg_s).toBeLessThan(s.critical_transpiration_kg_s);
  });

  it('finds no change under da Vinci radii for a tree that already follows da Vinci, and more conductance under Murray', () => {
    // The generated tree has r_child = 2^-½ r_parent, i.e. Σ r² kept exactly (da Vinci's rule).
    expect(s.what_if.da_vinci.ratio_to_measured).toBeCloseTo(1, 12);
    // Murray's law (Σ r³ kept) gives children more cross-section than da Vinci, hence more conduits.
    expect(s.what_if.murray.ratio_to_measured).toBeGreaterThan(1);
  });

  it('says whether the leaf area was given or estimated', () => {
    expect(s.leaf_area_source).toMatch(/estimated/);
    const given = analyseHydraulics(small, { leaf_area_m2: 12 }).summary as Record<string, any>;
    expect(given.leaf_area_source).toBe('given');
    expect(given.leaf_specific_conductance_kg_s_mpa_m2).toBeCloseTo(given.tree_conductance_kg_s_mpa / 12, 15);
  });

  it('gives identical results on identical input', () => {
    expect(JSON.stringify(analyseHydraulics(small, {}).summary)).toBe(JSON.stringify(analyseHydraulics(small, {}).summary));
  });

  it('reports runaway embolism with nulls and a warning when the transpiration is impossible', () => {
    const r = analyseHydraulics(small, { transpiration_kg_s: 10 });
    const sum = r.summary as Record<string, any>;
    expect(sum.min_water_potential_mpa).toBeNull();
    expect(sum.safety_margin_mpa).toBeNull();
    expect(sum.warnings.join(' ')).toMatch(/runaway embolism/);
    expect(Number.isNaN(r.segmentColumns.water_potential_mpa[0])).toBe(true);
  });

  it('states that the results are model estimates, not measurements or a safety assessment', () => {
    expect(s.caution).toMatch(/model estimates/i);
    expect(s.caution).toMatch(/not a tree-safety assessment/);
  });

  it.each([
    { conduit_rule: 'murray', count_rule: 'lumen_fraction' },
    { conduit_rule: 'murray', count_rule: 'pipe_model', sapwood_rule: 'sapwood_fraction' },
    { count_rule: 'lumen_fraction', vulnerability_curve: 'weibull', tip_flux_rule: 'equal' },
    { preset: 'conifer', temperature_c: 5 },
    { preset: 'ring-porous', gravity: false },
  ])('keeps reduction and Kirchhoff within 1e-10 and a steady state under rules %o', (rules) => {
    const r = analyseHydraulics(small, rules).summary as Record<string, any>;
    expect(r.solver_relative_difference).toBeLessThan(1e-10);
    expect(r.tree_conductance_kg_s_mpa).toBeGreaterThan(0);
    expect(r.steady_state).toBe('converged');
  });

  it('handles a network of a single segment', () => {
    const r = analyseHydraulics(singlePipe(0.02, 2), {}).summary as Record<string, any>;
    expect(r.tip_count).toBe(1);
    expect(r.conduit_diameter_tips_um).toBe(r.conduit_diameter_base_um);
    expect(r.max_path_length_m).toBeCloseTo(2, 12);
  });

  it('rejects an unknown option naming it', () => {
    expect(() => analyseHydraulics(small, { temprature_c: 20 })).toThrow(/unknown option "temprature_c"/);
  });
});
