import { describe, expect, it } from 'vitest';
import { treeMetrics } from '../../core/topology/metrics.js';
import { seg, smallTree } from './fixtures.js';

// Values worked out by hand on the fixture tree; DBH at 1.3 m above the stem base (common
// forestry practice); cylinder volume π r² L and lateral area 2 π r L (elementary geometry).
describe('treeMetrics', () => {
  const m = treeMetrics({ segments: smallTree() });

  it('takes DBH from the stem segment containing 1.3 m path length', () => {
    expect(m.dbh_m).toBeCloseTo(0.3, 12);
    expect(m.dbh_per_stem_m).toEqual([0.3]);
  });

  it('measures height, volume, surface and length', () => {
    expect(m.height_m).toBe(4);
    expect(m.wood_volume_m3).toBeCloseTo(Math.PI * 0.0873, 12);
    expect(m.surface_area_m2).toBeCloseTo(2 * Math.PI * 0.73, 12);
    expect(m.total_length_m).toBe(9);
    expect(m.length_by_order_m).toEqual([5, 3, 1]);
  });

  it('counts segments, branches, furcations, tips and the highest order', () => {
    expect([m.segment_count, m.branch_count, m.furcation_count, m.tip_count, m.max_branch_order]).toEqual([9, 4, 3, 4, 2]);
  });

  it('measures crown spread, projected area and crown base height', () => {
    // End points span the triangle (0,0), (2,0), (0,2): area 2 m², diameter 2√2 m.
    expect(m.crown_spread_m).toBeCloseTo(2 * Math.SQRT2, 12);
    expect(m.crown_projected_area_m2).toBeCloseTo(2, 12);
    expect(m.crown_base_height_m).toBe(2);
  });

  it('reports one DBH per stem when the trunk forks below 1.3 m, and the basal-area equivalent', () => {
    const s = [
      seg(0, -1, [0, 0, 0], [0, 0, 1], 0.3),
      seg(1, 0, [0, 0, 1], [0.1, 0, 2], 0.2),
      seg(2, 0, [0, 0, 1], [-0.1, 0, 2], 0.15),
      seg(3, 0, [0, 0, 1], [0, 0.5, 1.5], 0.05),
    ];
    const f = treeMetrics({ segments: s });
    expect(f.dbh_per_stem_m).toEqual([0.4, 0.3]);
    expect(f.dbh_m).toBeCloseTo(0.5, 12);
  });

  it('returns a null DBH for a stem shorter than 1.3 m', () => {
    const f = treeMetrics({ segments: [seg(0, -1, [5, 5, 10], [5, 5, 11], 0.1)] });
    expect(f.dbh_m).toBeNull();
    expect(f.height_m).toBe(1);
  });
});
