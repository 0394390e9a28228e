import type { ReportData } from './report-data.js';
import type { ViewerLayer, ViewerPayload } from './viewer/payload.js';

function b64(values: Float32Array): string {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength).toString('base64');
}

function floatLayer(values: ArrayLike<number>): string {
  return b64(Float32Array.from(values as ArrayLike<number>));
}

/**
 * Encode the network and its per-segment layers for the browser viewer. Layers missing from the
 * data stay in the list with a `missing` reason, so the colour menu can show them disabled.
 */
export function viewerPayload(data: ReportData, initial: string, minDrawRadiusPx: number): ViewerPayload {
  const segs = data.network.segments;
  const n = segs.length;
  const root = segs.find((s) => s.parentId < 0) ?? segs[0];
  const origin: [number, number, number] = [root.start[0], root.start[1], root.start[2]];
  const start = new Float32Array(3 * n);
  const end = new Float32Array(3 * n);
  const radius = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const s = segs[i];
    for (let k = 0; k < 3; k++) {
      start[3 * i + k] = s.start[k] - origin[k];
      end[3 * i + k] = s.end[k] - origin[k];
    }
    radius[i] = s.radiusM;
  }
  const maxOrder = segs.reduce((m, s) => Math.max(m, s.branchOrder), 0);
  const { conduitDiameterUm, waterPotentialMPa, plcPercent } = data.layers;
  const layers: ViewerLayer[] = [
    {
      key: 'branch_order',
      label: 'branching order',
      unit: '',
      kind: 'categorical',
      categories: Array.from({ length: maxOrder + 1 }, (_, k) => (k === 0 ? 'trunk (0)' : `order ${k}`)),
      values: floatLayer(segs.map((s) => s.branchOrder)),
    },
    { key: 'radius', label: 'radius', unit: 'm', kind: 'continuous', log: true, values: b64(radius) },
    {
      key: 'reliability',
      label: 'reliability flag',
      unit: '',
      kind: 'categorical',
      categories: ['flagged (excluded)', 'reliable'],
      values: floatLayer(segs.map((s) => (s.reliable ? 1 : 0))),
    },
    optional('conduit_diameter', 'conduit diameter', 'µm', conduitDiameterUm, {}),
    optional('water_potential', 'water potential', 'MPa', waterPotentialMPa, { reverse: true }),
    optional('plc', 'PLC', '%', plcPercent, {}),
  ];
  const reasons = [...new Set(segs.filter((s) => !s.reliable).map((s) => s.reliabilityReason || 'unspecified'))].sort();
  const reasonIndex = floatLayer(segs.map((s) => (s.reliable ? -1 : reasons.indexOf(s.reliabilityReason || 'unspecified'))));
  return {
    count: n,
    origin,
    start: b64(start),
    end: b64(end),
    radius: b64(radius),
    layers,
    segmentIds: floatLayer(segs.map((s) => s.segmentId)),
    reasons,
    reasonIndex,
    initial,
    minDrawRadiusPx,
  };
}

function optional(
  key: string,
  label: string,
  unit: string,
  values: Float64Array | null,
  scale: { log?: boolean; reverse?: boolean },
): ViewerLayer {
  const base: ViewerLayer = { key, label, unit, kind: 'continuous', ...scale };
  return values ? { ...base, values: floatLayer(values) } : { ...base, missing: 'not computed (hydraulics stage gave no values)' };
}
