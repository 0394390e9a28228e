/**
 * A small stderr progress bar, one line per stage, redrawn in place. Quiet (draws nothing) when
 * stderr is not a terminal or when `--json` output was asked for, so logs and pipes stay clean.
 */
export type ProgressCallback = (stage: string, done: number, total: number) => void;

export interface ProgressBar {
  update: ProgressCallback;
  /** Finish the current line (call once at the end, also after an error). */
  done(): void;
}

const WIDTH = 28;
const REDRAW_MS = 80;

/**
 * @param quiet draw nothing (e.g. `--json`)
 * @param stream where to draw, default process.stderr
 */
export function createProgressBar(quiet: boolean, stream: NodeJS.WriteStream = process.stderr): ProgressBar {
  if (quiet || !stream.isTTY) return { update: () => {}, done: () => {} };
  let current = '';
  let last = 0;
  const draw = (stage: string, done: number, total: number): void => {
    const f = total > 0 ? Math.min(1, Math.max(0, done / total)) : 0;
    const filled = Math.round(f * WIDTH);
    const line = `${stage.padEnd(14).slice(0, 14)} [${'#'.repeat(filled)}${'.'.repeat(WIDTH - filled)}] ${String(Math.round(f * 100)).padStart(3)} %`;
    stream.write(`\r${line}`);
  };
  return {
    update(stage, done, total) {
      const now = Date.now();
      if (stage !== current) {
        if (current) stream.write('\n');
        current = stage;
        last = 0;
      }
      if (now - last < REDRAW_MS && done < total) return;
      last = now;
      draw(stage, done, total);
    },
    done() {
      if (current) stream.write('\n');
      current = '';
    },
  };
}
