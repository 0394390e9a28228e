/**
 * Inventory upscaling: apply the fitted K = c·DBH^d to every inventoried stem (scanned or not) and
 * sum per plot, per unit ground area.
 *
 * Point estimate: a fit on logarithms predicts the median K at a DBH; with the bias correction the
 * prediction is multiplied by exp(s²/2) (s = residual sd of ln K), the lognormal mean, so that sums
 * over stems are unbiased (Baskerville 1972, Can. J. For. Res. 2:49; Sprugel 1983, Ecology 64:209).
 *
 * Interval: a case bootstrap — the scanned trees behind each fit are resampled with replacement,
 * the fit redone, and every plot total recomputed; the percentile interval of the totals is
 * reported. With `prediction` each stem also gets its own lognormal scatter exp(s_b·z) about the
 * replicate's fit (the plot's actual stems are not the fit's mean stems); with `fit` only the fit
 * varies, an interval for the expected total.
 */
import { formatCsv, parseCsv } from '../io/csv.js';
import { createRandom } from '../util/random.js';
import { XylemapError } from '../util/errors.js';
import { fitPowerLaw, predictConductance, type PowerLawFit } from './power-law.js';
import type { ConductanceFits } from './species.js';
import { cellNumber } from './stand.js';
import { percentileInterval } from './stats.js';

export const INVENTORY_COLUMNS = ['plot_id', 'plot_area_m2', 'species', 'dbh_m'] as const;

export interface InventoryStem {
  line: number;
  plotId: string;
  plotAreaM2: number;
  species: string;
  dbhM: number;
}

/**
 * Parse and check an inventory (one row per stem). Every problem in every row is reported in ONE
 * error: missing columns, empty ids, non-positive plot areas or ones that differ within a plot,
 * non-positive DBH, and DBH values above `maxPlausibleDbhM` (most likely centimetres).
 * @throws XylemapError listing every offending row
 */
export function parseInventory(text: string, file: string, maxPlausibleDbhM: number): InventoryStem[] {
  const { header, rows } = parseCsv(text.replace(/^\uFEFF/, ''));
  const missing = INVENTORY_COLUMNS.filter((c) => !header.includes(c));
  if (missing.length > 0) {
    throw new XylemapError(`inventory lacks column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}`, {
      file,
      stage: 'batch',
      hint: `the header must name ${INVENTORY_COLUMNS.join(', ')} (one row per stem, DBH in metres, area in m²)`,
    });
  }
  if (rows.length === 0) throw new XylemapError('inventory has no stems', { file, stage: 'batch', hint: 'add one row per stem' });
  const at = (r: string[], c: string): string => (r[header.indexOf(c)] ?? '').trim();
  const problems: string[] = [];
  const areaOf = new Map<string, { area: number; line: number }>();
  const stems: InventoryStem[] = [];
  let cmLike = 0;
  rows.forEach((r, i) => {
    const line = i + 2;
    const plotId = at(r, 'plot_id');
    const species = at(r, 'species');
    const areaText = at(r, 'plot_area_m2');
    const dbhText = at(r, 'dbh_m');
    const area = areaText === '' ? NaN : Number(areaText);
    const dbh = dbhText === '' ? NaN : Number(dbhText);
    if (plotId === '') problems.push(`line ${line}: plot_id is empty`);
    if (species === '') problems.push(`line ${line}: species is empty`);
    if (!(area > 0) || !Number.isFinite(area)) problems.push(`line ${line}: plot_area_m2 must be > 0 m², got "${areaText}"`);
    else if (plotId !== '') {
      const first = areaOf.get(plotId);
      if (!first) areaOf.set(plotId, { area, line });
      else if (first.area !== area) {
        problems.push(`line ${line}: plot ${plotId} has plot_area_m2 ${area} here but ${first.area} on line ${first.line}`);
      }
    }
    if (!(dbh > 0) || !Number.isFinite(dbh)) problems.push(`line ${line}: dbh_m must be > 0 m, got "${dbhText}"`);
    else if (dbh > maxPlausibleDbhM) {
      cmLike++;
      problems.push(`line ${line}: dbh_m ${dbhText} is implausible (> ${maxPlausibleDbhM} m)`);
    }
    stems.push({ line, plotId, plotAreaM2: area, species, dbhM: dbh });
  });
  if (problems.length > 0) {
    const unitHint = cmLike > 0 ? 'DBH looks like centimetres: divide by 100 (dbh_m is in metres); ' : '';
    throw new XylemapError(`inventory has ${problems.length} problem${problems.length > 1 ? 's' : ''}: ${problems.join('; ')}`, {
      file,
      stage: 'batch',
      hint: `${unitHint}fix these rows (no tree was processed)`,
    });
  }
  return stems;
}

