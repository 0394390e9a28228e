import { describe, expect, it } from 'vitest';
import { buildBandClusters, medianRadius } from '../../core/reconstruct/band-clusters.js';
import { buildSkeleton } from '../../core/reconstruct/skeleton.js';
import { buildNeighbourGraph } from '../../core/graph/neighbour-graph.js';
import { shortestPaths } from '../../core/graph/dijkstra.js';

/** Points every 1 cm along polylines (a skeleton-like test cloud). */
function polyline(points: [number, number, number][]): number[][] {
  const out: number[][] = [];
  for (let k = 0; k + 1 < points.length; k++) {
    const [a, b] = [points[k], points[k + 1]];
    const len = Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
    const steps = Math.round(len / 0.01);
    for (let i = k === 0 ? 0 : 1; i <= steps; i++) out.push([0, 1, 2].map((j) => a[j] + ((b[j] - a[j]) * i) / steps));
  }
  return out;
}

function run(pts: number[][]) {
  const x = Float64Array.from(pts.map((p) => p[0]));
  const y = Float64Array.from(pts.map((p) => p[1]));
  const z = Float64Array.from(pts.map((p) => p[2]));
  const graph = buildNeighbourGraph(x, y, z, 4, 0.015);
  const paths = shortestPaths(graph, [0]);
  const bands = buildBandClusters(x, y, z, graph, paths, [0], { band_width_ratio: 1, band_min_m: 0.05, band_max_m: 0.2 });
  return { x, y, z, bands };
}

describe('buildBandClusters', () => {
  it('cuts a straight stem into bands of the minimum width, each the child of the one below', () => {
    const { bands } = run(polyline([[0, 0, 0], [0, 0, 1]]));
    // 1 m of line with 5 cm bands: about 20 clusters in a single chain.
    expect(bands.count).toBeGreaterThanOrEqual(18);
    expect(bands.count).toBeLessThanOrEqual(22);
    expect(bands.furcationCount).toBe(0);
    for (let c = 1; c < bands.count; c++) expect(bands.parent[c]).toBeLessThan(c);
  });

  it('detects the furcation where a Y splits into two arms', () => {
    const stem = polyline([[0, 0, 0], [0, 0, 1]]);
    const left = polyline([[0, 0, 1], [-0.5, 0, 1.6]]).slice(1);
    const right = polyline([[0, 0, 1], [0.5, 0, 1.6]]).slice(1);
    const { bands } = run([...stem, ...left, ...right]);
    expect(bands.furcationCount).toBe(1);
    let fork = -1;
    const kids = new Int32Array(bands.count);
    for (let c = 1; c < bands.count; c++) kids[bands.parent[c]]++;
    for (let c = 0; c < bands.count; c++) if (kids[c] >= 2) fork = c;
    // The split lies within one band (5 cm) above the joint at z = 1 m.
    expect(Math.abs(bands.centroid[3 * fork + 2] - 1)).toBeLessThan(0.1);
  });
});

describe('medianRadius', () => {
  it('gives the radius of points on a circle around the axis', () => {
    const n = 64;
    const x = Float64Array.from({ length: n }, (_, i) => 0.3 * Math.cos((2 * Math.PI * i) / n));
    const y = Float64Array.from({ length: n }, (_, i) => 0.3 * Math.sin((2 * Math.PI * i) / n));
    const z = new Float64Array(n);
    expect(medianRadius(x, y, z, Int32Array.from({ length: n }, (_, i) => i), [0, 0, 0], [0, 0, 1])).toBeCloseTo(0.3, 12);
  });
});

describe('buildSkeleton', () => {
  const opts = { prune_length_ratio: 2, prune_min_length_m: 0.06, segment_length_ratio: 4, segment_min_m: 0.2, segment_max_m: 0.6 };

  it('prunes a side spur shorter than the noise limit and keeps the long arms', () => {
    const stem = polyline([[0, 0, 0], [0, 0, 1]]);
    const spur = polyline([[0, 0, 0.5], [0.07, 0, 0.5]]).slice(1);
    const up = polyline([[0, 0, 1], [0, 0, 1.5]]).slice(1);
    const { bands } = run([...stem, ...spur, ...up]);
    const sk = buildSkeleton(bands, opts);
    expect(sk.prunedCount).toBeGreaterThanOrEqual(1);
    // One unbranched chain: every piece has at most one child.
    const kids = new Map<number, number>();
    for (const p of sk.pieces) kids.set(p.parent, (kids.get(p.parent) ?? 0) + 1);
    for (const [parent, k] of kids) if (parent >= 0) expect(k).toBe(1);
  });

  it('cuts internodes into pieces of about the target length and starts a new internode after a furcation', () => {
    const stem = polyline([[0, 0, 0], [0, 0, 1.2]]);
    const left = polyline([[0, 0, 1.2], [-0.6, 0, 1.8]]).slice(1);
    const right = polyline([[0, 0, 1.2], [0.6, 0, 1.8]]).slice(1);
    const { bands } = run([...stem, ...left, ...right]);
    const sk = buildSkeleton(bands, opts);
    const roots = sk.pieces.filter((p) => p.parent < 0);
    expect(roots.length).toBe(1);
    // 1.2 m stem with 0.2 m pieces (the minimum target): 5–7 pieces before the fork.
    let chain = 0;
    for (let i = 0; i >= 0 && chain < 50; ) {
      chain++;
      const next = sk.pieces.findIndex((p) => p.parent === i);
      const kids = sk.pieces.filter((p) => p.parent === i);
      if (kids.length !== 1) {
        expect(kids.length).toBe(2);
        expect(kids.every((k) => k.startsInternode)).toBe(true);
        break;
      }
      i = next;
    }
    expect(chain).toBeGreaterThanOrEqual(5);
    expect(chain).toBeLessThanOrEqual(7);
  });
});
