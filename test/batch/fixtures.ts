import type { TreeRecord } from '../../core/batch/stand.js';

/** A summary.json shaped like the pipeline's (schema xylemap.summary/1) with chosen key figures. */
export function fakeSummary(dbhM: number, exponent: number, conductance: number): unknown {
  return {
    schema: 'xylemap.summary/1',
    tree: { dbh_m: dbhM, height_m: 20 * dbhM + 2, wood_volume_m3: dbhM * dbhM, segment_count: 100 },
    reliability: {},
    scaling: { exponent: { estimate: exponent, ci95: [exponent - 0.2, exponent + 0.2], n_used: 40, n_excluded: 3 }, wbe: { beta: 0.7, gamma: 0.8, pooled: { theta: 0.75 } } },
    hydraulics: { tree_conductance_kg_s_mpa: conductance, min_water_potential_mpa: -1.5, safety_margin_mpa: 1.2 },
    warnings: ['x'],
  };
}

/** Trees of two species: conductance on exact power laws (oak K = 2·DBH^2.5, pine K = 1·DBH^2). */
export function fakeStand(): TreeRecord[] {
  const trees: TreeRecord[] = [];
  const oak = [0.2, 0.3, 0.45, 0.6];
  const pine = [0.15, 0.25, 0.4];
  oak.forEach((d, i) =>
    trees.push({ index: i, treeId: `oak-${i}`, species: 'oak', file: `oak-${i}.las`, plot: 'P1', preset: '', fieldDbhM: NaN, summary: fakeSummary(d, 2.0 + 0.1 * i, 2 * Math.pow(d, 2.5)) }),
  );
  pine.forEach((d, i) =>
    trees.push({ index: 10 + i, treeId: `pine-${i}`, species: 'pine', file: `pine-${i}.las`, plot: 'P2', preset: 'conifer', fieldDbhM: d, summary: fakeSummary(d, 2.6 + 0.1 * i, Math.pow(d, 2)) }),
  );
  return trees;
}
