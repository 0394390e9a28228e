import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { resolveConfig } from '../../core/pipeline/config.js';
import { CONFIG_DECLARATIONS } from '../../core/pipeline/declarations.js';

/** The built CLI (`npm run build`; CI builds it in `npm ci` through the prepare script). */
const CLI = join(process.cwd(), 'dist/cli/main.js');
const tmp = mkdtempSync(join(tmpdir(), 'xylemap-cli-'));

function xylemap(...args: string[]): { code: number; stdout: string; stderr: string } {
  if (!existsSync(CLI)) throw new Error(`${CLI} is missing: run \`npm run build\` first`);
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 30_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('xylemap config (cli/commands/config.ts)', () => {
  it('prints commented YAML that validates back to the defaults', () => {
    const r = xylemap('config', '--print-defaults');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^# /);
    expect(parse(r.stdout)).toEqual(resolveConfig(undefined, CONFIG_DECLARATIONS));
  });

  it('checks a good file with exit code 0 and a bad one with exit 1 and one line naming the key path', () => {
    const good = join(tmp, 'good.yaml');
    writeFileSync(good, 'scaling:\n  seed: 3\n');
    expect(xylemap('config', '--check', good).code).toBe(0);
    const bad = join(tmp, 'bad.yaml');
    writeFileSync(bad, 'scaling:\n  seed: -3\n');
    const r = xylemap('config', '--check', bad);
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(bad);
    expect(r.stderr).toContain('scaling.seed');
    expect(r.stderr).toContain('got -3');
  });

  it('exits 2 (usage) without a choice of action', () => {
    expect(xylemap('config').code).toBe(2);
  });

  it('prints the options reference as Markdown tables', () => {
    const r = xylemap('config', '--print-docs');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('| key | default | unit | valid values | meaning |');
  });
});

describe('xylemap run (cli/commands/run.ts)', () => {
  it('exits 1 with one line and writes nothing for a missing input', () => {
    const out = join(tmp, 'out-missing');
    const r = xylemap('run', join(tmp, 'nope.las'), '--out', out);
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain('nope.las');
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(out)).toBe(false);
  });

  it('rejects an unknown --preset before reading the cloud, naming hydraulics.preset', () => {
    const r = xylemap('run', join(tmp, 'nope.las'), '--out', join(tmp, 'o'), '--preset', 'baobab');
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('hydraulics.preset');
  });

  it('exits 2 (usage) when --out is missing', () => {
    expect(xylemap('run', 'x.las').code).toBe(2);
  });
});
