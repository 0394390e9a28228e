/**
 * The batch manifest: one row per scanned tree, columns `tree_id, species, file` and optionally
 * `field_dbh_m, plot, preset, notes` (other columns are kept as they are). File paths are relative
 * to the manifest's folder unless absolute.
 */
import { isAbsolute, resolve } from 'node:path';
import { parseCsv } from '../io/csv.js';
import { XylemapError } from '../util/errors.js';

export const MANIFEST_REQUIRED = ['tree_id', 'species', 'file'] as const;
export const MANIFEST_OPTIONAL = ['field_dbh_m', 'plot', 'preset', 'notes'] as const;

export interface ManifestRow {
  /** 0-based position among the manifest's data rows (keeps stand tables in manifest order). */
  index: number;
  /** Line of the row in the file (header = line 1), for messages. */
  line: number;
  treeId: string;
  species: string;
  /** The file as written in the manifest. */
  file: string;
  /** The file resolved against the manifest folder. */
  path: string;
  /** Field-measured DBH, m; NaN when not given. */
  fieldDbhM: number;
  plot: string;
  /** Hydraulics species preset name; "" means the configuration's. */
  preset: string;
  notes: string;
}

export interface ManifestCheck {
  /** Does the file exist (injected so core does not touch the file system). */
  fileExists: (path: string) => boolean;
  /** Names of the hydraulics species presets that exist; undefined skips the check. */
  knownPresets?: readonly string[];
  /** DBH above this is a unit mistake, m. */
  maxPlausibleDbhM: number;
}

/** A tree id becomes a folder name, so it is limited to a portable set of characters. */
const TREE_ID = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

/**
 * Parse and check a manifest. Every problem in every row is collected and reported in ONE error
 * (problems separated by "; "), before any tree is processed.
 * @param text manifest CSV text
 * @param file manifest path (relative files resolve against its folder)
 * @throws XylemapError listing every offending row
 */
export function parseManifest(text: string, file: string, check: ManifestCheck): ManifestRow[] {
  const { header, rows } = parseCsv(text.replace(/^\uFEFF/, ''));
  const missing = MANIFEST_REQUIRED.filter((c) => !header.includes(c));
  if (missing.length > 0) {
    throw new XylemapError(`manifest lacks column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}`, {
      file,
      stage: 'batch',
      hint: `the header must name at least ${MANIFEST_REQUIRED.join(', ')} (optional: ${MANIFEST_OPTIONAL.join(', ')})`,
    });
  }
  if (rows.length === 0) {
    throw new XylemapError('manifest has no trees', { file, stage: 'batch', hint: 'add one row per tree below the header' });
  }
  const col = (name: string): number => header.indexOf(name);
  const get = (r: string[], name: string): string => (col(name) >= 0 ? (r[col(name)] ?? '').trim() : '');
  const dir = resolve(file, '..');
  const problems: string[] = [];
  const firstLine = new Map<string, number>();
  const out: ManifestRow[] = [];
  rows.forEach((r, index) => {
    const line = index + 2;
    if (r.length !== header.length) problems.push(`line ${line}: ${r.length} fields where the header has ${header.length}`);
    const treeId = get(r, 'tree_id');
    const species = get(r, 'species');
    const fileField = get(r, 'file');
    if (treeId === '') problems.push(`line ${line}: tree_id is empty`);
    else if (!TREE_ID.test(treeId)) problems.push(`line ${line}: tree_id "${treeId}" may only use letters, digits, ".", "_", "-"`);
    else if (firstLine.has(treeId)) problems.push(`line ${line}: duplicate tree_id "${treeId}" (first on line ${firstLine.get(treeId)})`);
    else firstLine.set(treeId, line);
    if (species === '') problems.push(`line ${line}: species is empty`);
    const path = fileField === '' ? '' : isAbsolute(fileField) ? fileField : resolve(dir, fileField);
    if (fileField === '') problems.push(`line ${line}: file is empty`);
    else if (!check.fileExists(path)) problems.push(`line ${line}: file not found: ${fileField}`);
    const dbhText = get(r, 'field_dbh_m');
    const fieldDbhM = dbhText === '' ? NaN : Number(dbhText);
    if (dbhText !== '') {
      if (!(fieldDbhM > 0)) problems.push(`line ${line}: field_dbh_m must be > 0 m, got "${dbhText}"`);
      else if (fieldDbhM > check.maxPlausibleDbhM) {
        problems.push(`line ${line}: field_dbh_m ${dbhText} m is implausible (> ${check.maxPlausibleDbhM} m) — centimetres?`);
      }
    }
    const preset = get(r, 'preset');
    if (preset !== '' && check.knownPresets && !check.knownPresets.includes(preset)) {
      problems.push(`line ${line}: unknown preset "${preset}" (known: ${check.knownPresets.join(', ')})`);
    }
    out.push({
      index,
      line,
      treeId,
      species,
      file: fileField,
      path,
      fieldDbhM,
      plot: get(r, 'plot'),
      preset,
      notes: get(r, 'notes'),
    });
  });
  if (problems.length > 0) {
    throw new XylemapError(`manifest has ${problems.length} problem${problems.length > 1 ? 's' : ''}: ${problems.join('; ')}`, {
      file,
      stage: 'batch',
      hint: 'fix these rows (no tree was processed)',
    });
  }
  return out;
}
