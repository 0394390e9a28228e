import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Command } from 'commander';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { register } from '../../cli/commands/hydraulics.js';
import { formatSegmentsCsv, parseSegmentsCsv } from '../../core/io/segments-csv.js';
import { HYDRAULICS_COLUMNS } from '../../core/hydraulics/analyse.js';
import { binaryTree } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'xylemap-hydraulics-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const net = binaryTree({ levels: 5, baseRadiusM: 0.04, baseLengthM: 1.5, radiusRatio: 2 ** -0.5, lengthRatio: 0.8 });

/** Run `xylemap hydraulics …` in-process; returns what it printed to stdout. */
async function run(args: string[]): Promise<string> {
  const program = new Command().exitOverride();
  register(program);
  let out = '';
  const spy = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => {
    out += String(chunk);
    return true;
  });
  try {
    await program.parseAsync(['node', 'xylemap', 'hydraulics', ...args]);
  } finally {
    spy.mockRestore();
  }
  return out;
}

describe('register', () => {
  it('adds the hydraulics columns to segments.csv and merges its block into an existing summary.json', async () => {
    const input = join(dir, 'segments.csv');
    writeFileSync(input, formatSegmentsCsv(net));
    writeFileSync(join(dir, 'summary.json'), JSON.stringify({ schema: 'xylemap.summary/1', tree: { height_m: 5 }, warnings: ['reconstruct: kept'] }));
    const printed = await run([input, '--json']);
    const json = JSON.parse(printed);
    expect(json.hydraulics.tree_conductance_kg_s_mpa).toBeGreaterThan(0);
    const back = parseSegmentsCsv(readFileSync(input, 'utf8'));
    for (const col of HYDRAULICS_COLUMNS) expect(typeof back.segments[0].extra?.[col]).toBe('number');
    const summary = JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8'));
    expect(summary.tree).toEqual({ height_m: 5 });
    expect(summary.warnings).toContain('reconstruct: kept');
    expect(summary.hydraulics.preset).toBe('diffuse-porous');
  });

  it('takes options from the hydraulics mapping of --config, and flags over the file', async () => {
    const input = join(dir, 'segments.csv');
    const config = join(dir, 'config.yaml');
    writeFileSync(config, 'hydraulics:\n  gravity: false\n  temperature_c: 10\n');
    const a = JSON.parse(await run([input, '--config', config, '--json', '--out', join(dir, 'a')]));
    expect(a.hydraulics.gravity_gradient_mpa_per_m).toBe(0);
    expect(a.hydraulics.temperature_c).toBe(10);
    const b = JSON.parse(await run([input, '--config', config, '--temperature-c', '30', '--json', '--out', join(dir, 'b')]));
    expect(b.hydraulics.temperature_c).toBe(30);
  });

  it('prints the caution in its text output, given the folder instead of the file', async () => {
    const text = await run([dir, '--out', join(dir, 'c')]);
    expect(existsSync(join(dir, 'c', 'segments.csv'))).toBe(true);
    expect(text).toMatch(/not measurements, and not a tree-safety assessment/);
  });

  it('names the configuration file when it holds an unknown hydraulics key', async () => {
    const config = join(dir, 'bad.yaml');
    writeFileSync(config, 'hydraulics:\n  temprature_c: 10\n');
    await expect(run([join(dir, 'segments.csv'), '--config', config])).rejects.toMatchObject({ file: config, option: 'hydraulics.temprature_c' });
  });

  it('fails with the file named and writes nothing when the segments table is missing', async () => {
    const missing = join(dir, 'none', 'segments.csv');
    await expect(run([missing])).rejects.toMatchObject({ file: missing });
    expect(existsSync(join(dir, 'none'))).toBe(false);
  });
});
