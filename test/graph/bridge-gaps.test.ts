import { describe, expect, it } from 'vitest';
import { bridgeGaps } from '../../core/graph/bridge-gaps.js';
import { buildKdTree } from '../../core/graph/kdtree.js';
import { buildNeighbourGraph } from '../../core/graph/neighbour-graph.js';
import { shortestPaths } from '../../core/graph/dijkstra.js';

/** Points every 1 cm along z from z0 to z1 (a thin vertical branch). */
function line(z0: number, z1: number, xOffset = 0): number[][] {
  const out: number[][] = [];
  for (let z = z0; z <= z1 + 1e-9; z += 0.01) out.push([xOffset, 0, z]);
  return out;
}

function setup(pts: number[][]) {
  const x = Float64Array.from(pts.map((p) => p[0]));
  const y = Float64Array.from(pts.map((p) => p[1]));
  const z = Float64Array.from(pts.map((p) => p[2]));
  const tree = buildKdTree(x, y, z);
  const graph = buildNeighbourGraph(x, y, z, 4, 0.015, tree);
  const paths = shortestPaths(graph, [0]);
  return { x, y, z, tree, graph, paths, include: new Uint8Array(x.length).fill(1) };
}

describe('bridgeGaps', () => {
  it('reattaches a piece across an occlusion gap so distances continue along the branch', () => {
    // A 1 m branch with 0.2 m missing in the middle: geometry gives the graph distance at the far end = 1 m.
    const s = setup([...line(0, 0.4), ...line(0.6, 1.0)]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.5, minPieceVertices: 3 });
    expect(bridges.length).toBe(1);
    expect(bridges[0].lengthM).toBeCloseTo(0.2, 6);
    const top = s.x.length - 1;
    expect(s.paths.distanceM[top]).toBeCloseTo(1.0, 6);
  });

  it('leaves a piece detached when the gap is longer than the limit', () => {
    const s = setup([...line(0, 0.4), ...line(1.0, 1.2)]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.5, minPieceVertices: 3 });
    expect(bridges.length).toBe(0);
    expect(s.paths.distanceM[s.x.length - 1]).toBe(Infinity);
  });

  it('drops pieces smaller than the minimum as clutter', () => {
    const s = setup([...line(0, 0.4), [0, 0, 0.5], [0, 0, 0.505]]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.5, minPieceVertices: 3 });
    expect(bridges.length).toBe(0);
  });

  it('chains pieces over several rounds', () => {
    // Three pieces with 0.1 m gaps: the third can only attach after the second has.
    const s = setup([...line(0, 0.3), ...line(0.4, 0.6), ...line(0.7, 0.9)]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.15, minPieceVertices: 3 });
    expect(bridges.length).toBe(2);
    expect(s.paths.distanceM[s.x.length - 1]).toBeCloseTo(0.9, 6);
  });

  it('refuses a gap longer than the piece itself when maxGapPerExtent is 1', () => {
    // Geometry: a 5 cm speck 0.3 m above a 0.4 m branch; the gap (0.3 m) exceeds the speck (0.05 m).
    const s = setup([...line(0, 0.4), ...line(0.7, 0.75)]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.5, minPieceVertices: 3, maxGapPerExtent: 1 });
    expect(bridges.length).toBe(0);
    // The same speck is attached without the rule: the rule, not the limit, refused it.
    const t = setup([...line(0, 0.4), ...line(0.7, 0.75)]);
    expect(bridgeGaps(t.x, t.y, t.z, t.graph, t.tree, t.paths, t.include, { maxGapM: 0.5, minPieceVertices: 3 }).length).toBe(1);
  });

  it('neither attaches pieces that stay below minPieceTopM nor lands bridges on reached vertices below it', () => {
    // Heights = z here. A piece 0.1-0.3 m high next to the base is left out; a piece at 0.6-0.9 m
    // attaches to the reached stem at or above 0.5 m (its nearest reached vertex at z = 0.5 m).
    const s = setup([...line(0, 0.5), ...line(0.1, 0.3, 0.1), ...line(0.6, 0.9, 0.1)]);
    const bridges = bridgeGaps(s.x, s.y, s.z, s.graph, s.tree, s.paths, s.include, { maxGapM: 0.5, minPieceVertices: 3, heightM: s.z, minPieceTopM: 0.5 });
    expect(bridges.length).toBe(1);
    expect(s.z[bridges[0].to]).toBeGreaterThanOrEqual(0.5);
    expect(s.z[bridges[0].from]).toBeGreaterThanOrEqual(0.6);
    const lowPiece = 51; // first vertex of the low piece
    expect(s.paths.distanceM[lowPiece]).toBe(Infinity);
  });
});
