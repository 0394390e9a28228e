/**
 * Resume rule: a tree is skipped when its output folder holds every expected file and its run.json
 * records the same input sha256 and the same resolved options as this run would use.
 */

/** JSON text with object keys sorted at every level, so equal data compares equal whatever the key order. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortKeys);
  if (v && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    return Object.fromEntries(
      Object.keys(o)
        .sort()
        .map((k) => [k, sortKeys(o[k])]),
    );
  }
  return v;
}

/** The input hash and resolved options a run.json records (several spellings accepted). */
export function runRecordKey(runJson: unknown): { inputSha256?: string; options?: unknown } {
  if (!runJson || typeof runJson !== 'object') return {};
  const r = runJson as Record<string, unknown>;
  const input = r.input && typeof r.input === 'object' ? (r.input as Record<string, unknown>) : {};
  const sha = [input.sha256, r.input_sha256, r.inputSha256].find((v) => typeof v === 'string') as string | undefined;
  const options = r.options ?? r.config ?? r.resolved_options;
  return { inputSha256: sha, options };
}

export type ResumeDecision = { skip: true } | { skip: false; reason: string };

/**
 * Decide whether a finished tree can be skipped.
 * @param present names of the files found in the tree's output folder
 * @param required names that must all be there (summary.json, run.json, …)
 * @param runJson parsed run.json, or undefined when absent or unreadable
 * @param expected the input sha256 and resolved options of this run
 */
export function resumeDecision(
  present: readonly string[],
  required: readonly string[],
  runJson: unknown,
  expected: { inputSha256: string; options: unknown },
): ResumeDecision {
  // Every file run.json says the run wrote must still be there, besides the always-required ones.
  const listed = runJson && typeof runJson === 'object' ? (runJson as { outputs?: unknown }).outputs : undefined;
  const all = [...required, ...(Array.isArray(listed) ? listed.filter((f): f is string => typeof f === 'string') : [])];
  const missing = [...new Set(all)].filter((f) => !present.includes(f));
  if (missing.length > 0) return { skip: false, reason: `missing ${missing.join(', ')}` };
  const rec = runRecordKey(runJson);
  if (rec.inputSha256 !== expected.inputSha256) return { skip: false, reason: 'input changed' };
  if (rec.options === undefined || canonicalJson(rec.options) !== canonicalJson(expected.options)) {
    return { skip: false, reason: 'options changed' };
  }
  return { skip: true };
}
