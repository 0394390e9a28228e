import type { BandClusters } from './band-clusters.js';

/** One piece of a branch to be fitted with one cylinder: consecutive band clusters. */
export interface SegmentPiece {
  /** Clusters of the piece, base first. */
  clusters: number[];
  /** Index of the parent piece, -1 for the stem base. */
  parent: number;
  /** True for the first piece after a furcation (or the root). */
  startsInternode: boolean;
}

export interface Skeleton {
  pieces: SegmentPiece[];
  /** Cluster → piece (-1 for pruned clusters, whose vertices go to `prunedInto`). */
  clusterPiece: Int32Array;
  /** For a pruned cluster, the kept cluster its vertices are labelled with; else itself. */
  prunedInto: Int32Array;
  /** Clusters pruned as noise shoots. */
  prunedCount: number;
  /** 1 for kept clusters with two or more kept children. */
  isFurcation: Uint8Array;
}

export interface SkeletonOptions {
  prune_length_ratio: number;
  prune_min_length_m: number;
  segment_length_ratio: number;
  segment_min_m: number;
  segment_max_m: number;
  /**
   * Side shoots with fewer graph vertices per metre of their reach than this are strands of stray
   * returns (mixed pixels, clutter chained by the graph), not branches; 0 disables the rule.
   */
  min_vertices_per_m?: number;
  /** Input points per cluster; with `min_piece_points`, a piece closes only once it holds that many. */
  cluster_points?: ArrayLike<number>;
  min_piece_points?: number;
  /**
   * Highest vertex of each cluster above the ground, m. With `ground_shoot_height_m`, side shoots
   * that never rise above that height are dropped: near the stem base they are streaks of mixed
   * pixels between stem and ground, grass or roots, not crown branches.
   */
  cluster_max_height_m?: ArrayLike<number>;
  ground_shoot_height_m?: number;
}

/**
 * From the band-cluster tree to branch pieces:
 * 1. Prune noise shoots: at a cluster with several children, a child whose subtree reaches less
 *    than max(prune_min_length_m, prune_length_ratio × parent radius) beyond the parent is a bump
 *    of the surface, a stray leaf or a mixed-pixel spur, not a branch (common practice, no source).
 *    If every child is that short, the one reaching farthest is kept as the continuation.
 *    Shoots with fewer vertices per metre than `min_vertices_per_m` are dropped the same way.
 * 2. Internodes: chains of clusters between furcations; the main continuation is decided later
 *    by the topology stage from the fitted radii.
 * 3. Pieces: each internode is cut into pieces of about clamp(segment_length_ratio × r, min, max)
 *    of graph distance; a short last piece joins the one before it.
 */
