import { createSegment, type Network, type Segment, type Vec3 } from '../types/network.js';
import { createRandom } from '../util/random.js';

/**
 * Small generated networks with a KNOWN area-preservation exponent at every furcation, for tests,
 * benchmarks and validation of the scaling stage (the scan lab's generator lives in core/simulate;
 * this one is deliberately plain: straight internodes, no scan).
 */
export interface ExactNetworkSpec {
  /** a in Σ r_i^a = r_0^a, exact at every furcation. */
  exponent: number;
  /** Furcation levels below the tips (depth 1 = trunk + one furcation). */
  depth: number;
  childrenPerFurcation?: number;
  /** Share of r_0^a that goes to the leading child (the others split the rest equally); 1/N = symmetric. */
  leaderShare?: number;
  segmentsPerInternode?: number;
  baseRadiusM?: number;
  trunkLengthM?: number;
  /** l_child / l_parent for every internode. */
  lengthRatio?: number;
  /**
   * Fractional radius loss along each internode (0 = cylinders), geometric: segment s of k has
   * r_start·(1 − t)^(s/(k−1)); the rule holds between the parent's last segment (its END radius)
   * and each child's first segment (START radius), as in the scan lab's generator.
   */
  taperPerInternode?: number;
}

/**
 * Build the network. Internode lengths scale by `lengthRatio` per level; directions fan out
 * deterministically (geometry does not enter the exponent).
 */
export function exactExponentNetwork(spec: ExactNetworkSpec): Network {
  const a = spec.exponent;
  const N = spec.childrenPerFurcation ?? 2;
  const lead = spec.leaderShare ?? 1 / N;
  const k = spec.segmentsPerInternode ?? 4;
  const taper = spec.taperPerInternode ?? 0;
  const shares = Array.from({ length: N }, (_, i) => (i === 0 ? lead : (1 - lead) / (N - 1)));
  const segments: Segment[] = [];
  type Node = { parentSeg: number; start: Vec3; dir: Vec3; radius: number; length: number; level: number };
  const queue: Node[] = [{ parentSeg: -1, start: [0, 0, 0], dir: [0, 0, 1], radius: spec.baseRadiusM ?? 0.2, length: spec.trunkLengthM ?? 4, level: 0 }];
  let spin = 0;
  for (let qi = 0; qi < queue.length; qi++) {
    const node = queue[qi];
    let parent = node.parentSeg;
    let p = node.start;
    const step = node.length / k;
    for (let s = 0; s < k; s++) {
      const end: Vec3 = [p[0] + node.dir[0] * step, p[1] + node.dir[1] * step, p[2] + node.dir[2] * step];
      const id = segments.length;
      segments.push(plainSegment(id, parent, p, end, node.radius * (1 - taper) ** (k > 1 ? s / (k - 1) : 0), step));
      parent = id;
      p = end;
    }
    if (node.level >= spec.depth) continue;
    const endRadius = node.radius * (k > 1 ? 1 - taper : 1);
    for (let i = 0; i < N; i++) {
      spin += 2.399963; // golden angle, rad: spreads children around the parent axis
      const tilt = i === 0 ? 0.2 : 0.7;
      queue.push({
        parentSeg: parent,
        start: p,
        dir: turn(node.dir, tilt, spin),
        radius: endRadius * shares[i] ** (1 / a),
        length: node.length * (spec.lengthRatio ?? 0.8),
        level: node.level + 1,
      });
    }
  }
  return { segments };
}

/**
 * A copy with radii r·(1 + σ·N(0,1)) and radiusSeM = σ·r (the known noise), seeded.
 * @param relativeSd σ, e.g. 0.05 for 5 %
 */
export function withRadiusNoise(network: Network, relativeSd: number, seed: number): Network {
  const rng = createRandom(seed);
  return {
    segments: network.segments.map((s) => {
      const r = s.radiusM * (1 + relativeSd * rng.normal());
      return { ...s, radiusM: r > 0 ? r : s.radiusM * 1e-3, radiusFitM: r, radiusSeM: relativeSd * s.radiusM };
    }),
  };
}

function plainSegment(segmentId: number, parentId: number, start: Vec3, end: Vec3, radiusM: number, lengthM: number): Segment {
  return createSegment({ segmentId, parentId, start, end, radiusM, lengthM });
}

/** Direction tilted by `tilt` rad away from `d`, rotated `azimuth` rad around it. */
function turn(d: Vec3, tilt: number, azimuth: number): Vec3 {
  const ref: Vec3 = Math.abs(d[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
  const u = normalise(cross(d, ref));
  const v = cross(d, u);
  const c = Math.cos(tilt);
  const s = Math.sin(tilt);
  const ca = Math.cos(azimuth);
  const sa = Math.sin(azimuth);
  return normalise([
    c * d[0] + s * (ca * u[0] + sa * v[0]),
    c * d[1] + s * (ca * u[1] + sa * v[1]),
    c * d[2] + s * (ca * u[2] + sa * v[2]),
  ]);
}

function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

function normalise(a: Vec3): Vec3 {
  const l = Math.hypot(a[0], a[1], a[2]);
  return [a[0] / l, a[1] / l, a[2] / l];
}
