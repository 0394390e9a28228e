import { describe, expect, it } from 'vitest';
import { scoreOptions, simulateOptions } from '../../core/simulate/options.js';
import { presetOptions } from '../../core/simulate/presets.js';
import { scoreNetworks, summariesFrom } from '../../core/simulate/score.js';
import { generateTree } from '../../core/simulate/tree.js';
import type { Network } from '../../core/types/network.js';
import { XylemapError } from '../../core/util/errors.js';

// A 9 m tree whose radii span all five classes (8 mm twigs to a 15 cm stem base).
const truth = generateTree(
  simulateOptions.resolve({ ...presetOptions('park-oak'), seed: 5, trunk_base_radius_m: 0.15, tree_height_m: 9, twig_radius_m: 0.008 }),
).network;
const options = scoreOptions.resolve({});
const copy = (n: Network): Network => JSON.parse(JSON.stringify(n)) as Network;

describe('scoreNetworks', () => {
  it('gives a perfect score for the truth against itself', () => {
    const r = scoreNetworks(truth, copy(truth), options, { trueExponent: 2.3, reconstructedExponent: 2.3 });
    expect(r.dbh.error_m).toBe(0);
    expect(r.wood_volume.relative_error).toBe(0);
    expect(r.length.recovered_fraction).toBe(1);
    expect(r.radius.median_relative_error).toBe(0);
    expect(r.radius.rmse_relative_error).toBe(0);
    expect(r.furcations.found_fraction).toBe(1);
    expect(r.branch_order_agreement).toBe(1);
    expect(r.branch_order_within_one).toBe(1);
    expect(r.exponent?.error).toBe(0);
    for (const c of r.by_radius_class) {
      if (c.true_length_m === 0) continue;
      expect(c.recovered_fraction).toBe(1);
      expect(c.volume_relative_error).toBe(0);
    }
    // The classes this tree spans all carry length.
    expect(r.by_radius_class.filter((c) => c.true_length_m > 0).length).toBe(5);
  });

  it('reports +20 % radius error in every class and +44 % volume for radii inflated by 20 %', () => {
    // Volume ∝ r²: 1.2² − 1 = 0.44 (cylinder volume π r² L).
    const inflated = copy(truth);
    for (const s of inflated.segments) s.radiusM *= 1.2;
    const r = scoreNetworks(truth, inflated, options);
    expect(r.radius.median_relative_error).toBeCloseTo(0.2, 12);
    expect(r.radius.rmse_relative_error).toBeCloseTo(0.2, 12);
    for (const c of r.by_radius_class) if (c.true_length_m > 0) expect(c.radius_median_relative_error).toBeCloseTo(0.2, 12);
    expect(r.wood_volume.relative_error).toBeCloseTo(0.44, 12);
    expect(r.dbh.relative_error).toBeCloseTo(0.2, 12);
    expect(r.length.recovered_fraction).toBe(1);
  });

  it('loses the length, volume and furcations of a branch that was not reconstructed', () => {
    // Drop every segment of the thickest first-order branch (and everything it carries).
    const recon = copy(truth);
    const firstOrder = recon.segments.filter((s) => s.branchOrder === 1).sort((a, b) => b.radiusM - a.radiusM)[0];
    const drop = new Set<number>([firstOrder.segmentId]);
    for (const s of recon.segments) if (drop.has(s.parentId)) drop.add(s.segmentId);
    const droppedLength = recon.segments.filter((s) => drop.has(s.segmentId)).reduce((a, s) => a + s.lengthM, 0);
    recon.segments = recon.segments.filter((s) => !drop.has(s.segmentId));
    const r = scoreNetworks(truth, recon, options);
    const totalLength = truth.segments.reduce((a, s) => a + s.lengthM, 0);
    expect(r.length.recovered_fraction).toBeCloseTo(1 - droppedLength / totalLength, 2);
    expect(r.furcations.found_fraction!).toBeLessThan(1);
    expect(r.wood_volume.relative_error!).toBeLessThan(0);
    expect(r.radius.median_relative_error).toBe(0);
  });

  it('counts an order shifted by one as disagreeing but within one, and by two as neither', () => {
    const plus = (k: number): Network => {
      const n = copy(truth);
      for (const s of n.segments) s.branchOrder += k;
      return n;
    };
    const one = scoreNetworks(truth, plus(1), options);
    expect(one.branch_order_agreement).toBe(0);
    expect(one.branch_order_within_one).toBe(1);
    expect(scoreNetworks(truth, plus(2), options).branch_order_within_one).toBe(0);
  });

  it('matches nothing when the reconstruction is shifted far beyond the tolerance', () => {
    const shifted = copy(truth);
    for (const s of shifted.segments) {
      s.start[0] += 50;
      s.end[0] += 50;
    }
    const r = scoreNetworks(truth, shifted, options);
    expect(r.length.recovered_fraction).toBe(0);
    expect(r.branch_order_agreement).toBeNull();
  });

  it('refuses to match axes that cross at a right angle', () => {
    // One vertical true segment against one horizontal reconstructed segment through its middle.
    const seg = (start: [number, number, number], end: [number, number, number]) => ({
      ...truth.segments[0],
      segmentId: 0,
      parentId: -1,
      start,
      end,
      radiusM: 0.05,
      lengthM: 1,
    });
    const t: Network = { segments: [seg([0, 0, 0], [0, 0, 1])] };
    const crossed: Network = { segments: [seg([-0.5, 0, 0.5], [0.5, 0, 0.5])] };
    const aligned: Network = { segments: [seg([0.01, 0, 0], [0.01, 0, 1])] };
    expect(scoreNetworks(t, crossed, options).length.recovered_fraction!).toBeLessThan(0.2);
    expect(scoreNetworks(t, aligned, options).length.recovered_fraction).toBe(1);
  });

  it('reports an exponent and conductance error when both summaries carry them', () => {
    const s = summariesFrom(
      { hydraulics: { tree_conductance_kg_s_mpa: 0.02 } },
      { exponent_a: 2.3 },
      { scaling: { exponent: { estimate: 2.9 } }, hydraulics: { tree_conductance_kg_s_mpa: 0.025 } },
    );
    const r = scoreNetworks(truth, copy(truth), options, s);
    expect(r.exponent?.error).toBeCloseTo(0.6, 12);
    expect(r.conductance?.relative_error).toBeCloseTo(0.25, 12);
    expect(scoreNetworks(truth, copy(truth), options, summariesFrom(undefined, undefined, undefined)).exponent).toBeNull();
  });

  it('rejects an empty reconstruction with a clear error', () => {
    expect(() => scoreNetworks(truth, { segments: [] }, options)).toThrow(XylemapError);
  });
});
