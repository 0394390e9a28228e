import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';
import type { PointCloud } from '../../core/types/point-cloud.js';

/** Third-party reference data, read in place at ../shared/data relative to the repo root (never copied). */
export const SHARED = join(process.cwd(), '..', 'shared', 'data');
export const REF = join(SHARED, 'las-reference');
export const ref = (name: string) => join(REF, name);

const root = mkdtempSync(join(tmpdir(), 'xylemap-io-test-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** A fresh temporary folder for files a test writes; all are removed after the test file. */
export function tempDir(): string {
  return mkdtempSync(join(root, 'case-'));
}

/** Names of arrays that differ between two clouds (coordinates, attributes, extra, raw extra bytes). */
export function differingArrays(a: PointCloud, b: PointCloud): string[] {
  const out: string[] = [];
  if (a.count !== b.count) return ['count'];
  const same = (p: ArrayLike<unknown> | undefined, q: ArrayLike<unknown> | undefined) => {
    if (!p || !q) return p === q;
    if (p.length !== q.length) return false;
    for (let i = 0; i < p.length; i++) if (p[i] !== q[i] && !(Number.isNaN(p[i]) && Number.isNaN(q[i]))) return false;
    return true;
  };
  for (const k of ['x', 'y', 'z'] as const) if (!same(a[k], b[k])) out.push(k);
  const keys = new Set([...Object.keys(a.attributes), ...Object.keys(b.attributes)]);
  for (const k of keys) if (!same(a.attributes[k as keyof PointCloud['attributes']], b.attributes[k as keyof PointCloud['attributes']])) out.push(k);
  const extras = new Set([...Object.keys(a.extra), ...Object.keys(b.extra)]);
  for (const k of extras) if (!same(a.extra[k], b.extra[k])) out.push(`extra.${k}`);
  if (!same(a.rawExtraBytes, b.rawExtraBytes)) out.push('rawExtraBytes');
  return out;
}

/** Min and max of a numeric array. */
export function range(a: ArrayLike<number>): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < a.length; i++) {
    if (a[i] < lo) lo = a[i];
    if (a[i] > hi) hi = a[i];
  }
  return [lo, hi];
}

/** Count of each value. */
export function counts(a: ArrayLike<number>): Map<number, number> {
  const m = new Map<number, number>();
  for (let i = 0; i < a.length; i++) m.set(a[i], (m.get(a[i]) ?? 0) + 1);
  return m;
}

/** Equal when both round to the same float32 (how the source tests compare). */
export const f32 = (v: number) => Math.fround(v);