export interface StemPrediction {
  line: number;
  plotId: string;
  species: string;
  dbhM: number;
  /** "species" (its own fit) or "pooled". */
  fit: 'species' | 'pooled';
  conductanceKgPerSPerMPa: number;
  /** DBH outside the range of the scanned trees behind the fit used (extrapolation). */
  outsideScannedRange: boolean;
}

export interface PlotEstimate {
  plotId: string;
  plotAreaM2: number;
  stemCount: number;
  stemsSpeciesFit: number;
  stemsPooledFit: number;
  stemsOutsideScannedRange: number;
  conductanceKgPerSPerMPa: number;
  conductancePerAreaKgPerSPerMPaPerM2: number;
  ci: [number, number];
}

export interface Upscaling {
  confidence: number;
  method: string;
  biasCorrection: boolean;
  interval: string;
  bootstrapReplicates: number;
  /** Replicates whose refit failed (e.g. all resampled DBH equal) and were left out. */
  bootstrapFailed: number;
  plots: PlotEstimate[];
  stems: StemPrediction[];
}

function chooseFit(species: string, fits: ConductanceFits): { key: string; kind: 'species' | 'pooled'; fit: PowerLawFit } {
  const own = fits.bySpecies.get(species);
  if (own) return { key: species, kind: 'species', fit: own };
  if (!fits.pooled) {
    throw new XylemapError('no conductance–DBH fit to upscale with: fewer than 3 scanned trees have both a DBH and a conductance', {
      stage: 'batch',
      option: 'inventory',
      hint: 'process more trees (or check their hydraulics results) before using --inventory',
    });
  }
  return { key: '', kind: 'pooled', fit: fits.pooled };
}

/**
 * Upscale an inventory with the fitted relations.
 * @param stems inventory stems (DBH m, plot area m²)
 * @param fits fits from `compareSpecies` (species-specific where fitted, else pooled)
 * @param o confidence, bootstrap replicates and seed
 */
