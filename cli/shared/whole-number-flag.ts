import { XylemapError, type ErrorContext } from '../../core/util/errors.js';

/**
 * A plain (undeclared) count flag such as `--workers 4` or `--threads 2`.
 * @param text the flag's text, undefined when not given
 * @param flag the flag as typed, e.g. "--workers", for the message
 * @param context stage/option/hint of the error
 * @returns the whole number ≥ 1, or undefined when not given
 * @throws XylemapError "<flag> must be a whole number ≥ 1, got "<text>"" (NaN and "" fail too)
 */
export function wholeNumberFlag(text: string | undefined, flag: string, context: ErrorContext): number | undefined {
  if (text === undefined) return undefined;
  const n = Number(text);
  if (!(Number.isInteger(n) && n >= 1)) throw new XylemapError(`${flag} must be a whole number ≥ 1, got "${text}"`, context);
  return n;
}
