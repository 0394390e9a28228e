import type { PointCloud } from '../types/point-cloud.js';
import { XylemapError } from '../util/errors.js';
import { countNewlines, readLines } from './line-reader.js';

/**
 * ASCII point files (XYZ / CSV / TXT): one point per line.
 * - Comments: lines starting with "#" or "//" are skipped; a first comment line made only of names
 *   (e.g. "//X,Y,Z,R,G,B") is taken as the header.
 * - Delimiter: tab, comma or semicolon if the first line has one, else runs of spaces.
 * - Header: the first line is a header when any of its fields is not a number.
 * - Columns: `columns` ("x,y,z,intensity"; "-" skips a column) wins over the header; without
 *   either, columns 1–3 are x, y, z and the rest are `column_4`, `column_5`, …
 * Non-xyz columns go to `cloud.extra` as Float64.
 */
export type Delimiter = '\t' | ',' | ';' | 'whitespace';

export function detectDelimiter(line: string): Delimiter {
  if (line.includes('\t')) return '\t';
  if (line.includes(',')) return ',';
  if (line.includes(';')) return ';';
  return 'whitespace';
}

export function splitFields(line: string, d: Delimiter): string[] {
  if (d === 'whitespace') return line.trim().split(/\s+/);
  return line.split(d).map((s) => s.trim());
}

function isComment(line: string): boolean {
  const t = line.trimStart();
  return t.startsWith('#') || t.startsWith('//');
}

function isNumberToken(s: string): boolean {
  return s !== '' && !Number.isNaN(Number(s));
}

/** Parse the `--columns` mapping: names in file order, "-" (or "skip") to ignore a column. */
export function parseColumnMapping(spec: string, file: string): string[] {
  const names = spec.split(',').map((s) => s.trim());
  const lower = names.map((n) => n.toLowerCase());
  for (const axis of ['x', 'y', 'z']) {
    if (!lower.includes(axis)) {
      throw new XylemapError(`column mapping "${spec}" has no "${axis}" column`, {
        file,
        option: 'columns',
        hint: 'name the columns in file order, e.g. --columns x,y,z,intensity (use - to skip one)',
      });
    }
  }
  const seen = new Set<string>();
  for (const n of lower) {
    if (n === '' ) throw new XylemapError(`column mapping "${spec}" has an empty name`, { file, option: 'columns', hint: 'use - to skip a column' });
    if (n !== '-' && n !== 'skip' && seen.has(n)) throw new XylemapError(`column "${n}" appears twice in the mapping "${spec}"`, { file, option: 'columns' });
    seen.add(n);
  }
  return names;
}

/**
 * Read an ASCII point file from an open descriptor in two streaming passes (count, then parse).
 * @throws XylemapError with the line number for a non-numeric, NaN or infinite value or a short line.
 */
export function readAsciiFd(fd: number, file: string, columns?: string): PointCloud {
  const upper = countNewlines(fd) + 1;
  let names: string[] | undefined = columns ? parseColumnMapping(columns, file) : undefined;
  let delimiter: Delimiter | undefined;
  let lineNo = 0;
  let count = 0;
  let ix = -1;
  let iy = -1;
  let iz = -1;
  let extraIdx: number[] = [];
  let extraArrays: Float64Array[] = [];
  let width = 0;
  const x = new Float64Array(upper);
  const y = new Float64Array(upper);
  const z = new Float64Array(upper);
  let headerNames: string[] = [];

  const setup = (fieldCount: number) => {
    const list = names ?? headerNames;
    const resolved = list.length > 0 ? list : Array.from({ length: fieldCount }, (_, k) => (k < 3 ? 'xyz'[k] : `column_${k + 1}`));
    const lower = resolved.map((n) => n.toLowerCase());
    ix = lower.indexOf('x');
    iy = lower.indexOf('y');
    iz = lower.indexOf('z');
    if (ix < 0 || iy < 0 || iz < 0) {
      throw new XylemapError(`cannot find x, y and z columns (header: ${resolved.join(', ')})`, {
        file,
        option: 'columns',
        hint: 'name the columns with --columns, e.g. --columns x,y,z,intensity',
      });
    }
    width = resolved.length;
    extraIdx = [];
    const extraNames: string[] = [];
    resolved.forEach((n, k) => {
      const l = lower[k];
      if (k === ix || k === iy || k === iz || l === '-' || l === 'skip' || n === '') return;
      extraIdx.push(k);
      extraNames.push(n);
    });
    extraArrays = extraNames.map(() => new Float64Array(upper));
    return extraNames;
  };
  let extraNames: string[] | undefined;

  for (const line of readLines(fd)) {
    lineNo++;
    if (line.trim() === '') continue;
    if (isComment(line)) {
      // "//X,Y,Z" style header written as a comment on the first line.
      if (lineNo === 1 && !names) {
        const body = line.trimStart().replace(/^(#|\/\/)\s*/, '');
        const d = detectDelimiter(body);
        const f = splitFields(body, d);
        if (f.length >= 3 && f.every((s) => s !== '' && !isNumberToken(s)) && f.some((s) => s.toLowerCase() === 'x')) headerNames = f;
      }
      continue;
    }
    if (delimiter === undefined) {
      delimiter = detectDelimiter(line);
      const fields = splitFields(line, delimiter);
      if (fields.some((s) => !isNumberToken(s))) {
        if (!names) headerNames = fields.map((s) => s.replace(/^["']|["']$/g, ''));
        extraNames = setup(fields.length);
        continue;
      }
      extraNames = setup(fields.length);
    }
    const fields = splitFields(line, delimiter);
    if (fields.length < width) {
      throw new XylemapError(`line ${lineNo} has ${fields.length} fields, ${width} expected`, {
        file,
        hint: 'every data line needs the same columns as the first one; fix or remove that line',
      });
    }
    x[count] = field(fields[ix], lineNo, ix, file);
    y[count] = field(fields[iy], lineNo, iy, file);
    z[count] = field(fields[iz], lineNo, iz, file);
    for (let k = 0; k < extraIdx.length; k++) extraArrays[k][count] = field(fields[extraIdx[k]], lineNo, extraIdx[k], file);
    count++;
  }
  const trim = (a: Float64Array) => (count === a.length ? a : a.slice(0, count));
  const cloud: PointCloud = {
    count,
    x: trim(x),
    y: trim(y),
    z: trim(z),
    attributes: {},
    extra: {},
    source: { format: 'ascii', path: file },
  };
  (extraNames ?? []).forEach((n, k) => (cloud.extra[n] = trim(extraArrays[k])));
  return cloud;
}

function field(s: string, lineNo: number, column: number, file: string): number {
  const v = Number(s);
  if (!Number.isFinite(v) || s === '') {
    throw new XylemapError(`line ${lineNo}, column ${column + 1}: "${s}" is not a finite number`, {
      file,
      hint: 'remove or fix the line (NaN, Inf and text are not allowed in coordinates or values)',
    });
  }
  return v;
}
