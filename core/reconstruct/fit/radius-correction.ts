import { segmentLength, type Segment } from '../../types/network.js';
import type { SegmentTree } from '../../topology/node-tree.js';
import { fitRobustLine, type RobustLine } from './robust-line.js';

/**
 * Documented correction of segment radii. Raw fits are never hidden: every output segment carries
 * `radiusFitM` (the fit as measured) and `radiusCorrection` (which rule set `radiusM`).
 *
 * The rules, in order:
 *
 * 1. **Noise bias** (`noise_bias`). A surface point displaced by noise ε = (ε_r, ε_t) (radial,
 *    tangential) lies at distance √((r + ε_r)² + ε_t²) ≈ r + ε_r + ε_t²/(2r) from the axis
 *    (second-order Taylor expansion), so a least-squares radius is too large by about σ_t²/(2r).
 *    Range noise is tangential where the beam grazes the branch edge, so σ_t is taken as the
 *    range noise σ (an upper-end assumption). Mixed pixels at the silhouette add a further
 *    outward offset `edgeInflationM` (0 by default; calibrate it on virtual scans). The
 *    correction is capped at half the raw radius because the expansion needs σ ≪ r.
 *    Measured (bench/fit.ts: one virtual scan, 4 positions at 6 m, σ = 2 mm, true axes and
 *    points): median raw radius errors +8.6 % / +3.3 % / +0.8 % for radii 2–5 mm / 5–10 mm /
 *    1–2.5 cm, almost all from mixed pixels (wood-only fits: +1.5 % / −0.5 % / 0.0 %); after
 *    this rule −0.8 % / −0.6 % / −0.1 %. That σ²/(2r) matches the mixed-pixel inflation there
 *    is an empirical agreement at that range and beam, not a general law.
 *
 * 2. **Taper outliers** (`taper_outlier` reliability reason). A reliable segment more than
 *    `taperOutlierRatio` × its reliable parent's radius, beyond 2 combined standard errors, is
 *    inconsistent with a branch that tapers outwards; so is a segment whose log radius is more
 *    than 3 robust σ (and more than 25 %) off its branch's taper line.
 *
 * 3. **Taper model** (`taper_model`). Per branch, log r is fitted as a straight line in the
 *    distance from the branch base (a geometric taper), with Tukey weights and the slope held
 *    ≤ 0, on the branch's reliable segments (at least `minTaperSegments`). Unreliable segments
 *    of that branch, and thin segments (< `thinRadiusM`) whose fit exceeds the line by more than
 *    2 robust σ (inflation), take the line's value at their midpoint.
 *
 * 4. **Apex allometry** (`apex_allometry`), for branches with too few reliable segments:
 *    log r = c + b · log(distance from apex), fitted once on all reliable segments of the tree
 *    (b ≥ 0), its intercept shifted by the branch's own median residual when the branch has any
 *    reliable segment. This uses the tree's own measurements rather than an assumed branching
 *    exponent, so the exponent statistics are not pulled towards a chosen law.
 *
 * 5. **Parent cap** (`parent_cap`). A modelled radius never exceeds the parent's final radius.
 *
 * Modelled radii get a standard error from the model's robust spread: r · (e^spread − 1).
 * A correction code set upstream (e.g. the caller's fallback radius) is kept when none of these
 * rules sets one.
 * Correction does not make a segment reliable: `reliable`/`reliabilityReason` keep the flag.
 */
export interface RadiusCorrectionOptions {
  /** 'taper' applies rules 1–5; 'none' only records radiusFitM and flags taper outliers. */
  mode?: 'taper' | 'none';
  /** Scanner range noise (1σ), m. */
  rangeNoiseM?: number;
  /** Outward mixed-pixel offset subtracted from every fit, m. */
  edgeInflationM?: number;
  /** Reliable segments thinner than this are checked against the taper model, m. */
  thinRadiusM?: number;
  taperOutlierRatio?: number;
  minTaperSegments?: number;
}

export type RadiusCorrectionCode = '' | 'noise_bias' | 'taper_model' | 'apex_allometry' | 'parent_cap';

