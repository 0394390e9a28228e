import { describe, expect, it } from 'vitest';
import { SegmentTree } from '../../core/topology/node-tree.js';
import { conduitLayout, sapwoodAreaM2, widenedDiameterM } from '../../core/hydraulics/conduits.js';
import { pathGeometry } from '../../core/hydraulics/geometry.js';
import type { SpeciesPreset } from '../../core/hydraulics/preset.js';
import { binaryTree } from './helpers.js';

// A preset written out here (not a shipped one) so the checks do not depend on preset values.
const preset: SpeciesPreset = {
  name: 'test',
  description: '',
  conduit: {
    apex_diameter_um: 30,
    widening_exponent: 0.2,
    reference_length_m: 1,
    min_diameter_um: 1,
    max_diameter_um: 1000,
    density_per_mm2: 100,
    lumen_fraction: 0.2,
    end_wall_resistance_fraction: 0.6,
  },
  sapwood: { depth_m: 0.03, fraction: 0.5 },
  vulnerability: { p50_mpa: -2, slope_percent_per_mpa: 50 },
  leaf: { huber_value_m2_m2: 2e-4 },
};

describe('sapwoodAreaM2', () => {
  it('is the outer ring π(r² − (r − d)²) for a stem wider than the sapwood depth', () => {
    // Annulus area (geometry): r = 0.1 m, d = 0.03 m → π (0.01 − 0.0049) m².
    expect(sapwoodAreaM2(0.1, 'sapwood_depth', preset)).toBeCloseTo(Math.PI * (0.01 - 0.0049), 14);
  });

  it('is the whole disc for a twig thinner than the sapwood depth', () => {
    expect(sapwoodAreaM2(0.01, 'sapwood_depth', preset)).toBeCloseTo(Math.PI * 1e-4, 16);
  });

  it('is the preset fraction of the disc under the sapwood-fraction rule', () => {
    expect(sapwoodAreaM2(0.1, 'sapwood_fraction', preset)).toBeCloseTo(0.5 * Math.PI * 0.01, 14);
  });
});

describe('widenedDiameterM', () => {
  it('follows D_h = D_apex (L/L_ref)^b: 32× the distance gives 2× the diameter for b = 0.2', () => {
    // Anfodillo et al. 2006 New Phytol. 169:279 power law; 32^0.2 = 2 exactly (hand calculation).
    expect(widenedDiameterM(32, preset) / widenedDiameterM(1, preset)).toBeCloseTo(2, 12);
    expect(widenedDiameterM(1, preset)).toBeCloseTo(30e-6, 15);
  });

  it('clamps to the preset range', () => {
    const narrow = { ...preset, conduit: { ...preset.conduit, min_diameter_um: 20, max_diameter_um: 40 } };
    expect(widenedDiameterM(1e-6, narrow)).toBeCloseTo(20e-6, 15);
    expect(widenedDiameterM(1e6, narrow)).toBeCloseTo(40e-6, 15);
  });
});

describe('conduitLayout', () => {
  const net = binaryTree({ levels: 5, baseRadiusM: 0.05, baseLengthM: 2, radiusRatio: 2 ** (-1 / 3), lengthRatio: 0.8, cylindersPerInternode: 2 });
  const tree = SegmentTree.fromNetwork(net);
  const radii = net.segments.map((s) => s.radiusM);
  const geometry = pathGeometry(tree);

  it('counts conduits as density × sapwood area under the density rule', () => {
    const l = conduitLayout(tree, radii, geometry, preset, { conduit: 'apex_widening', count: 'conduit_density', sapwood: 'sapwood_depth' });
    // 100 per mm² = 1e8 per m² (unit conversion).
    expect(l.count[0]).toBeCloseTo(1e8 * sapwoodAreaM2(0.05, 'sapwood_depth', preset), 6);
  });

  it('fills the preset lumen fraction of the sapwood under the lumen-fraction rule', () => {
    const l = conduitLayout(tree, radii, geometry, preset, { conduit: 'apex_widening', count: 'lumen_fraction', sapwood: 'sapwood_depth' });
    for (let i = 0; i < tree.size; i++) {
      const lumen = (l.count[i] * Math.PI * l.diameterM[i] ** 2) / 4;
      expect(lumen / l.sapwoodAreaM2[i]).toBeCloseTo(0.2, 12);
    }
  });

  it('keeps the number of conduits per tip constant under the pipe model', () => {
    // Pipe model (Shinozaki et al. 1964): each tip is served by the same bundle of pipes from the base.
    const l = conduitLayout(tree, radii, geometry, preset, { conduit: 'apex_widening', count: 'pipe_model', sapwood: 'sapwood_depth' });
    const perTip = l.count[tree.root] / geometry.tipsSupplied[tree.root];
    for (let i = 0; i < tree.size; i++) expect(l.count[i] / geometry.tipsSupplied[i]).toBeCloseTo(perTip, 6);
  });

  it.each(['conduit_density', 'lumen_fraction'] as const)('keeps Σ N D³ across every furcation and chain under the Murray rule (%s counts)', (count) => {
    // Murray's law for conduits (McCulloh et al. 2003 Nature 421:939): Σ r³ of conduits is kept.
    const l = conduitLayout(tree, radii, geometry, preset, { conduit: 'murray', count, sapwood: 'sapwood_depth' });
    for (let i = 0; i < tree.size; i++) {
      const kids = tree.children[i];
      if (kids.length === 0) continue;
      const parent = l.count[i] * l.diameterM[i] ** 3;
      const children = kids.reduce((s, c) => s + l.count[c] * l.diameterM[c] ** 3, 0);
      expect(children / parent).toBeCloseTo(1, 10);
    }
  });

  it('makes conduits wider towards the base under apex widening', () => {
    const l = conduitLayout(tree, radii, geometry, preset, { conduit: 'apex_widening', count: 'conduit_density', sapwood: 'sapwood_depth' });
    for (let i = 0; i < tree.size; i++) {
      const p = tree.parent[i];
      if (p >= 0) expect(l.diameterM[p]).toBeGreaterThan(l.diameterM[i]);
    }
  });
});
