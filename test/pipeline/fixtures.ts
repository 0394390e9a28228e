import { createPointCloud, type PointCloud } from '../../core/types/point-cloud.js';
import type { Network } from '../../core/types/network.js';
import { createRandom } from '../../core/util/random.js';

/**
 * A point cloud sampled on the cylinder surfaces of a network (uniform on each lateral surface,
 * `pointsPerM2` points per m², Gaussian noise of `noiseM` along the normal), plus a flat ground disc.
 * A stand-in for a scan with a known answer, fast enough for unit tests.
 */
export function sampleNetworkCloud(network: Network, pointsPerM2: number, noiseM: number, seed = 3): PointCloud {
  const rnd = createRandom(seed);
  const xs: number[] = [];
  const ys: number[] = [];
  const zs: number[] = [];
  for (const s of network.segments) {
    const d = [s.end[0] - s.start[0], s.end[1] - s.start[1], s.end[2] - s.start[2]];
    const len = Math.hypot(d[0], d[1], d[2]);
    const a = [d[0] / len, d[1] / len, d[2] / len];
    // Two unit vectors perpendicular to the axis.
    const t = Math.abs(a[2]) < 0.9 ? [0, 0, 1] : [1, 0, 0];
    let u = [a[1] * t[2] - a[2] * t[1], a[2] * t[0] - a[0] * t[2], a[0] * t[1] - a[1] * t[0]];
    const ul = Math.hypot(u[0], u[1], u[2]);
    u = [u[0] / ul, u[1] / ul, u[2] / ul];
    const v = [a[1] * u[2] - a[2] * u[1], a[2] * u[0] - a[0] * u[2], a[0] * u[1] - a[1] * u[0]];
    const n = Math.max(12, Math.round(2 * Math.PI * s.radiusM * len * pointsPerM2));
    for (let k = 0; k < n; k++) {
      const h = rnd.next() * len;
      const phi = rnd.next() * 2 * Math.PI;
      const r = s.radiusM + noiseM * rnd.normal();
      const c = Math.cos(phi) * r;
      const si = Math.sin(phi) * r;
      xs.push(s.start[0] + a[0] * h + u[0] * c + v[0] * si);
      ys.push(s.start[1] + a[1] * h + u[1] * c + v[1] * si);
      zs.push(s.start[2] + a[2] * h + u[2] * c + v[2] * si);
    }
  }
  const base = network.segments[0].start;
  for (let k = 0; k < 4000; k++) {
    const r = 2 * Math.sqrt(rnd.next());
    const phi = rnd.next() * 2 * Math.PI;
    xs.push(base[0] + r * Math.cos(phi));
    ys.push(base[1] + r * Math.sin(phi));
    zs.push(base[2] - 0.05 + noiseM * rnd.normal());
  }
  return createPointCloud(Float64Array.from(xs), Float64Array.from(ys), Float64Array.from(zs), { format: 'generated' });
}
