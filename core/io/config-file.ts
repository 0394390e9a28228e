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

/**
 * Read a configuration file when a path is given (`--config` is optional on every command).
 * @returns the parsed YAML, or undefined without a path
 */
export function readOptionalConfig(path: string | undefined): unknown {
  return path ? readConfigFile(path) : undefined;
}

/**
 * The mapping of one stage in a parsed configuration (empty when absent), not yet validated:
 * the caller merges it with presets and flags and resolves the whole.
 * @param value parsed YAML (from `readConfigFile`)
 * @param file the configuration's path, for errors
 * @param stage top-level key, e.g. "simulate"
 */
export function configBlock(value: unknown, file: string, stage: string): Record<string, unknown> {
  if (value === undefined || value === null) return {};
  if (typeof value !== 'object' || Array.isArray(value)) {
    throw new XylemapError('a configuration must be a YAML mapping of stage names to options', { file });
  }
  const block = (value as Record<string, unknown>)[stage];
  if (block === undefined || block === null) return {};
  if (typeof block !== 'object' || Array.isArray(block)) {
    throw new XylemapError(`"${stage}" must be a mapping of option keys to values`, { file, option: stage });
  }
  return block as Record<string, unknown>;
}

/** `configBlock` of a configuration file: read, parse and pick one stage's mapping. */
export function readConfigBlock(path: string, stage: string): Record<string, unknown> {
  return configBlock(readConfigFile(path), path, stage);
}
