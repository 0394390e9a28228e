import type { AnnotatedNetwork } from '../topology/annotate.js';
import { lengthOf } from '../topology/annotate.js';
import type { Random } from '../util/random.js';
import { finiteOrNull, olsLine, percentileInterval, quantileSorted, sortedCopy } from './stats.js';

/**
 * Log–log line y = c + b·x fitted by least squares, with a bootstrap interval for b that resamples
 * whole BRANCHES (segments of one branch are not independent: they share taper and position).
 */
export interface PowerLawFit {
  /** Exponent b of y ∝ x^b. */
  exponent: number | null;
  ci95: [number | null, number | null];
  /** Prefactor e^c (units of y per unit x^b). */
  prefactor: number | null;
  r2: number | null;
  n_segments: number;
  n_branches: number;
}

export interface BranchTaperRow {
  branch_id: number;
  branch_order: number;
  n_segments: number;
  /** Exponent of radius ∝ (distance from apex)^b along this branch. */
  exponent: number | null;
  r2: number | null;
}

export interface TaperSummary {
  /** radius ∝ (distance from apex at the segment midpoint)^b, whole tree. */
  radius_vs_distance_from_apex: PowerLawFit;
  /** radius ∝ (path length from the base at the segment midpoint)^b, whole tree. */
  radius_vs_path_length_from_base: PowerLawFit;
  per_branch: { n_branches: number; median_exponent: number | null; q25_exponent: number | null; q75_exponent: number | null };
  /** Pipe model (Shinozaki et al. 1964, Jpn. J. Ecol. 14:97): area ∝ tips supplied, expected slope 1. */
  area_vs_tips_supplied: PowerLawFit & { pipe_model_slope: 1; pipe_model_inside_ci95: boolean | null };
  /** Pipe-model check against total length supplied, expected slope 1 when length tracks foliage. */
  area_vs_length_supplied: PowerLawFit & { pipe_model_slope: 1; pipe_model_inside_ci95: boolean | null };
}

/**
 * Taper and pipe-model fits over reliable segments (all segments if none is flagged reliable).
 * Positions are taken at segment midpoints, where the fitted radius applies.
 */
export function analyseTaper(
  ann: AnnotatedNetwork,
  minTaperSegments: number,
  replicates: number,
  confidence: number,
  rng: Random,
): { summary: TaperSummary; branchRows: BranchTaperRow[] } {
  const { segments } = ann;
  const useAll = !segments.some((s) => s.reliable);
  const idx: number[] = [];
  for (let i = 0; i < segments.length; i++) if (useAll || segments[i].reliable) idx.push(i);
  const logR = idx.map((i) => Math.log(segments[i].radiusM));
  const logArea = idx.map((i) => Math.log(Math.PI * segments[i].radiusM ** 2));
  const half = idx.map((i) => lengthOf(segments[i]) / 2);
  const apex = idx.map((i, k) => Math.log(ann.distanceFromApexM[i] - half[k]));
  const base = idx.map((i, k) => Math.log(ann.pathLengthFromBaseM[i] - half[k]));
  const tips = idx.map((i) => Math.log(ann.tipsSupplied[i]));
  const supplied = idx.map((i) => Math.log(ann.lengthSuppliedM[i]));
  const cluster = idx.map((i) => segments[i].branchId);

  const [fitApex, fitBase, fitTips, fitSupplied] = clusteredFits(
    [
      { x: apex, y: logR },
      { x: base, y: logR },
      { x: tips, y: logArea },
      { x: supplied, y: logArea },
    ],
    cluster,
    replicates,
    confidence,
    rng,
  );
  const pipe = (f: PowerLawFit) => ({
    ...f,
    pipe_model_slope: 1 as const,
    pipe_model_inside_ci95: f.ci95[0] === null || f.ci95[1] === null ? null : f.ci95[0] <= 1 && 1 <= f.ci95[1],
  });

  const byBranch = new Map<number, number[]>();
  idx.forEach((i, k) => {
    const list = byBranch.get(segments[i].branchId) ?? [];
    list.push(k);
    byBranch.set(segments[i].branchId, list);
  });
  const branchRows: BranchTaperRow[] = [];
  for (const [branchId, ks] of byBranch) {
    if (ks.length < minTaperSegments) continue;
    const line = olsLine(ks.map((k) => apex[k]), ks.map((k) => logR[k]));
    branchRows.push({
      branch_id: branchId,
      branch_order: segments[idx[ks[0]]].branchOrder,
      n_segments: ks.length,
      exponent: finiteOrNull(line.slope),
      r2: finiteOrNull(line.r2),
    });
  }
  branchRows.sort((a, b) => a.branch_id - b.branch_id);
  const slopes = sortedCopy(branchRows.map((r) => r.exponent).filter((v): v is number => v !== null));
  return {
    summary: {
      radius_vs_distance_from_apex: fitApex,
      radius_vs_path_length_from_base: fitBase,
      per_branch: {
        n_branches: slopes.length,
        median_exponent: finiteOrNull(quantileSorted(slopes, 0.5)),
        q25_exponent: finiteOrNull(quantileSorted(slopes, 0.25)),
        q75_exponent: finiteOrNull(quantileSorted(slopes, 0.75)),
      },
      area_vs_tips_supplied: pipe(fitTips),
      area_vs_length_supplied: pipe(fitSupplied),
    },
    branchRows,
  };
}

