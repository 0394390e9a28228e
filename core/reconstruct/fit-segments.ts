import type { Segment, Vec3 } from '../types/network.js';
import type { BandClusters } from './band-clusters.js';
import { medianRadius } from './band-clusters.js';
import type { Skeleton } from './skeleton.js';
import { fitCylinder } from './fit/cylinder-fit.js';
import { assessReliability } from './fit/reliability.js';
import { centreBreastHeight } from './breast-height.js';

/** What fitting needs from the cleaned cloud. */
export interface FitInput {
  /** Local coordinates of all input points, m. */
  px: Float64Array;
  py: Float64Array;
  pz: Float64Array;
  /** Vertex coordinates (voxel centroids), m. */
  vx: Float64Array;
  vy: Float64Array;
  vz: Float64Array;
  /** Vertex → voxel, and the voxel's input points. */
  vertexVoxel: Int32Array;
  voxelPointOffsets: Int32Array;
  voxelPoints: Int32Array;
  /** Ground height (local frame) below (x, y), m. */
  groundAt: (x: number, y: number) => number;
}

export interface FitOptions {
  range_noise_m: number;
  min_fit_points: number;
}

/** Largest factor between a fitted radius and the cluster's rough radius before the fit is rejected (common practice, no source). */
const RADIUS_SANITY_FACTOR = 3;
/** Largest fitted radius relative to the parent segment's radius that is accepted. */
const PARENT_RATIO_MAX = 1.5;
/** Largest fallback (unfitted) radius relative to the parent's radius (common practice, no source). */
const FALLBACK_PARENT_RATIO = 0.3;

/**
 * One cylinder per skeleton piece, in the local frame. The axis starts from the direction between
 * the piece's base and top cluster centroids (never the PCA axis alone: a trunk slice shorter than
 * its diameter has its largest spread across the stem). Segments are joined: each starts where its
 * parent ends; the stem base segment is extended down its axis to the ground surface.
 * Pieces whose fit fails or is implausible keep the rough cluster radius and are flagged.
 *
 * @returns segments with segmentId = piece index and parentId = parent piece (local coordinates)
 */
