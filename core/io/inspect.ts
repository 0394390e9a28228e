import type { AttributeArray, PointCloud } from '../types/point-cloud.js';
import { createRandom } from '../util/random.js';
import { crsLine, summarizeCrs, type CrsSummary } from './crs.js';

/** The facts `xylemap inspect` prints; keys are the JSON keys. */
export interface InspectReport {
  file: string | null;
  format: string;
  las_version: string | null;
  point_format: number | null;
  compressed: boolean;
  point_count: number;
  scale: [number, number, number] | null;
  offset: [number, number, number] | null;
  /** Computed from the points (not copied from the header); null for an empty cloud. */
  bounds: { min: [number, number, number]; max: [number, number, number] } | null;
  header_bounds: { min: [number, number, number]; max: [number, number, number] } | null;
  size_m: [number, number, number] | null;
  crs: CrsSummary & { summary: string };
  point_spacing: { median_nn_m: number | null; sample_size: number; seed: number; method: string };
  duplicate_fraction_estimate: number | null;
  returns: Record<string, number>;
  classification: Record<string, number>;
  attributes: string[];
  extra_fields: string[];
  warnings: string[];
}

export interface InspectOptions {
  /** Points sampled for the spacing and duplicate estimates (default 2000). */
  sampleSize?: number;
  /** Seed of the sample (default 1). */
  seed?: number;
}

/** A cloud whose horizontal extent exceeds this multiple of its height is unlikely to be one tree (common practice, no source). */
const WIDTH_TO_HEIGHT_LIMIT = 3;
/** Below this height (m) a cloud is "very flat" for a tree (common practice, no source). */
const MIN_TREE_HEIGHT_M = 1;
/** Wider than this (m) is more than one tree crown (common practice, no source; the widest crowns are ≈ 60 m). */
const MAX_TREE_EXTENT_M = 80;

/**
 * Summarize a cloud: counts, bounds from the points, CRS, spacing, histograms and warnings.
 * @param cloud any cloud from `readCloud`.
 * @returns a plain object ready for JSON.
 */
export function inspectCloud(cloud: PointCloud, options: InspectOptions = {}): InspectReport {
  const s = cloud.source;
  const isLas = s.format === 'las' || s.format === 'laz';
  const warnings: string[] = [...(s.warnings ?? [])];
  const bounds = computeBounds(cloud);
  const crs = summarizeCrs([...(s.vlrs ?? []), ...(s.evlrs ?? [])]);
  const sampleSize = options.sampleSize ?? 2000;
  const seed = options.seed ?? 1;
  const spacing = estimateSpacing(cloud, sampleSize, seed);

  if (cloud.count === 0) warnings.push('the file holds zero points');
  if (bounds && s.headerBounds && s.scale) {
    const off = headerMismatch(bounds, s.headerBounds, s.scale);
    if (off) warnings.push(`header bounds disagree with the points (${off}); the point bounds are used`);
  }
  if (spacing.duplicates > 0) {
    warnings.push(`duplicate points: ${spacing.duplicates} of ${spacing.sampled} sampled points have an exact duplicate (≈ ${(100 * spacing.duplicates / spacing.sampled).toFixed(1)} %)`);
  }
  let size: [number, number, number] | null = null;
  if (bounds) {
    size = [bounds.max[0] - bounds.min[0], bounds.max[1] - bounds.min[1], bounds.max[2] - bounds.min[2]];
    const height = size[2];
    const extent = Math.max(size[0], size[1]);
    if (cloud.count > 1 && height < MIN_TREE_HEIGHT_M) {
      warnings.push(`does not look like one tree: very flat (height ${fmt(height)} m)`);
    } else if (cloud.count > 1 && extent > WIDTH_TO_HEIGHT_LIMIT * height) {
      warnings.push(`does not look like one tree: horizontal extent ${fmt(extent)} m is more than ${WIDTH_TO_HEIGHT_LIMIT}× the height ${fmt(height)} m`);
    } else if (extent > MAX_TREE_EXTENT_M) {
      warnings.push(`does not look like one tree: horizontal extent ${fmt(extent)} m is wider than a single crown`);
    }
  }
  return {
    file: s.path ?? null,
    format: s.format,
    las_version: isLas ? (s.lasVersion ?? null) : null,
    point_format: isLas ? (s.pointFormat ?? null) : null,
    compressed: s.compressed === true,
    point_count: cloud.count,
    scale: isLas && s.scale ? s.scale : null,
    offset: isLas && s.offset ? s.offset : null,
    bounds,
    header_bounds: s.headerBounds ?? null,
    size_m: size,
    crs: { ...crs, summary: crsLine(crs) },
    point_spacing: {
      median_nn_m: spacing.median,
      sample_size: spacing.sampled,
      seed,
      method: 'median nearest-neighbour distance of a seeded random sample (grid search)',
    },
    duplicate_fraction_estimate: spacing.sampled > 0 ? spacing.duplicates / spacing.sampled : null,
    returns: histogram(cloud.attributes.returnNumber),
    classification: histogram(cloud.attributes.classification),
    attributes: Object.keys(cloud.attributes),
    extra_fields: Object.keys(cloud.extra),
    warnings,
  };
}