/**
 * OLS slope with a cluster bootstrap: per cluster the sums n, Σx, Σy, Σxx, Σxy are kept, so a
 * replicate costs one pass over clusters, not over segments.
 */
export function clusteredFit(
  x: number[],
  y: number[],
  cluster: number[],
  replicates: number,
  confidence: number,
  rng: Random,
): PowerLawFit {
  return clusteredFits([{ x, y }], cluster, replicates, confidence, rng)[0];
}

/**
 * Several fits over the same clusters with ONE cluster resample per replicate (the four taper and
 * pipe-model fits share branches; resampling once was 4× cheaper, measured on 35 000 segments).
 */
export function clusteredFits(
  pairs: { x: number[]; y: number[] }[],
  cluster: number[],
  replicates: number,
  confidence: number,
  rng: Random,
): PowerLawFit[] {
  const ids = new Map<number, number>();
  for (const c of cluster) if (!ids.has(c)) ids.set(c, ids.size);
  const nc = ids.size;
  const prepared = pairs.map(({ x, y }) => {
    const keep: number[] = [];
    for (let k = 0; k < x.length; k++) if (Number.isFinite(x[k]) && Number.isFinite(y[k])) keep.push(k);
    const sums = new Float64Array(5 * nc);
    const present = new Set<number>();
    for (const k of keep) {
      const c = ids.get(cluster[k])!;
      present.add(c);
      sums[5 * c] += 1;
      sums[5 * c + 1] += x[k];
      sums[5 * c + 2] += y[k];
      sums[5 * c + 3] += x[k] * x[k];
      sums[5 * c + 4] += x[k] * y[k];
    }
    const line = olsLine(keep.map((k) => x[k]), keep.map((k) => y[k]));
    return { keep, sums, line, clusters: present.size, reps: new Float64Array(replicates).fill(NaN) };
  });
  if (nc >= 2) {
    const pick = new Int32Array(nc);
    for (let b = 0; b < replicates; b++) {
      for (let k = 0; k < nc; k++) pick[k] = rng.int(nc);
      for (const p of prepared) {
        let n = 0;
        let sx = 0;
        let sy = 0;
        let sxx = 0;
        let sxy = 0;
        for (let k = 0; k < nc; k++) {
          const o = 5 * pick[k];
          n += p.sums[o];
          sx += p.sums[o + 1];
          sy += p.sums[o + 2];
          sxx += p.sums[o + 3];
          sxy += p.sums[o + 4];
        }
        if (!(n > 0)) continue;
        const vxx = sxx - (sx * sx) / n;
        // Relative guard: a replicate whose x barely varies has no slope.
        p.reps[b] = vxx > 1e-12 * Math.max(1, sxx) ? (sxy - (sx * sy) / n) / vxx : NaN;
      }
    }
  }
  return prepared.map((p) => ({
    exponent: finiteOrNull(p.line.slope),
    ci95: p.clusters >= 2 ? percentileInterval(p.reps, confidence) : [null, null],
    prefactor: finiteOrNull(Math.exp(p.line.intercept)),
    r2: finiteOrNull(p.line.r2),
    n_segments: p.keep.length,
    n_branches: p.clusters,
  }));
}