export function fitSegments(input: FitInput, bands: BandClusters, skeleton: Skeleton, options: FitOptions): Segment[] {
  const segments: Segment[] = [];
  /** Radius of the nearest fitted piece at or below each piece (its own when fitted), m. */
  const fittedRadius: number[] = [];
  /** Radius each piece actually got (fitted or fallback), m: bounds the fallback of the piece above. */
  const usedRadius: number[] = [];
  /** Fit points of each piece, kept for the breast-height slice. */
  const piecePts: Int32Array[] = [];
  for (let p = 0; p < skeleton.pieces.length; p++) {
    const piece = skeleton.pieces[p];
    // A furcation cluster at the top of a piece holds the bases of its children too: leave it out
    // of the fit when the piece has other clusters, so the Y-junction does not bend the cylinder.
    const fitClusters = piece.clusters.length > 1 && skeleton.isFurcation[piece.clusters[piece.clusters.length - 1]]
      ? piece.clusters.slice(0, -1)
      : piece.clusters;
    const pts = piecePoints(input, bands, fitClusters);
    piecePts.push(pts);
    const first = piece.clusters[0];
    const last = piece.clusters[piece.clusters.length - 1];
    const before = piece.parent >= 0 ? lastCluster(skeleton, piece.parent) : bands.parent[first];
    const top = centroid(bands, last);
    const bottom = piece.clusters.length > 1 ? centroid(bands, first) : before >= 0 ? centroid(bands, before) : null;
    let axis: Vec3 = bottom ? unit(sub(top, bottom)) : [0, 0, 1];
    if (!(Math.abs(axis[0]) + Math.abs(axis[1]) + Math.abs(axis[2]) > 0)) axis = [0, 0, 1];
    const rough = roughRadius(input, bands, piece.clusters, axis);
    const fit = pts.length >= options.min_fit_points ? fitCylinder(input.px, input.py, input.pz, pts, { initialAxis: axis, rangeNoiseM: options.range_noise_m }) : null;
    const parent = piece.parent >= 0 ? segments[piece.parent] : null;
    // A branch is not much thicker than what carries it (common practice, no source): a fit above
    // PARENT_RATIO_MAX × the parent's radius comes from a few stray points, not from wood.
    // Caps refer to the nearest ancestor with a usable fit, so that one unfitted piece does not
    // shrink the limits of everything above it.
    const ancestorR = piece.parent >= 0 ? fittedRadius[piece.parent] : Infinity;
    const parentCap = PARENT_RATIO_MAX * ancestorR;
    const sane =
      fit !== null && fit.radiusM > 0 && fit.radiusM <= RADIUS_SANITY_FACTOR * Math.max(rough, 0.005) && fit.radiusM >= rough / RADIUS_SANITY_FACTOR && fit.radiusM <= parentCap;
    let start: Vec3;
    let end: Vec3;
    let dir: Vec3 = sane ? (fit!.axisDir as Vec3) : axis;
    if (dot(dir, axis) < 0) dir = [-dir[0], -dir[1], -dir[2]];
    if (sane) {
      start = parent ? joinToParent(parent, fit!.start as Vec3, dir, piece.startsInternode) : ([...fit!.start] as Vec3);
      end = [...fit!.end] as Vec3;
    } else {
      start = parent ? ([...parent.end] as Vec3) : centroid(bands, first);
      end = top;
    }
    if (!parent) start = extendToGround(start, dir, input.groundAt);
    if (!(dot(sub(end, start), dir) > 0)) {
      // The fitted end lies behind the joint: keep the direction, use the piece's graph length.
      const len = Math.max(1e-3, bands.maxDistM[last] - bands.minDistM[first]);
      end = [start[0] + dir[0] * len, start[1] + dir[1] * len, start[2] + dir[2] * len];
    }
    // Without a usable fit the rough spread stands in, capped at the fitted ancestor's radius (0.3 of it
    // for the first piece of a side branch: below the 0.5 stem-fork ratio of the DBH rule, and never
    // competing with a fitted continuation).
    // Inside an internode the fallback also stays at or below what the piece below got: otherwise
    // a chain of unfitted pieces on a thin side shoot (a strand of stray returns) climbs back to
    // the stem's radius after its first piece.
    const fallbackCap = piece.startsInternode ? FALLBACK_PARENT_RATIO * ancestorR : Math.min(ancestorR, piece.parent >= 0 ? usedRadius[piece.parent] : Infinity);
    const radiusM = sane ? fit!.radiusM : Math.min(Math.max(rough, 1e-4), fallbackCap);
    fittedRadius.push(sane ? fit!.radiusM : ancestorR);
    usedRadius.push(radiusM);
    const tooThick = fit !== null && fit.radiusM > parentCap;
    const rel = sane
      ? assessReliability(fit, { rangeNoiseM: options.range_noise_m, minPoints: options.min_fit_points })
      : { reliable: false, reason: tooThick ? 'taper_outlier' : fit ? 'poor_fit' : 'few_points' };
    segments.push({
      segmentId: p,
      parentId: piece.parent,
      branchId: 0,
      branchOrder: 0,
      strahlerOrder: 0,
      start,
      end,
      radiusM,
      radiusSeM: sane ? fit!.radiusSeM : radiusM,
      lengthM: Math.hypot(end[0] - start[0], end[1] - start[1], end[2] - start[2]),
      fitRmseM: sane ? fit!.rmseM : 0,
      arcCoverage: sane ? fit!.arcCoverage : 0,
      pointCount: pts.length,
      reliable: rel.reliable,
      reliabilityReason: rel.reason,
      radiusFitM: radiusM,
      radiusCorrection: sane ? '' : 'cluster_spread',
    });
  }
  // Segment → piece whose points it holds (the upper part of a split keeps its piece's points).
  const source: number[] = segments.map((_, i) => i);
  const split = splitAtInsertions(segments, skeleton, source);
  return centreBreastHeight(split, (i) => (source[i] !== undefined ? piecePts[source[i]] : null), input.px, input.py, input.pz, options);
}

