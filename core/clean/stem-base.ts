import { XylemapError } from '../util/errors.js';

/** Per connected piece of the cleaned cloud: what the stem-base search needs. */
export interface PieceStats {
  label: number;
  vertexCount: number;
  /** Lowest / highest height above the ground surface, m. */
  minHeightM: number;
  maxHeightM: number;
  /** Vertices more than 1 m above the ground: tall pieces are trees, low ones clutter. */
  tallCount: number;
}

export interface StemBase {
  /** Label of the piece that holds the stem base. */
  label: number;
  /** Vertices of the lowest slice of that piece: the sources of graph distances. */
  seeds: Int32Array;
  /** Height of the lowest vertex of the piece above the ground, m. */
  baseHeightM: number;
  warnings: string[];
}

/**
 * Summaries of the pieces (connected components) of the cleaned cloud.
 * @param label component label per vertex (-1 excluded)
 * @param heightM height above the ground per vertex, m
 */
export function pieceStats(label: Int32Array, count: number, heightM: Float64Array): PieceStats[] {
  const out: PieceStats[] = Array.from({ length: count }, (_, i) => ({ label: i, vertexCount: 0, minHeightM: Infinity, maxHeightM: -Infinity, tallCount: 0 }));
  for (let v = 0; v < label.length; v++) {
    const l = label[v];
    if (l < 0) continue;
    const s = out[l];
    s.vertexCount++;
    const h = heightM[v];
    if (h < s.minHeightM) s.minHeightM = h;
    if (h > s.maxHeightM) s.maxHeightM = h;
    if (h > 1) s.tallCount++;
  }
  return out;
}

/**
 * Find the stem base: among the pieces reaching down to `searchHeightM` above the ground, the one
 * with most vertices higher than 1 m (a tree, not a bush or a low clutter object). When no piece
 * reaches the ground (the base is occluded or missing), the piece with most tall vertices is used
 * and a warning says so. Its lowest `sliceM` are the seeds. The base is not assumed to be at the
 * origin or at the lowest point of the file: heights are above the local ground surface.
 *
 * @throws XylemapError when no piece rises at least 0.5 m above the ground (no tree in the cloud)
 */
export function findStemBase(
  pieces: PieceStats[],
  label: Int32Array,
  heightM: Float64Array,
  searchHeightM: number,
  sliceM: number,
  file?: string,
): StemBase {
  const warnings: string[] = [];
  const byTall = (a: PieceStats, b: PieceStats): number => b.tallCount - a.tallCount || b.vertexCount - a.vertexCount;
  const grounded = pieces.filter((p) => p.minHeightM <= searchHeightM).sort(byTall);
  const all = [...pieces].sort(byTall);
  if (all.length === 0) {
    throw new XylemapError('no tree found: nothing is left after removing ground and outliers', {
      file,
      stage: 'clean',
      hint: 'check that the cloud contains a tree; lower clean.ground_height_m if the tree is very small',
    });
  }
  let chosen = grounded[0];
  const tallest = all[0];
  if (!chosen || (tallest.tallCount > 4 * Math.max(1, chosen.tallCount) && tallest.minHeightM > searchHeightM)) {
    chosen = tallest;
    warnings.push(
      `stem base not found near the ground: the lowest point of the tree is ${chosen.minHeightM.toFixed(2)} m above the ground surface (gap at the base?); the network starts there`,
    );
  }
  const extent = chosen.maxHeightM - chosen.minHeightM;
  if (!(extent >= 0.5) || chosen.vertexCount < 20) {
    throw new XylemapError(`no tree found: the tallest object rises only ${Math.max(0, extent).toFixed(2)} m (${chosen.vertexCount} voxels)`, {
      file,
      stage: 'clean',
      hint: 'the cloud looks like ground or low clutter only; check the file, or lower clean.ground_height_m for a very small plant',
    });
  }
  for (const p of grounded) {
    if (p === chosen) continue;
    if (p.maxHeightM > Math.max(2, 0.3 * chosen.maxHeightM) && p.tallCount > 0.2 * chosen.tallCount) {
      warnings.push(
        `a second tree-like object (${p.vertexCount} voxels, ${p.maxHeightM.toFixed(1)} m tall) was found and left out; only the tree with the largest crown is reconstructed`,
      );
      break;
    }
  }
  const seeds: number[] = [];
  for (let v = 0; v < label.length; v++) if (label[v] === chosen.label && heightM[v] <= chosen.minHeightM + sliceM) seeds.push(v);
  return { label: chosen.label, seeds: Int32Array.from(seeds), baseHeightM: chosen.minHeightM, warnings };
}