function fmt(v: number): string {
  return v >= 100 ? v.toFixed(0) : v >= 1 ? v.toFixed(2) : v.toPrecision(3);
}

export function computeBounds(cloud: PointCloud): { min: [number, number, number]; max: [number, number, number] } | null {
  if (cloud.count === 0) return null;
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  [cloud.x, cloud.y, cloud.z].forEach((a, k) => {
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    min[k] = lo;
    max[k] = hi;
  });
  return { min, max };
}

/** Describe the worst header/point bound difference larger than one scale step, or null. */
function headerMismatch(
  b: { min: number[]; max: number[] },
  h: { min: number[]; max: number[] },
  scale: number[],
): string | null {
  let worst = 0;
  let what = '';
  for (let k = 0; k < 3; k++) {
    const tol = Math.abs(scale[k]) + 1e-9 * Math.max(Math.abs(b.min[k]), Math.abs(b.max[k]));
    for (const [name, hv, pv] of [['min', h.min[k], b.min[k]], ['max', h.max[k], b.max[k]]] as const) {
      const d = Math.abs(hv - pv);
      if (!(d <= tol) && !(d <= worst)) {
        worst = d;
        what = `${name} ${'xyz'[k]}: header ${hv}, points ${pv}`;
      }
    }
  }
  return what || null;
}

function histogram(array: AttributeArray | undefined): Record<string, number> {
  const out: Record<string, number> = {};
  if (!array || array instanceof BigInt64Array || array instanceof BigUint64Array) return out;
  const a: ArrayLike<number> = array;
  const counts = new Map<number, number>();
  for (let i = 0; i < a.length; i++) counts.set(a[i], (counts.get(a[i]) ?? 0) + 1);
  for (const k of [...counts.keys()].sort((p, q) => p - q)) out[String(k)] = counts.get(k)!;
  return out;
}

/**
 * Median nearest-neighbour distance of a seeded random sample, searched on a hashed grid.
 * One pass over all points per trial cell size h: each point is compared only with the sample
 * points whose 3×3×3 cell neighbourhood contains it, so a nearest neighbour closer than h is
 * always found. When fewer than half the samples find one within h, h doubles.
 */
