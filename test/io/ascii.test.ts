/**
 * ASCII point files. There is no formal standard for XYZ text; the CSV cases follow RFC 4180's
 * comma-separated records with an optional header line, the rest is common practice, no source
 * (tab/space/semicolon delimiters, "#" and "//" comments, "//X,Y,Z" header lines).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { detectDelimiter, parseColumnMapping, splitFields } from '../../core/io/ascii.js';
import { readCloud } from '../../core/io/read-cloud.js';
import { XylemapError } from '../../core/util/errors.js';
import { tempDir } from './shared-data.js';

function file(name: string, text: string): string {
  const path = join(tempDir(), name);
  writeFileSync(path, text);
  return path;
}

async function errorOf(p: Promise<unknown>): Promise<XylemapError> {
  const e = await p.catch((x: unknown) => x);
  expect(e).toBeInstanceOf(XylemapError);
  return e as XylemapError;
}

describe('detectDelimiter', () => {
  it('picks tab, then comma, then semicolon, else whitespace', () => {
    expect(detectDelimiter('1\t2\t3')).toBe('\t');
    expect(detectDelimiter('1,2,3')).toBe(',');
    expect(detectDelimiter('1;2;3')).toBe(';');
    expect(detectDelimiter('1  2 3')).toBe('whitespace');
  });
});

describe('splitFields', () => {
  it('splits runs of spaces as one delimiter and trims around commas', () => {
    expect(splitFields('  1   2 3 ', 'whitespace')).toEqual(['1', '2', '3']);
    expect(splitFields('1, 2 ,3', ',')).toEqual(['1', '2', '3']);
  });
});

describe('parseColumnMapping', () => {
  it('keeps names in order and requires x, y and z', () => {
    expect(parseColumnMapping('x,y,z,intensity', 'f')).toEqual(['x', 'y', 'z', 'intensity']);
    expect(() => parseColumnMapping('x,y,intensity', 'f')).toThrow(/no "z" column/);
  });
});

describe('readCloud', () => {
  it('reads a CSV with a header row, extra columns going to extra', async () => {
    // RFC 4180 §2: optional header line with the same number of fields as the records
    const c = await readCloud(file('a.csv', 'X,Y,Z,Intensity\n1.5,2.5,3.5,100\n-1,-2,-3,7\n'));
    expect(c.count).toBe(2);
    expect([...c.x, ...c.y, ...c.z]).toEqual([1.5, -1, 2.5, -2, 3.5, -3]);
    expect([...c.extra.Intensity]).toEqual([100, 7]);
  });

  it('reads space-separated XYZ without a header, skipping # and // comments and blank lines', async () => {
    const c = await readCloud(file('a.xyz', '# scanner export\n// second comment\n\n1 2 3\n  4   5   6  \r\n7 8 9'));
    expect([...c.x]).toEqual([1, 4, 7]);
    expect([...c.z]).toEqual([3, 6, 9]);
  });

  it('takes a "//X,Y,Z,R" first comment line as the header', async () => {
    const c = await readCloud(file('cc.txt', '//X,Y,Z,R\n1,2,3,200\n'));
    expect([...c.extra.R]).toEqual([200]);
  });

  it('applies a --columns mapping that reorders and skips columns', async () => {
    const c = await readCloud(file('m.txt', '10;1;2;3;0.5\n11;4;5;6;0.25\n'), { columns: 'id,y,x,z,-' });
    expect([...c.x]).toEqual([2, 5]);
    expect([...c.y]).toEqual([1, 4]);
    expect([...c.extra.id]).toEqual([10, 11]);
    expect(Object.keys(c.extra)).toEqual(['id']);
  });

  it('names columns past the third column_4, column_5 … when there is no header', async () => {
    const c = await readCloud(file('n.txt', '1 2 3 4 5\n'));
    expect(Object.keys(c.extra)).toEqual(['column_4', 'column_5']);
  });

  it('refuses NaN with the line number', async () => {
    const e = await errorOf(readCloud(file('nan.txt', 'x y z\n1 2 3\n4 NaN 6\n')));
    expect(e.oneLine()).toMatch(/line 3, column 2: "NaN" is not a finite number/);
  });

  it('refuses Inf with the line number', async () => {
    const e = await errorOf(readCloud(file('inf.txt', '1 2 3\n4 5 Infinity\n')));
    expect(e.message).toMatch(/line 2, column 3/);
  });

  it('refuses a line with too few fields', async () => {
    const e = await errorOf(readCloud(file('short.txt', '1 2 3\n4 5\n')));
    expect(e.message).toMatch(/line 2 has 2 fields, 3 expected/);
  });

  it('refuses a header without x, y, z and says how to map columns', async () => {
    const e = await errorOf(readCloud(file('h.csv', 'a,b,c\n1,2,3\n')));
    expect(e.oneLine()).toMatch(/--columns/);
  });

  it('refuses a text file without any point', async () => {
    const e = await errorOf(readCloud(file('none.txt', '# only a comment\n')));
    expect(e.message).toMatch(/no points/);
  });
});