/** Shortest piece a split may leave on either side of an insertion, m. */
const MIN_SPLIT_PIECE_M = 0.02;

/**
 * Band clusters split only once the children have parted, a little above the true furcation, so
 * the parent segment overshoots. Where a lateral's axis meets its parent's axis well before the
 * parent's end, the parent is cut there: the lower part keeps the lateral, the upper part (same
 * cylinder, its points shared pro rata) carries the other children. The furcation then sits where
 * the branch leaves the stem, which matters e.g. for a fork just below breast height. A lateral
 * that meets the parent's axis within MIN_SPLIT_PIECE_M of the parent's start (or below it) is
 * attached to the joint below instead, when a sibling is thicker (so it is not the continuation).
 */
function splitAtInsertions(segments: Segment[], skeleton: Skeleton, source: number[]): Segment[] {
  const n = segments.length;
  const children: number[][] = Array.from({ length: n }, () => []);
  for (let i = 0; i < n; i++) if (segments[i].parentId >= 0) children[segments[i].parentId].push(i);
  const out = segments;
  for (let p = 0; p < n; p++) {
    const kids = children[p];
    if (kids.length < 2) continue;
    const par = out[p];
    const axis = sub(par.end, par.start);
    const len2 = dot(axis, axis);
    if (!(len2 > 0)) continue;
    const len = Math.sqrt(len2);
    // Lowest insertion among the laterals (children whose start was moved off the parent's end).
    let lowest = -1;
    let tLow = 1;
    for (const c of kids) {
      if (!skeleton.pieces[c].startsInternode) continue;
      const st = out[c].start;
      if (st[0] === par.end[0] && st[1] === par.end[1] && st[2] === par.end[2]) continue;
      const t = dot(sub(st, par.start), axis) / len2;
      if (t < tLow) {
        tLow = t;
        lowest = c;
      }
    }
    if (lowest < 0) continue;
    const movable = kids.some((c) => c !== lowest && out[c].radiusM > out[lowest].radiusM) || out[lowest].radiusM >= par.radiusM;
    if (!(tLow * len >= MIN_SPLIT_PIECE_M) && par.parentId >= 0 && movable) {
      // The lateral leaves at (or just below) the parent's start: it belongs to the joint below.
      // It moves when a sibling is thicker (the continuation stays on the parent) or when it is at
      // least as thick as the parent (it then continues the branch from the joint below); a thickest
      // child thinner than a stub parent stays, or the stub's thin subtree would become the stem.
      out[lowest].parentId = par.parentId;
      out[lowest].start = [...par.start] as Vec3;
      out[lowest].lengthM = Math.hypot(...sub(out[lowest].end, par.start));
      continue;
    }
    if (!(tLow * len >= MIN_SPLIT_PIECE_M) || !((1 - tLow) * len >= MIN_SPLIT_PIECE_M)) continue;
    const q: Vec3 = [par.start[0] + axis[0] * tLow, par.start[1] + axis[1] * tLow, par.start[2] + axis[2] * tLow];
    const upperId = out.length;
    const upperPoints = Math.round(par.pointCount * (1 - tLow));
    out.push({ ...par, segmentId: upperId, parentId: p, start: q, end: [...par.end] as Vec3, lengthM: (1 - tLow) * len, pointCount: upperPoints });
    source[upperId] = source[p];
    par.end = [...q] as Vec3;
    par.lengthM = tLow * len;
    par.pointCount -= upperPoints;
    out[lowest].start = [...q] as Vec3;
    out[lowest].lengthM = Math.hypot(...sub(out[lowest].end, q));
    for (const c of kids) if (c !== lowest) out[c].parentId = upperId;
  }
  return out;
}