/** Codes this module sets; any other incoming code (e.g. from the caller's fallback) is kept. */
const OWN_CODES = new Set<string>(['noise_bias', 'taper_model', 'apex_allometry', 'parent_cap']);

export interface RadiusCorrectionSummary {
  /** Number of segments per correction code ('' = unchanged; codes set upstream are counted too). */
  byCode: Record<string, number>;
  taperOutliers: number;
  branchesWithTaperModel: number;
  /** Tree-wide apex allometry r = coefM · (apex distance in m)^exponent, null if not fitted. */
  apexAllometry: { coefM: number; exponent: number; spreadLog: number; segments: number } | null;
  /** Σ π r² L before and after correction, m³. */
  volumeFitM3: number;
  volumeCorrectedM3: number;
}

export interface RadiusCorrectionResult {
  segments: Segment[];
  summary: RadiusCorrectionSummary;
}

const DEFAULTS: Required<RadiusCorrectionOptions> = {
  mode: 'taper',
  rangeNoiseM: 0,
  edgeInflationM: 0,
  thinRadiusM: 0.01,
  taperOutlierRatio: 1.15,
  minTaperSegments: 3,
};

/** Log-residual beyond which a segment is off its branch's taper line (25 %, common practice, no source). */
const TAPER_RESIDUAL_MIN = Math.log(1.25);

/**
 * Correct the radii of a network's segments (see the module comment for the rules).
 *
 * @param segments  the network's segments, in the order `tree` was built from
 * @param tree      `SegmentTree.fromNetwork(segments)`
 * @param options   see `RadiusCorrectionOptions` (lengths in m)
 * @returns new segment objects (inputs are not modified) and counts per rule
 */
