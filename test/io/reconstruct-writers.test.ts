import { describe, expect, it } from 'vitest';
import { formatNetworkJson, NETWORK_SCHEMA, parseNetworkJson } from '../../core/io/network-json.js';
import { formatGraphml } from '../../core/io/graphml.js';
import { cylindersMesh, ORDER_COLOURS } from '../../core/io/cylinders-mesh.js';
import type { Network, Segment } from '../../core/types/network.js';

function seg(id: number, parent: number, start: [number, number, number], end: [number, number, number], r: number, order = 0): Segment {
  return {
    segmentId: id, parentId: parent, branchId: order, branchOrder: order, strahlerOrder: 1, start, end, radiusM: r, radiusSeM: 0.001,
    lengthM: Math.hypot(end[0] - start[0], end[1] - start[1], end[2] - start[2]), fitRmseM: 0.002, arcCoverage: 0.9, pointCount: 100,
    reliable: id !== 2, reliabilityReason: id === 2 ? 'thin_arc' : '', radiusFitM: r, radiusCorrection: '',
  };
}
const network: Network = {
  segments: [seg(0, -1, [500000, 4000000, 100], [500000, 4000000, 101], 0.2), seg(1, 0, [500000, 4000000, 101], [500000, 4000000, 102], 0.15), seg(2, 0, [500000, 4000000, 101], [500000.7, 4000000, 101.7], 0.05, 1)],
  crsWkt: 'PROJCS["test & <demo>"]',
};

describe('formatNetworkJson', () => {
  it('writes the versioned schema with units and round-trips every field through parseNetworkJson', () => {
    const text = formatNetworkJson(network, { source: 'scan.las' });
    const doc = JSON.parse(text);
    expect(doc.schema).toBe('xylemap.network/1');
    expect(doc.units.radius_m).toBe('m');
    expect(doc.segment_count).toBe(3);
    const back = parseNetworkJson(text);
    expect(back.segments).toEqual(network.segments);
    expect(back.crsWkt).toBe(network.crsWkt);
  });
});

describe('parseNetworkJson', () => {
  it('refuses a file of another schema, naming the schema it expected', () => {
    expect(() => parseNetworkJson('{"schema":"other/1","segments":[]}', 'x.json')).toThrow(new RegExp(NETWORK_SCHEMA));
  });

  it('refuses a segment whose radius is not > 0', () => {
    const doc = JSON.parse(formatNetworkJson(network));
    doc.segments[1].radius_m = 0;
    expect(() => parseNetworkJson(JSON.stringify(doc))).toThrow(/radius_m must be > 0 m/);
  });
});

describe('formatGraphml', () => {
  it('writes one node per joint and one edge per segment, parent joint to child joint, with escaped text', () => {
    const xml = formatGraphml(network);
    // GraphML 1.0 structure (graphml.graphdrawing.org primer): <graph edgedefault>, <node id>, <edge source target>.
    expect(xml).toContain('<graph id="network" edgedefault="directed">');
    expect((xml.match(/<node /g) ?? []).length).toBe(4);
    expect((xml.match(/<edge /g) ?? []).length).toBe(3);
    expect(xml).toContain('<edge id="e2" source="n1" target="n3">');
    expect(xml).toContain('<data key="reliability_reason">thin_arc</data>');
    expect(xml).not.toMatch(/&(?!amp;|lt;|gt;|quot;)/);
  });
});

describe('cylindersMesh', () => {
  it('places every ring vertex at the radius from the axis and colours by branching order', () => {
    const mesh = cylindersMesh(network, 8);
    expect(mesh.positions.length).toBe(3 * 3 * 2 * 8);
    expect(mesh.faces.length).toBe(3 * 8 * 6);
    // Segment 2 (order 1): vertices 32..47. Distance to its axis = radius (cylinder geometry).
    const s = network.segments[2];
    const a = [s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]];
    const len = Math.hypot(a[0], a[1], a[2]);
    for (let v = 32; v < 48; v++) {
      const p = [mesh.positions[3 * v] - s.start[0], mesh.positions[3 * v + 1] - s.start[1], mesh.positions[3 * v + 2] - s.start[2]];
      const t = (p[0] * a[0] + p[1] * a[1] + p[2] * a[2]) / len;
      const d = Math.sqrt(Math.max(0, p[0] ** 2 + p[1] ** 2 + p[2] ** 2 - t * t));
      expect(d).toBeCloseTo(0.05, 9);
      expect(Array.from(mesh.colors!.slice(3 * v, 3 * v + 3))).toEqual(ORDER_COLOURS[1]);
    }
    for (const f of mesh.faces) expect(f).toBeLessThan(48);
  });
});
