// Bundle the report's 3D viewer (core/report/viewer/browser/main.ts + three.js) into one minified script,
// dist/report-viewer.js, which the report generator inlines into every report.html.
import { build } from 'esbuild';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

/** Bundle the viewer to `outfile` (default dist/report-viewer.js); returns the output path. */
export async function buildViewer(outfile = join(root, 'dist/report-viewer.js')) {
  await build({
    entryPoints: [join(root, 'core/report/viewer/browser/main.ts')],
    outfile,
    bundle: true,
    minify: true,
    format: 'iife',
    target: ['es2020'],
    platform: 'browser',
    legalComments: 'none',
    logLevel: 'warning',
  });
  return outfile;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  await buildViewer(process.argv[2]);
}