export function correctRadii(
  segments: Segment[],
  tree: SegmentTree,
  options: RadiusCorrectionOptions = {},
): RadiusCorrectionResult {
  const o = { ...DEFAULTS, ...stripUndefined(options) };
  const n = segments.length;
  if (tree.size !== n) {
    throw new RangeError(`correctRadii: tree has ${tree.size} segments but ${n} were given`);
  }
  const parent = tree.parent;
  const raw = new Float64Array(n);
  const len = new Float64Array(n);
  const se = new Float64Array(n);
  const work = new Float64Array(n);
  const usable = new Uint8Array(n);
  const outlier = new Uint8Array(n);
  const code: RadiusCorrectionCode[] = new Array(n).fill('');
  const sigma = o.rangeNoiseM > 0 ? o.rangeNoiseM : 0;

  // Rule 1: noise bias.
  for (let i = 0; i < n; i++) {
    const s = segments[i];
    // The raw fit: radiusFitM when recorded (0 = no usable fit), else the radius as given.
    const r = s.radiusFitM !== undefined ? (s.radiusFitM > 0 ? s.radiusFitM : NaN) : s.radiusM;
    raw[i] = r;
    const l = s.lengthM > 0 ? s.lengthM : segmentLength(s);
    len[i] = Number.isFinite(l) && l > 0 ? l : 0;
    se[i] = Number.isFinite(s.radiusSeM) && s.radiusSeM >= 0 ? s.radiusSeM : Infinity;
    if (!(r > 0) || !Number.isFinite(r)) {
      work[i] = NaN;
      continue;
    }
    let rc = r;
    if (o.mode === 'taper') {
      const bias = (sigma * sigma) / (2 * r) + o.edgeInflationM;
      rc = Math.max(r - bias, 0.5 * r);
      if (rc !== r) code[i] = 'noise_bias';
    }
    work[i] = rc;
    usable[i] = s.reliable ? 1 : 0;
  }

  const branchOf = branchIds(segments, tree, len);

  // Positions along the branch (midpoint) and distance from the apex (longest path to a tip).
  const sBase = new Float64Array(n);
  tree.eachBefore((i) => {
    const p = parent[i];
    sBase[i] = p >= 0 && branchOf[p] === branchOf[i] ? sBase[p] + len[p] : 0;
  });
  const below = new Float64Array(n);
  tree.eachAfter((i) => {
    let m = 0;
    for (const c of tree.children[i]) if (below[c] > m) m = below[c];
    below[i] = len[i] + m;
  });
  const sMid = new Float64Array(n);
  const apexMid = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    sMid[i] = sBase[i] + len[i] / 2;
    apexMid[i] = below[i] - len[i] / 2;
  }

  // Rule 2a: thicker than the reliable parent beyond noise.
  for (let i = 0; i < n; i++) {
    const p = parent[i];
    if (p < 0 || !usable[i] || !usable[p]) continue;
    const tol = 2 * Math.hypot(se[i], se[p]);
    if (work[i] - o.taperOutlierRatio * work[p] > (Number.isFinite(tol) ? tol : 0)) outlier[i] = 1;
  }
  for (let i = 0; i < n; i++) if (outlier[i]) usable[i] = 0;

  // Group segments by branch (in preorder, so along the branch from its base).
  const branches = new Map<number, number[]>();
  tree.eachBefore((i) => {
    const b = branchOf[i];
    let list = branches.get(b);
    if (!list) branches.set(b, (list = []));
    list.push(i);
  });

  // Rule 2b + 3: per-branch taper lines, dropping points far off the line.
  const branchLine = new Map<number, RobustLine>();
  for (const [b, list] of branches) {
    let line = fitBranchLine(list, usable, sMid, work, len);
    if (!line || line.count < o.minTaperSegments) continue;
    let dropped = false;
    for (const i of list) {
      if (!usable[i]) continue;
      const res = Math.log(work[i]) - (line.intercept + line.slope * sMid[i]);
      if (Math.abs(res) > Math.max(3 * line.spread, TAPER_RESIDUAL_MIN)) {
        outlier[i] = 1;
        usable[i] = 0;
        dropped = true;
      }
    }
    if (dropped) line = fitBranchLine(list, usable, sMid, work, len);
    if (line && line.count >= o.minTaperSegments) branchLine.set(b, line);
  }

  // Rule 4: tree-wide apex allometry.
  const ax: number[] = [];
  const ay: number[] = [];
  const aw: number[] = [];
  for (let i = 0; i < n; i++) {
    if (!usable[i] || !(apexMid[i] > 0)) continue;
    ax.push(Math.log(apexMid[i]));
    ay.push(Math.log(work[i]));
    aw.push(len[i] > 0 ? len[i] : 1e-6);
  }
  const apex = ax.length >= 5 ? fitRobustLine(ax, ay, aw, 1) : null;

  // Rules 3–5 applied parents first, so caps see final parent radii.
  const final = new Float64Array(n);
  const finalSe = new Float64Array(n);
  const apexShift = new Map<number, number>();
  if (apex) {
    for (const [b, list] of branches) {
      if (branchLine.has(b)) continue;
      const res: number[] = [];
      for (const i of list) {
        if (usable[i] && apexMid[i] > 0) res.push(Math.log(work[i]) - (apex.intercept + apex.slope * Math.log(apexMid[i])));
      }
      if (res.length > 0) apexShift.set(b, median(res));
    }
  }
  tree.eachBefore((i) => {
    const s = segments[i];
    const r = work[i];
    final[i] = r;
    finalSe[i] = se[i];
    if (o.mode !== 'taper') {
      final[i] = raw[i];
      return;
    }
    const bid = branchOf[i];
    const line = branchLine.get(bid);
    let pred = NaN;
    let spread = 0;
    let predCode: RadiusCorrectionCode = '';
    if (line) {
      pred = Math.exp(line.intercept + line.slope * sMid[i]);
      spread = line.spread;
      predCode = 'taper_model';
    } else if (apex && apexMid[i] > 0) {
      pred = Math.exp(apex.intercept + apex.slope * Math.log(apexMid[i]) + (apexShift.get(bid) ?? 0));
      spread = apex.spread;
      predCode = 'apex_allometry';
    }
    if (!Number.isFinite(pred) || !(pred > 0)) {
      if (!Number.isFinite(r)) final[i] = raw[i];
      return;
    }
    const unreliable = !s.reliable || outlier[i] === 1 || !Number.isFinite(r);
    const inflatedThin = r < o.thinRadiusM && r > pred * Math.exp(2 * spread);
    if (!unreliable && !inflatedThin) return;
    let v = pred;
    let c: RadiusCorrectionCode = predCode;
    const p = parent[i];
    if (p >= 0 && final[p] > 0 && v > final[p]) {
      v = final[p];
      c = 'parent_cap';
    }
    final[i] = v;
    finalSe[i] = v * (Math.exp(spread) - 1);
    code[i] = c;
  });

  const byCode: Record<string, number> = { '': 0, noise_bias: 0, taper_model: 0, apex_allometry: 0, parent_cap: 0 };
  let volFit = 0;
  let volCor = 0;
  let taperOutliers = 0;
  const out: Segment[] = segments.map((s, i) => {
    const radius = Number.isFinite(final[i]) && final[i] > 0 ? final[i] : Number.isFinite(raw[i]) && raw[i] > 0 ? raw[i] : 0;
    const upstream = s.radiusCorrection && !OWN_CODES.has(s.radiusCorrection) ? s.radiusCorrection : '';
    const c = (o.mode === 'taper' ? code[i] : '') || upstream;
    byCode[c] = (byCode[c] ?? 0) + 1;
    if (outlier[i]) taperOutliers++;
    // A missing or non-finite raw fit is recorded as 0 ("no usable fit"), never NaN.
    const rawOut = Number.isFinite(raw[i]) && raw[i] > 0 ? raw[i] : 0;
    volFit += Math.PI * rawOut * rawOut * len[i];
    volCor += Math.PI * radius * radius * len[i];
    const becameOutlier = outlier[i] === 1 && s.reliable;
    return {
      ...s,
      radiusM: radius,
      radiusSeM: Number.isFinite(finalSe[i]) ? finalSe[i] : s.radiusSeM,
      radiusFitM: rawOut,
      radiusCorrection: c,
      reliable: s.reliable && !outlier[i],
      reliabilityReason: becameOutlier ? 'taper_outlier' : s.reliabilityReason,
    };
  });
  return {
    segments: out,
    summary: {
      byCode,
      taperOutliers,
      branchesWithTaperModel: branchLine.size,
      apexAllometry: apex
        ? { coefM: Math.exp(apex.intercept), exponent: apex.slope, spreadLog: apex.spread, segments: apex.count }
        : null,
      volumeFitM3: volFit,
      volumeCorrectedM3: volCor,
    },
  };
}