export function upscaleInventory(
  stems: readonly InventoryStem[],
  fits: ConductanceFits,
  o: {
    confidence: number;
    bootstrap_replicates: number;
    seed: number;
    upscale_bias_correction: boolean;
    /** "prediction" or "fit". */
    upscale_interval: string;
  },
): Upscaling {
  const choice = stems.map((s) => chooseFit(s.species, fits));
  /** K of one stem: the fit's median, times the lognormal mean factor when corrected. */
  const predict = (f: PowerLawFit, dbhM: number): number => {
    const s = Number.isFinite(f.logResidualSd) ? f.logResidualSd : 0;
    return predictConductance(f, dbhM) * (o.upscale_bias_correction ? Math.exp((s * s) / 2) : 1);
  };
  const predictions: StemPrediction[] = stems.map((s, i) => {
    const c = choice[i];
    return {
      line: s.line,
      plotId: s.plotId,
      species: s.species,
      dbhM: s.dbhM,
      fit: c.kind,
      conductanceKgPerSPerMPa: predict(c.fit, s.dbhM),
      outsideScannedRange: s.dbhM < c.fit.dbhMinM || s.dbhM > c.fit.dbhMaxM,
    };
  });
  const plotIds: string[] = [];
  const plotIndex = new Map<string, number>();
  for (const s of stems) {
    if (!plotIndex.has(s.plotId)) {
      plotIndex.set(s.plotId, plotIds.length);
      plotIds.push(s.plotId);
    }
  }
  const stemPlot = stems.map((s) => plotIndex.get(s.plotId) as number);
  const point = new Float64Array(plotIds.length);
  predictions.forEach((p, i) => {
    point[stemPlot[i]] += p.conductanceKgPerSPerMPa;
  });

  // Case bootstrap of every fit that is used.
  const usedKeys = [...new Set(choice.map((c) => c.key))].sort();
  const rng = createRandom(o.seed);
  const reps: Float64Array[] = plotIds.map(() => new Float64Array(o.bootstrap_replicates).fill(NaN));
  let failed = 0;
  for (let b = 0; b < o.bootstrap_replicates; b++) {
    const refit = new Map<string, PowerLawFit>();
    let ok = true;
    for (const key of usedKeys) {
      const d = fits.data.get(key);
      if (!d) {
        ok = false;
        break;
      }
      const n = d.dbhM.length;
      const x: number[] = [];
      const y: number[] = [];
      for (let i = 0; i < n; i++) {
        const j = rng.int(n);
        x.push(d.dbhM[j]);
        y.push(d.conductance[j]);
      }
      const f = fitPowerLaw(x, y, o.confidence);
      if (!f) {
        ok = false;
        break;
      }
      refit.set(key, f);
    }
    if (!ok) {
      failed++;
      continue;
    }
    const t = new Float64Array(plotIds.length);
    for (let i = 0; i < stems.length; i++) {
      const f = refit.get(choice[i].key) as PowerLawFit;
      const sd = Number.isFinite(f.logResidualSd) ? f.logResidualSd : 0;
      // prediction: this stem's own deviation from the fit, lognormal about the median
      // (its mean is then the bias-corrected prediction); fit: the fit's mean stem.
      t[stemPlot[i]] +=
        o.upscale_interval === 'prediction' ? predictConductance(f, stems[i].dbhM) * Math.exp(sd * rng.normal()) : predict(f, stems[i].dbhM);
    }
    for (let p = 0; p < plotIds.length; p++) reps[p][b] = t[p];
  }
  const plots: PlotEstimate[] = plotIds.map((id, p) => {
    const mine = predictions.filter((s) => s.plotId === id);
    const area = stems[stemPlot.indexOf(p)].plotAreaM2;
    const ci = percentileInterval(reps[p], o.confidence);
    return {
      plotId: id,
      plotAreaM2: area,
      stemCount: mine.length,
      stemsSpeciesFit: mine.filter((s) => s.fit === 'species').length,
      stemsPooledFit: mine.filter((s) => s.fit === 'pooled').length,
      stemsOutsideScannedRange: mine.filter((s) => s.outsideScannedRange).length,
      conductanceKgPerSPerMPa: point[p],
      conductancePerAreaKgPerSPerMPaPerM2: point[p] / area,
      ci: [ci[0] / area, ci[1] / area],
    };
  });
  return {
    confidence: o.confidence,
    method:
      `sum over stems of K = c * DBH^d${o.upscale_bias_correction ? ' * exp(s^2/2)' : ''} (species fit if fitted, else pooled) divided by plot area; ` +
      `interval: percentile case bootstrap of the fits${o.upscale_interval === 'prediction' ? ' plus lognormal scatter of each stem about the fit (prediction)' : ' (fit uncertainty only)'}`,
    biasCorrection: o.upscale_bias_correction,
    interval: o.upscale_interval,
    bootstrapReplicates: o.bootstrap_replicates,
    bootstrapFailed: failed,
    plots,
    stems: predictions,
  };
}

/** plots.csv: one row per plot (conductance per ground area in kg s⁻¹ MPa⁻¹ m⁻²). */
export function formatPlotsCsv(u: Upscaling): string {
  const level = Math.round(u.confidence * 100);
  return formatCsv(
    [
      'plot_id',
      'plot_area_m2',
      'stem_count',
      'stems_species_fit',
      'stems_pooled_fit',
      'stems_outside_scanned_dbh',
      'conductance_kg_s_mpa',
      'conductance_per_ground_area_kg_s_mpa_m2',
      `ci${level}_low_kg_s_mpa_m2`,
      `ci${level}_high_kg_s_mpa_m2`,
    ],
    u.plots.map((p) => [
      p.plotId,
      cellNumber(p.plotAreaM2),
      String(p.stemCount),
      String(p.stemsSpeciesFit),
      String(p.stemsPooledFit),
      String(p.stemsOutsideScannedRange),
      cellNumber(p.conductanceKgPerSPerMPa),
      cellNumber(p.conductancePerAreaKgPerSPerMPaPerM2),
      cellNumber(p.ci[0]),
      cellNumber(p.ci[1]),
    ]),
  );
}

/** stems.csv: every inventoried stem with the fit used and whether it lies outside the scanned DBH range. */
export function formatStemsCsv(u: Upscaling): string {
  return formatCsv(
    ['line', 'plot_id', 'species', 'dbh_m', 'fit', 'conductance_kg_s_mpa', 'outside_scanned_dbh'],
    u.stems.map((s) => [
      String(s.line),
      s.plotId,
      s.species,
      cellNumber(s.dbhM),
      s.fit,
      cellNumber(s.conductanceKgPerSPerMPa),
      s.outsideScannedRange ? 'true' : 'false',
    ]),
  );
}
