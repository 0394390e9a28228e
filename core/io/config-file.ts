import { readFileSync } from 'node:fs';
import { parse, YAMLParseError } from 'yaml';
import { XylemapError } from '../util/errors.js';

/**
 * Read a YAML configuration file into a plain object (not yet validated: pass it to
 * `resolveConfig`). An empty file means "all defaults".
 * @throws XylemapError when the file is missing or is not valid YAML (with the line).
 */
export function readConfigFile(path: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new XylemapError(code === 'ENOENT' ? 'configuration file not found' : `cannot read configuration file (${code})`, {
      file: path,
      hint: 'give the path of a YAML file, e.g. one made with `xylemap config --print-defaults > xylemap.yaml`',
    });
  }
  return parseConfigText(text, path);
}

/** Parse configuration YAML text; `file` names it in errors. */
export function parseConfigText(text: string, file = 'configuration'): unknown {
  try {
    return parse(text, { uniqueKeys: true }) ?? undefined;
  } catch (e) {
    if (e instanceof YAMLParseError) {
      const line = e.linePos?.[0]?.line;
      const first = e.message.split('\n')[0];
      throw new XylemapError(`not valid YAML${line ? ` at line ${line}` : ''}: ${first}`, {
        file,
        hint: 'fix the YAML syntax (indent with spaces, "key: value")',
      });
    }
    throw e;
  }
}
