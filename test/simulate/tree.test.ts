import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { simulateOptions } from '../../core/simulate/options.js';
import { presetOptions, PRESETS } from '../../core/simulate/presets.js';
import { generateTree } from '../../core/simulate/tree.js';
import { annotateNetwork } from '../../core/topology/annotate.js';
import { SegmentTree } from '../../core/topology/node-tree.js';
import type { Network } from '../../core/types/network.js';
import { XylemapError } from '../../core/util/errors.js';

/** Largest |Σ r_child^a / r_parent^a − 1| over all furcations, read from the segments themselves. */
function worstExponentResidual(network: Network, a: number): { worst: number; furcations: number } {
  const tree = SegmentTree.fromNetwork(network);
  let worst = 0;
  let furcations = 0;
  tree.eachBefore((i) => {
    const kids = tree.children[i];
    if (kids.length < 2) return;
    furcations++;
    const parent = network.segments[i].radiusM ** a;
    const sum = kids.reduce((s, c) => s + network.segments[c].radiusM ** a, 0);
    worst = Math.max(worst, Math.abs(sum / parent - 1));
  });
  return { worst, furcations };
}

describe('generateTree', () => {
  it('obeys Σ r_child^a = r_parent^a at every furcation to 1e-12 for any exponent in 1.6–3.2', () => {
    // The area-preservation rule (da Vinci a = 2, Murray 1926 a = 3) on the parent END radius
    // vs the children START radii; 1e-12 is the brief's tolerance (rounding is ~1e-15).
    fc.assert(
      fc.property(fc.double({ min: 1.6, max: 3.2, noNaN: true }), fc.integer({ min: 0, max: 100_000 }), fc.boolean(), (a, seed, taper) => {
        const o = simulateOptions.resolve({ ...presetOptions('sapling'), exponent_a: a, seed, taper_fraction: taper ? 0.1 : 0, twig_radius_m: 0.005 });
        const { network } = generateTree(o);
        const r = worstExponentResidual(network, a);
        return r.furcations > 0 && r.worst < 1e-12;
      }),
      { numRuns: 25 },
    );
  });

  it('obeys the exponent rule in every preset, including a forked and a leaning trunk', () => {
    for (const name of Object.keys(PRESETS)) {
      const o = simulateOptions.resolve(presetOptions(name));
      const r = worstExponentResidual(generateTree(o).network, o.exponent_a);
      expect(r.furcations).toBeGreaterThan(10);
      expect(r.worst).toBeLessThan(1e-12);
    }
    const forked = simulateOptions.resolve({ ...presetOptions('sapling'), trunk_fork_height_m: 0.8, trunk_lean_deg: 15 });
    const g = generateTree(forked);
    expect(g.furcations.filter((f) => f.stemFork)).toHaveLength(1);
    expect(worstExponentResidual(g.network, forked.exponent_a).worst).toBeLessThan(1e-12);
  });

  it('gives the same branch ids, centrifugal orders and Strahler orders as the project topology rules', () => {
    // annotateNetwork implements the glossary's rules (main continuation = thickest child;
    // Strahler 1957); the generator's own bookkeeping must agree with it.
    for (const name of Object.keys(PRESETS)) {
      const { network } = generateTree(simulateOptions.resolve(presetOptions(name)));
      const ann = annotateNetwork(network);
      const got = network.segments.map((s) => [s.branchId, s.branchOrder, s.strahlerOrder]);
      const want = ann.segments.map((s) => [s.branchId, s.branchOrder, s.strahlerOrder]);
      expect(got).toEqual(want);
    }
  });

  it('starts the trunk at the given radius, reaches about the given height and stops growth at the twig radius', () => {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), trunk_lean_deg: 0 });
    const { network, furcations } = generateTree(o);
    expect(network.segments[0].radiusM).toBe(o.trunk_base_radius_m);
    const top = Math.max(...network.segments.map((s) => s.end[2]));
    // Bends shorten the vertical reach a little; laterals can overtop a leader only slightly.
    expect(top).toBeGreaterThan(0.85 * o.tree_height_m);
    expect(top).toBeLessThan(1.15 * o.tree_height_m);
    for (const f of furcations) for (const r of f.childStartRadiiM) expect(r).toBeGreaterThanOrEqual(o.twig_radius_m);
    for (const s of network.segments) {
      expect(s.radiusSeM).toBe(0);
      expect(s.reliable).toBe(true);
      expect(s.arcCoverage).toBe(1);
      expect(s.lengthM).toBeCloseTo(Math.hypot(s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]), 12);
    }
  });

  it('produces identical trees for the same seed and different trees for another seed', () => {
    const o = simulateOptions.resolve(presetOptions('sapling'));
    const a = JSON.stringify(generateTree(o).network);
    expect(JSON.stringify(generateTree(o).network)).toBe(a);
    expect(JSON.stringify(generateTree({ ...o, seed: o.seed + 1 }).network)).not.toBe(a);
  });

  it('refuses a tree larger than max_segments with an error naming the option', () => {
    const o = simulateOptions.resolve({ ...presetOptions('sapling'), max_segments: 50 });
    expect(() => generateTree(o)).toThrow(XylemapError);
    try {
      generateTree(o);
    } catch (e) {
      expect((e as XylemapError).option).toBe('simulate.max_segments');
    }
  });
});

describe('presetOptions', () => {
  it('rejects an unknown preset and lists the known ones', () => {
    expect(() => presetOptions('baobab')).toThrow(XylemapError);
    try {
      presetOptions('baobab');
    } catch (e) {
      expect((e as XylemapError).oneLine()).toMatch(/unknown preset "baobab".*known presets: park-oak, spire-spruce, sapling/);
    }
  });

  it('returns overrides that pass the option declarations', () => {
    for (const name of Object.keys(PRESETS)) expect(() => simulateOptions.resolve(presetOptions(name))).not.toThrow();
  });
});

describe('simulateOptions.resolve', () => {
  it('rejects an exponent outside its range with the key path', () => {
    expect(() => simulateOptions.resolve({ exponent_a: 7 })).toThrow(XylemapError);
    try {
      simulateOptions.resolve({ exponent_a: Number.NaN });
    } catch (e) {
      expect((e as XylemapError).option).toBe('simulate.exponent_a');
    }
  });
});
