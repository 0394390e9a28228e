import { existsSync, readFileSync } from 'node:fs';
import { XylemapError } from '../../core/util/errors.js';

/**
 * Read a UTF-8 text file given on the command line, failing with one line that names the file.
 * @param path the file
 * @param hint what the user can do (shown after the message)
 * @param what when given, the message is "cannot read <what> (<code>)"; otherwise "file not found"
 *   or "cannot read file (<code>)"
 */
export function readTextFile(path: string, hint: string, what?: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? 'read error';
    const message = what !== undefined ? `cannot read ${what} (${code})` : code === 'ENOENT' ? 'file not found' : `cannot read file (${code})`;
    throw new XylemapError(message, { file: path, hint });
  }
}

/**
 * An optional JSON file (e.g. a summary.json that may not exist yet).
 * @returns the parsed value, or undefined when the file is absent
 * @throws XylemapError when the file exists but is not valid JSON
 */
export function readOptionalJson(path: string): unknown {
  if (!existsSync(path)) return undefined;
  try {
    return JSON.parse(readFileSync(path, 'utf8'));
  } catch {
    throw new XylemapError('not valid JSON', { file: path, hint: 'fix or remove the file, then run again' });
  }
}