export function estimateSpacing(cloud: PointCloud, sampleSize: number, seed: number): { median: number | null; sampled: number; duplicates: number } {
  const n = cloud.count;
  if (n < 2) return { median: null, sampled: 0, duplicates: 0 };
  const m = Math.min(sampleSize, n);
  const rnd = createRandom(seed);
  const sample = sampleIndices(n, m, rnd);
  const b = computeBounds(cloud)!;
  const volume = Math.max(1e-12, (b.max[0] - b.min[0]) * (b.max[1] - b.min[1]) * Math.max(b.max[2] - b.min[2], 1e-6));
  const diag = Math.hypot(b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]);
  let h = Math.max(Math.cbrt(volume / n), 1e-9);
  const { x, y, z } = cloud;
  for (let trial = 0; trial < 40; trial++) {
    const best = new Float64Array(m).fill(Infinity);
    const cells = new Map<number, number[]>();
    const key = (i: number, j: number, k: number) => (Math.imul(i, 73856093) ^ Math.imul(j, 19349663) ^ Math.imul(k, 83492791)) | 0;
    const cell = (v: number, lo: number) => Math.floor((v - lo) / h);
    for (let s = 0; s < m; s++) {
      const p = sample[s];
      const ci = cell(x[p], b.min[0]);
      const cj = cell(y[p], b.min[1]);
      const ck = cell(z[p], b.min[2]);
      for (let di = -1; di <= 1; di++) {
        for (let dj = -1; dj <= 1; dj++) {
          for (let dk = -1; dk <= 1; dk++) {
            const kk = key(ci + di, cj + dj, ck + dk);
            const list = cells.get(kk);
            if (list) {
              if (list[list.length - 1] !== s) list.push(s);
            } else cells.set(kk, [s]);
          }
        }
      }
    }
    for (let i = 0; i < n; i++) {
      const list = cells.get(key(cell(x[i], b.min[0]), cell(y[i], b.min[1]), cell(z[i], b.min[2])));
      if (!list) continue;
      for (let t = 0; t < list.length; t++) {
        const s = list[t];
        const p = sample[s];
        if (p === i) continue;
        const dx = x[i] - x[p];
        const dy = y[i] - y[p];
        const dz = z[i] - z[p];
        const d2 = dx * dx + dy * dy + dz * dz;
        if (d2 < best[s]) best[s] = d2;
      }
    }
    let resolved = 0;
    let duplicates = 0;
    for (let s = 0; s < m; s++) {
      if (best[s] <= h * h) resolved++;
      if (best[s] === 0) duplicates++;
    }
    if (2 * resolved > m || h > 2 * diag) {
      const d = Array.from(best, Math.sqrt).sort((p, q) => p - q);
      const mid = d.length >> 1;
      const median = d.length % 2 ? d[mid] : (d[mid - 1] + d[mid]) / 2;
      return { median: Number.isFinite(median) ? median : null, sampled: m, duplicates };
    }
    h *= 2;
  }
  return { median: null, sampled: m, duplicates: 0 };
}

/** m distinct indices of 0..n−1 (partial Fisher–Yates on a sparse map). */
function sampleIndices(n: number, m: number, rnd: ReturnType<typeof createRandom>): Int32Array {
  const out = new Int32Array(m);
  const swapped = new Map<number, number>();
  for (let k = 0; k < m; k++) {
    const j = k + rnd.int(n - k);
    const vj = swapped.get(j) ?? j;
    const vk = swapped.get(k) ?? k;
    swapped.set(j, vk);
    out[k] = vj;
  }
  return out;
}

/** The human-readable table of `xylemap inspect`. */
export function formatInspectTable(r: InspectReport): string {
  const rows: [string, string][] = [];
  const v3 = (a: number[] | null) => (a ? a.map((v) => String(v)).join(', ') : '—');
  rows.push(['file', r.file ?? '—']);
  rows.push(['format', r.format + (r.compressed ? ' (compressed)' : '')]);
  if (r.las_version) rows.push(['LAS version / point format', `${r.las_version} / ${r.point_format}`]);
  rows.push(['points', r.point_count.toLocaleString('en-US')]);
  if (r.scale) rows.push(['scale', v3(r.scale)]);
  if (r.offset) rows.push(['offset', v3(r.offset)]);
  rows.push(['bounds min (from points)', r.bounds ? v3(r.bounds.min) : '—']);
  rows.push(['bounds max (from points)', r.bounds ? v3(r.bounds.max) : '—']);
  if (r.size_m) rows.push(['size x, y, z (file units)', r.size_m.map(fmt).join(' × ')]);
  rows.push(['CRS', r.crs.summary]);
  rows.push(['point spacing (median NN)', r.point_spacing.median_nn_m === null ? '—' : `${r.point_spacing.median_nn_m.toPrecision(3)} (sample ${r.point_spacing.sample_size}, seed ${r.point_spacing.seed})`]);
  const hist = (h: Record<string, number>) => Object.entries(h).map(([k, c]) => `${k}: ${c}`).join(', ') || '—';
  rows.push(['returns', hist(r.returns)]);
  rows.push(['classification', hist(r.classification)]);
  if (r.extra_fields.length) rows.push(['extra fields', r.extra_fields.join(', ')]);
  const w = Math.max(...rows.map(([k]) => k.length));
  const lines = rows.map(([k, v]) => `${k.padEnd(w)}  ${v}`);
  if (r.warnings.length) lines.push('', 'warnings:', ...r.warnings.map((x) => `  - ${x}`));
  return lines.join('\n');
}
