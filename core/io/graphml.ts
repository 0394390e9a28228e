import type { Network } from '../types/network.js';
import { segmentToFields } from './segment-fields.js';

/**
 * network.graphml (GraphML 1.0, graphml.graphdrawing.org): the network as a directed graph whose
 * nodes are the joints (node "n0" the start of the stem-base segment, node "n<k+1>" the end of the
 * k-th segment) and whose edges are the segments, parent joint → child joint. Node keys x, y, z (m,
 * input frame); edge keys carry the segment columns.
 */
export function formatGraphml(network: Network): string {
  const segs = network.segments;
  const indexOf = new Map<number, number>();
  segs.forEach((s, i) => indexOf.set(s.segmentId, i));
  const edgeKeys: [string, 'int' | 'double' | 'boolean' | 'string'][] = [
    ['segment_id', 'int'],
    ['parent_id', 'int'],
    ['branch_id', 'int'],
    ['branch_order', 'int'],
    ['strahler_order', 'int'],
    ['radius_m', 'double'],
    ['radius_se_m', 'double'],
    ['length_m', 'double'],
    ['fit_rmse_m', 'double'],
    ['arc_coverage', 'double'],
    ['point_count', 'int'],
    ['reliable', 'boolean'],
    ['reliability_reason', 'string'],
  ];
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push('<graphml xmlns="http://graphml.graphdrawing.org/xmlns" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="http://graphml.graphdrawing.org/xmlns http://graphml.graphdrawing.org/xmlns/1.0/graphml.xsd">');
  for (const k of ['x', 'y', 'z']) out.push(`  <key id="${k}" for="node" attr.name="${k}" attr.type="double"/>`);
  for (const [k, t] of edgeKeys) out.push(`  <key id="${k}" for="edge" attr.name="${k}" attr.type="${t}"/>`);
  out.push('  <graph id="network" edgedefault="directed">');
  const root = segs.find((s) => s.parentId < 0);
  const node = (id: string, p: [number, number, number]): void => {
    out.push(`    <node id="${id}"><data key="x">${p[0]}</data><data key="y">${p[1]}</data><data key="z">${p[2]}</data></node>`);
  };
  if (root) node('n0', root.start);
  segs.forEach((s, i) => node(`n${i + 1}`, s.end));
  segs.forEach((s, i) => {
    const p = s.parentId < 0 ? undefined : indexOf.get(s.parentId);
    const source = p === undefined ? 'n0' : `n${p + 1}`;
    const values = segmentToFields(s);
    const data = edgeKeys.map(([k]) => `<data key="${k}">${escapeXml(String(values[k]))}</data>`).join('');
    out.push(`    <edge id="e${s.segmentId}" source="${source}" target="n${i + 1}">${data}</edge>`);
  });
  out.push('  </graph>');
  out.push('</graphml>');
  return out.join('\n') + '\n';
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}
