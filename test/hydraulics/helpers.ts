import { createSegment, type Network, type Segment, type Vec3 } from '../../core/types/network.js';

/**
 * Generated test networks with known structure (no files): a symmetric binary tree whose level k
 * has 2^k identical segments, built iteratively.
 */
export interface BinaryTreeSpec {
  /** Number of branching levels (level 0 = trunk); tips at level levels − 1. */
  levels: number;
  baseRadiusM: number;
  baseLengthM: number;
  /** r_{k+1} / r_k */
  radiusRatio: number;
  /** l_{k+1} / l_k */
  lengthRatio: number;
  /** Cylinders per internode (a chain of equal cylinders); default 1. */
  cylindersPerInternode?: number;
  /** Half-angle between the two children, radians; default 0.5. */
  spreadRad?: number;
}

export function segment(id: number, parentId: number, start: Vec3, end: Vec3, radiusM: number): Segment {
  return createSegment({ segmentId: id, parentId, start, end, radiusM });
}

export function binaryTree(spec: BinaryTreeSpec): Network {
  const per = spec.cylindersPerInternode ?? 1;
  const spread = spec.spreadRad ?? 0.5;
  const segments: Segment[] = [];
  // Work items: parent segment id, start point, direction (unit), level.
  const stack: { parentId: number; start: Vec3; dir: Vec3; level: number; azimuth: number }[] = [
    { parentId: -1, start: [0, 0, 0], dir: [0, 0, 1], level: 0, azimuth: 0 },
  ];
  while (stack.length > 0) {
    const w = stack.pop()!;
    const r = spec.baseRadiusM * spec.radiusRatio ** w.level;
    const l = (spec.baseLengthM * spec.lengthRatio ** w.level) / per;
    let parentId = w.parentId;
    let p = w.start;
    for (let c = 0; c < per; c++) {
      const end: Vec3 = [p[0] + w.dir[0] * l, p[1] + w.dir[1] * l, p[2] + w.dir[2] * l];
      const id = segments.length;
      segments.push(segment(id, parentId, p, end, r));
      parentId = id;
      p = end;
    }
    if (w.level + 1 >= spec.levels) continue;
    for (const side of [-1, 1]) {
      const az = w.azimuth + Math.PI / 2;
      // Tilt the direction by ±spread in a plane rotating with the level; keep it pointing up.
      const tilt: Vec3 = [Math.cos(az) * Math.sin(spread) * side, Math.sin(az) * Math.sin(spread) * side, Math.cos(spread)];
      const dir = normalise([w.dir[0] * 0.5 + tilt[0], w.dir[1] * 0.5 + tilt[1], Math.abs(w.dir[2] * 0.5 + tilt[2])]);
      stack.push({ parentId, start: p, dir, level: w.level + 1, azimuth: az });
    }
  }
  return { segments };
}

function normalise(v: Vec3): Vec3 {
  const n = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / n, v[1] / n, v[2] / n];
}

/** A single straight vertical pipe. */
export function singlePipe(radiusM: number, lengthM: number): Network {
  return { segments: [segment(0, -1, [0, 0, 0], [0, 0, lengthM], radiusM)] };
}
