import type { Network } from '../types/network.js';
import type { Random } from '../util/random.js';

/** Primitive kinds of the virtual scene. */
export const CYLINDER = 0;
export const LEAF = 1;

/**
 * What the virtual scanner sees: the network's cylinders plus optional leaf discs, struct of
 * arrays. For a cylinder (p, u, lengthM, radiusM) is start, unit axis, length and radius; for a
 * leaf disc p is the centre, u the unit normal, lengthM 0.
 */
export interface Scene {
  count: number;
  kind: Uint8Array;
  px: Float64Array;
  py: Float64Array;
  pz: Float64Array;
  ux: Float64Array;
  uy: Float64Array;
  uz: Float64Array;
  lengthM: Float64Array;
  radiusM: Float64Array;
  /** Segment id of a cylinder, -1 for a leaf. */
  segmentId: Int32Array;
  /** Tight axis-aligned box of every primitive (6 per primitive), m. */
  boxes: Float64Array;
  min: [number, number, number];
  max: [number, number, number];
}

/**
 * Build the scene of a generated tree.
 * @param network the true network
 * @param tipSegmentIds segments that get leaves
 * @param leavesPerTip leaf discs near each tip (0 = leaf-off)
 * @param leafRadiusM radius of a leaf disc, m
 * @param rng random stream for leaf placement
 */
export function buildScene(network: Network, tipSegmentIds: number[], leavesPerTip: number, leafRadiusM: number, rng: Random): Scene {
  const segs = network.segments;
  const nLeaves = leavesPerTip * tipSegmentIds.length;
  const n = segs.length + nLeaves;
  const scene: Scene = {
    count: n,
    kind: new Uint8Array(n),
    px: new Float64Array(n),
    py: new Float64Array(n),
    pz: new Float64Array(n),
    ux: new Float64Array(n),
    uy: new Float64Array(n),
    uz: new Float64Array(n),
    lengthM: new Float64Array(n),
    radiusM: new Float64Array(n),
    segmentId: new Int32Array(n),
    boxes: new Float64Array(6 * n),
    min: [Infinity, Infinity, Infinity],
    max: [-Infinity, -Infinity, -Infinity],
  };
  segs.forEach((s, i) => {
    const dx = s.end[0] - s.start[0];
    const dy = s.end[1] - s.start[1];
    const dz = s.end[2] - s.start[2];
    const len = Math.hypot(dx, dy, dz);
    setPrimitive(scene, i, CYLINDER, s.start, [dx / len, dy / len, dz / len], len, s.radiusM, s.segmentId);
  });
  const byId = new Map(segs.map((s, i) => [s.segmentId, i]));
  let k = segs.length;
  for (const tip of tipSegmentIds) {
    const s = segs[byId.get(tip)!];
    for (let j = 0; j < leavesPerTip; j++) {
      // Leaves cluster along the tip segment, up to 8 cm off its axis.
      const f = rng.uniform(0, 1);
      const c: [number, number, number] = [
        s.start[0] + f * (s.end[0] - s.start[0]) + rng.uniform(-0.08, 0.08),
        s.start[1] + f * (s.end[1] - s.start[1]) + rng.uniform(-0.08, 0.08),
        s.start[2] + f * (s.end[2] - s.start[2]) + rng.uniform(-0.08, 0.08),
      ];
      const nz = rng.uniform(-1, 1);
      const phi = rng.uniform(0, 2 * Math.PI);
      const h = Math.sqrt(1 - nz * nz);
      setPrimitive(scene, k++, LEAF, c, [h * Math.cos(phi), h * Math.sin(phi), nz], 0, leafRadiusM, -1);
    }
  }
  return scene;
}

function setPrimitive(
  scene: Scene,
  i: number,
  kind: number,
  p: [number, number, number],
  u: [number, number, number],
  lengthM: number,
  radiusM: number,
  segmentId: number,
): void {
  scene.kind[i] = kind;
  scene.px[i] = p[0];
  scene.py[i] = p[1];
  scene.pz[i] = p[2];
  scene.ux[i] = u[0];
  scene.uy[i] = u[1];
  scene.uz[i] = u[2];
  scene.lengthM[i] = lengthM;
  scene.radiusM[i] = radiusM;
  scene.segmentId[i] = segmentId;
  for (let a = 0; a < 3; a++) {
    // Box of a cylinder: its end points widened by r·√(1 − u_a²) per axis; of a disc, the same with
    // u the normal (the disc's extent along axis a is r·√(1 − n_a²)).
    const ext = radiusM * Math.sqrt(Math.max(0, 1 - u[a] * u[a]));
    const lo = Math.min(p[a], p[a] + u[a] * lengthM) - ext;
    const hi = Math.max(p[a], p[a] + u[a] * lengthM) + ext;
    scene.boxes[6 * i + a] = lo;
    scene.boxes[6 * i + 3 + a] = hi;
    if (lo < scene.min[a]) scene.min[a] = lo;
    if (hi > scene.max[a]) scene.max[a] = hi;
  }
}
