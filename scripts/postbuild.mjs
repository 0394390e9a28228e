// Steps tsc cannot do: make the CLI entry executable, and copy data files (YAML presets)
// from core/ into dist/core/ so the built code finds them beside itself.
import { chmodSync, copyFileSync, existsSync, mkdirSync, readdirSync, statSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const entry = join(root, 'dist/cli/main.js');
if (existsSync(entry)) chmodSync(entry, 0o755);

function* walk(dir) {
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) yield* walk(p);
    else yield p;
  }
}
for (const file of walk(join(root, 'core'))) {
  if (!/\.(ya?ml|json)$/.test(file)) continue;
  const target = join(root, 'dist', relative(root, file));
  mkdirSync(dirname(target), { recursive: true });
  copyFileSync(file, target);
}

// Bundle the report's 3D viewer (three.js inlined) to dist/report-viewer.js.
await (await import('./build-viewer.mjs')).buildViewer();
