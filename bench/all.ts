import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * `npm run bench`: every benchmark, one after the other, each in its own process so its peak
 * memory is its own. Figures are printed by each script; nothing here asserts a time.
 */
const BENCHES = ['io', 'simulate', 'fit', 'reconstruct', 'scaling', 'hydraulics', 'batch'] as const;

const here = dirname(fileURLToPath(import.meta.url));
const only = process.argv.slice(2);
let failed = 0;
for (const name of BENCHES) {
  if (only.length > 0 && !only.includes(name)) continue;
  process.stdout.write(`\n=== bench ${name} ===\n`);
  const started = Date.now();
  const r = spawnSync(process.execPath, ['--expose-gc', join(here, `${name}.js`)], { stdio: 'inherit' });
  process.stdout.write(`=== ${name}: exit ${r.status}, ${((Date.now() - started) / 1000).toFixed(1)} s ===\n`);
  if (r.status !== 0) failed++;
}
process.exitCode = failed > 0 ? 1 : 0;