/**
 * Branch of every segment: the segments' own `branchId` when they carry more than one value;
 * otherwise (ids not assigned yet) branches are derived here by following, at each furcation,
 * the child with the longest path to a tip below it as the main continuation.
 */
function branchIds(segments: Segment[], tree: SegmentTree, len: Float64Array): Int32Array {
  const n = segments.length;
  const out = new Int32Array(n);
  let varied = false;
  for (let i = 0; i < n; i++) {
    out[i] = segments[i].branchId;
    if (out[i] !== out[0]) varied = true;
  }
  let furcates = false;
  for (let i = 0; i < n && !furcates; i++) furcates = tree.children[i].length > 1;
  if (varied || !furcates) return out;
  const below = new Float64Array(n);
  tree.eachAfter((i) => {
    let m = 0;
    for (const c of tree.children[i]) if (below[c] > m) m = below[c];
    below[i] = len[i] + m;
  });
  let next = 0;
  out[tree.root] = next++;
  tree.eachBefore((i) => {
    const kids = tree.children[i];
    let main = -1;
    for (const c of kids) if (main < 0 || below[c] > below[main]) main = c;
    for (const c of kids) out[c] = c === main ? out[i] : next++;
  });
  return out;
}

function fitBranchLine(
  list: number[],
  usable: Uint8Array,
  sMid: Float64Array,
  work: Float64Array,
  len: Float64Array,
): RobustLine | null {
  const xs: number[] = [];
  const ys: number[] = [];
  const ws: number[] = [];
  for (const i of list) {
    if (!usable[i]) continue;
    xs.push(sMid[i]);
    ys.push(Math.log(work[i]));
    ws.push(len[i] > 0 ? len[i] : 1e-6);
  }
  return xs.length > 0 ? fitRobustLine(xs, ys, ws, -1) : null;
}

function median(a: number[]): number {
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}