/** Input points of the piece (through vertices → voxels). */
export function piecePoints(input: FitInput, bands: BandClusters, clusters: number[]): Int32Array {
  let total = 0;
  for (const c of clusters) {
    for (let a = bands.offsets[c]; a < bands.offsets[c + 1]; a++) {
      const vox = input.vertexVoxel[bands.vertices[a]];
      total += input.voxelPointOffsets[vox + 1] - input.voxelPointOffsets[vox];
    }
  }
  const out = new Int32Array(total);
  let o = 0;
  for (const c of clusters) {
    for (let a = bands.offsets[c]; a < bands.offsets[c + 1]; a++) {
      const vox = input.vertexVoxel[bands.vertices[a]];
      for (let b = input.voxelPointOffsets[vox]; b < input.voxelPointOffsets[vox + 1]; b++) out[o++] = input.voxelPoints[b];
    }
  }
  return out;
}

function roughRadius(input: FitInput, bands: BandClusters, clusters: number[], axis: Vec3): number {
  const verts: number[] = [];
  for (const c of clusters) for (let a = bands.offsets[c]; a < bands.offsets[c + 1]; a++) verts.push(bands.vertices[a]);
  let sx = 0, sy = 0, sz = 0;
  for (const v of verts) {
    sx += input.vx[v];
    sy += input.vy[v];
    sz += input.vz[v];
  }
  const m = verts.length || 1;
  return medianRadius(input.vx, input.vy, input.vz, verts, [sx / m, sy / m, sz / m], axis);
}

function lastCluster(skeleton: Skeleton, piece: number): number {
  const c = skeleton.pieces[piece].clusters;
  return c[c.length - 1];
}

function centroid(bands: BandClusters, c: number): Vec3 {
  return [bands.centroid[3 * c], bands.centroid[3 * c + 1], bands.centroid[3 * c + 2]];
}

/** Move the stem-base start down its axis to the ground surface (at most 1 m). */
function extendToGround(start: Vec3, dir: Vec3, groundAt: (x: number, y: number) => number): Vec3 {
  if (!(dir[2] > 0.3)) return start;
  const g = groundAt(start[0], start[1]);
  const t = Math.min(1, Math.max(0, (start[2] - g) / dir[2]));
  return [start[0] - dir[0] * t, start[1] - dir[1] * t, start[2] - dir[2] * t];
}

/**
 * Where a segment starts. Inside an internode it starts at its parent's end (a continuous axis).
 * The first segment after a furcation starts where its own fitted axis, followed back from its
 * first points, passes closest to the parent's axis — the branch's insertion in the parent —
 * searched at most 3 parent radii back; near-parallel continuations keep the parent's end.
 */
function joinToParent(parent: Segment, fitStart: Vec3, dir: Vec3, startsInternode: boolean): Vec3 {
  if (!startsInternode) return [...parent.end] as Vec3;
  const pd = unit(sub(parent.end, parent.start));
  const c = dot(pd, dir);
  if (Math.abs(c) > Math.cos((20 * Math.PI) / 180)) return [...parent.end] as Vec3;
  // Closest approach of the lines fitStart + s·dir and parent.start + t·pd.
  const w = sub(fitStart, parent.start);
  const b = c;
  const d = dot(dir, w);
  const e = dot(pd, w);
  const den = 1 - b * b;
  const sParam = (b * e - d) / den;
  const back = Math.min(0, Math.max(-3 * parent.radiusM, sParam));
  return [fitStart[0] + dir[0] * back, fitStart[1] + dir[1] * back, fitStart[2] + dir[2] * back];
}

function sub(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}
function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}
function unit(a: Vec3): Vec3 {
  const l = Math.hypot(a[0], a[1], a[2]);
  return l > 0 ? [a[0] / l, a[1] / l, a[2] / l] : [0, 0, 0];
}
