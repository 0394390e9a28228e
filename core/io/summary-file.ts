import { existsSync, readFileSync } from 'node:fs';
import { XylemapError } from '../util/errors.js';

/** A summary.json object (`{ schema, tree, reliability, scaling, hydraulics, warnings }`, any subset). */
export type SummaryObject = Record<string, unknown>;

/**
 * The first existing summary.json among the candidate paths, so a stage run on its own can add its
 * block to what earlier stages wrote.
 * @returns the parsed object, or null when none of the paths exists
 * @throws XylemapError when the first existing file is not a JSON object (nothing is overwritten then)
 */
export function readExistingSummary(...candidates: string[]): SummaryObject | null {
  for (const path of candidates) {
    if (!existsSync(path)) continue;
    try {
      const value: unknown = JSON.parse(readFileSync(path, 'utf8'));
      if (value && typeof value === 'object' && !Array.isArray(value)) return value as SummaryObject;
    } catch {
      // reported below, with the same line as a non-object
    }
    throw new XylemapError('existing summary.json is not a JSON object', { file: path, hint: 'fix or remove it, then run again' });
  }
  return null;
}

/**
 * Put one stage's block into a summary: replaces `summary[stage]` and the warnings prefixed
 * `"<stage>: "`, keeps everything else (other stages' blocks and warnings).
 * @param existing the summary read so far, or null for a new one
 * @param stage block name, e.g. "hydraulics"
 * @param block the stage's summary block; its `warnings` (string[]) are copied with the prefix
 */
export function mergeSummaryBlock(existing: SummaryObject | null, stage: string, block: object): SummaryObject {
  const base = existing ?? { schema: 'xylemap.summary/1' };
  const prefix = `${stage}: `;
  const others = Array.isArray(base.warnings) ? base.warnings.filter((w) => !(typeof w === 'string' && w.startsWith(prefix))) : [];
  const own = (block as { warnings?: unknown }).warnings;
  const ours = Array.isArray(own) ? own.map((w) => `${prefix}${String(w)}`) : [];
  return { ...base, [stage]: block, warnings: [...others, ...ours] };
}
