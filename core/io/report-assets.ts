import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { XylemapError } from '../util/errors.js';

/**
 * Where the bundled report viewer may be: beside the built code (dist/core/io → dist/) or, when
 * running from the TypeScript sources (tests), in dist/ of the repository.
 */
const CANDIDATES = ['../../report-viewer.js', '../../dist/report-viewer.js'];

let cached: string | undefined;

/**
 * Read the bundled 3D viewer script (three.js included) that report.html inlines.
 * @param path explicit bundle path (tests); default: the one made by `npm run build`
 * @throws XylemapError when the bundle has not been built
 */
export function readViewerBundle(path?: string): string {
  if (path) return readFileSync(path, 'utf8');
  if (cached !== undefined) return cached;
  for (const rel of CANDIDATES) {
    const p = fileURLToPath(new URL(rel, import.meta.url));
    if (existsSync(p)) return (cached = readFileSync(p, 'utf8'));
  }
  throw new XylemapError('the report viewer bundle (dist/report-viewer.js) is missing', {
    stage: 'report',
    hint: 'run `npm run build` (it bundles the viewer) and try again',
  });
}
