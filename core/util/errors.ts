/**
 * The one error type of xylemap. It carries enough context for the CLI to print a single line
 * that names the file or stage, the problem, and what the user can do about it.
 */
export interface ErrorContext {
  /** File the problem was found in, if any. */
  file?: string;
  /** Pipeline stage (e.g. "io", "reconstruct"). */
  stage?: string;
  /** Option key path (e.g. "reconstruct.band_width_m"). */
  option?: string;
  /** What the user can do about it. */
  hint?: string;
}

export class XylemapError extends Error {
  readonly file?: string;
  readonly stage?: string;
  readonly option?: string;
  readonly hint?: string;

  constructor(message: string, context: ErrorContext = {}) {
    super(message);
    this.name = 'XylemapError';
    this.file = context.file;
    this.stage = context.stage;
    this.option = context.option;
    this.hint = context.hint;
  }

  /** One line: "<file>: <message> (option x) — <hint>". */
  oneLine(): string {
    const where = this.file ?? (this.stage ? `stage ${this.stage}` : 'xylemap');
    const option = this.option ? ` (option ${this.option})` : '';
    const hint = this.hint ? ` — ${this.hint}` : '';
    return `${where}: ${this.message}${option}${hint}`;
  }
}

/** Re-throw any error as a XylemapError tied to a file, keeping existing context. */
export function withFile(error: unknown, file: string): XylemapError {
  if (error instanceof XylemapError) {
    if (error.file) return error;
    return new XylemapError(error.message, { ...contextOf(error), file });
  }
  const message = error instanceof Error ? error.message : String(error);
  return new XylemapError(message, { file });
}

function contextOf(e: XylemapError): ErrorContext {
  return { file: e.file, stage: e.stage, option: e.option, hint: e.hint };
}