export function buildSkeleton(bands: BandClusters, options: SkeletonOptions): Skeleton {
  const n = bands.count;
  const children: number[][] = Array.from({ length: n }, () => []);
  for (let c = 1; c < n; c++) if (bands.parent[c] >= 0) children[bands.parent[c]].push(c);
  // Post-order (children after parents in creation order, so reverse index order works:
  // every child is created after its parent).
  const reach = new Float64Array(n);
  const subVertices = new Float64Array(n);
  const kept = new Uint8Array(n).fill(1);
  const keptChildren: number[][] = Array.from({ length: n }, () => []);
  const minDensity = options.min_vertices_per_m ?? 0;
  const subMaxH = new Float64Array(n);
  const lowLimit = options.cluster_max_height_m ? (options.ground_shoot_height_m ?? 0) : 0;
  for (let c = n - 1; c >= 0; c--) {
    const kids = children[c];
    let r = bands.maxDistM[c];
    let sv = bands.offsets[c + 1] - bands.offsets[c];
    let mh = options.cluster_max_height_m ? options.cluster_max_height_m[c] : Infinity;
    if (kids.length === 1) {
      keptChildren[c].push(kids[0]);
      r = Math.max(r, reach[kids[0]]);
      sv += subVertices[kids[0]];
      mh = Math.max(mh, subMaxH[kids[0]]);
    } else if (kids.length > 1) {
      const minLen = Math.max(options.prune_min_length_m, options.prune_length_ratio * bands.radiusM[c]);
      const dense = (k: number): boolean =>
        (!(minDensity > 0) || subVertices[k] >= minDensity * Math.max(0, reach[k] - bands.maxDistM[c])) && !(subMaxH[k] < lowLimit);
      let far = -1;
      for (const k of kids) if (dense(k) && (far < 0 || reach[k] > reach[far])) far = k;
      if (far < 0) far = kids.reduce((a, b) => (subVertices[b] > subVertices[a] ? b : a), kids[0]);
      for (const k of kids) {
        if (k === far || (reach[k] - bands.maxDistM[c] >= minLen && dense(k))) {
          keptChildren[c].push(k);
          r = Math.max(r, reach[k]);
          sv += subVertices[k];
          mh = Math.max(mh, subMaxH[k]);
        } else kept[k] = 0;
      }
    }
    reach[c] = r;
    subVertices[c] = sv;
    subMaxH[c] = mh;
  }
  // Labels of pruned subtrees go to the nearest kept ancestor.
  const prunedInto = new Int32Array(n);
  let prunedCount = 0;
  const alive = new Uint8Array(n);
  for (let c = 0; c < n; c++) {
    const p = bands.parent[c];
    alive[c] = kept[c] && (p < 0 || alive[p]) ? 1 : 0;
    prunedInto[c] = alive[c] ? c : prunedInto[p];
    if (!alive[c]) prunedCount++;
  }

  const pieces: SegmentPiece[] = [];
  const clusterPiece = new Int32Array(n).fill(-1);
  // Internodes: start at root; each start walks single-child links.
  const starts: { cluster: number; parentPiece: number }[] = [{ cluster: 0, parentPiece: -1 }];
  while (starts.length > 0) {
    const { cluster, parentPiece } = starts.pop()!;
    const chain: number[] = [cluster];
    let c = cluster;
    while (keptChildren[c].length === 1) {
      c = keptChildren[c][0];
      chain.push(c);
    }
    const lastPiece = cutChain(chain, parentPiece);
    for (const k of keptChildren[c]) starts.push({ cluster: k, parentPiece: lastPiece });
  }
  const isFurcation = new Uint8Array(n);
  for (let c = 0; c < n; c++) if (alive[c] && keptChildren[c].length >= 2) isFurcation[c] = 1;
  return { pieces, clusterPiece, prunedInto, prunedCount, isFurcation };

  function cutChain(chain: number[], parentPiece: number): number {
    const groups: number[][] = [];
    let group: number[] = [];
    let from = bands.minDistM[chain[0]];
    let target = targetLength(chain[0]);
    let points = 0;
    const minPoints = options.cluster_points ? (options.min_piece_points ?? 0) : 0;
    for (const c of chain) {
      group.push(c);
      points += options.cluster_points ? options.cluster_points[c] : 0;
      // Sparse branches get longer pieces: a cylinder needs enough points to be fitted at all.
      if (bands.maxDistM[c] - from >= target && points >= minPoints) {
        groups.push(group);
        group = [];
        from = bands.maxDistM[c];
        target = targetLength(c);
        points = 0;
      }
    }
    if (group.length > 0) {
      const span = bands.maxDistM[group[group.length - 1]] - from;
      if (groups.length > 0 && (span < 0.5 * target || points < 0.5 * minPoints)) groups[groups.length - 1].push(...group);
      else groups.push(group);
    }
    let parent = parentPiece;
    groups.forEach((g, i) => {
      const id = pieces.length;
      pieces.push({ clusters: g, parent, startsInternode: i === 0 });
      for (const c of g) clusterPiece[c] = id;
      parent = id;
    });
    return parent;
  }

  function targetLength(c: number): number {
    return Math.min(options.segment_max_m, Math.max(options.segment_min_m, options.segment_length_ratio * bands.radiusM[c]));
  }
}
