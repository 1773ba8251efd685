/** A one-line progress display on stderr, shown only when stderr is a terminal. */
import type { CliIo } from './cliIo';

export interface ProgressLine {
  /** Fraction done in [0, 1]. */
  readonly update: (fraction: number) => void;
  /** Clears the line. */
  readonly done: () => void;
}

/** Progress for `label`, redrawn at most every 100 ms; a no-op when stderr is not a TTY. */
export function progressLine(io: CliIo, label: string): ProgressLine {
  if (!io.stderrIsTTY) return { update: () => undefined, done: () => undefined };
  let last = -Infinity;
  let shown = false;
  return {
    update(fraction) {
      const t = io.now();
      if (t - last < 100 && fraction < 1) return;
      last = t;
      shown = true;
      io.stderr(`\r${label} ${(100 * Math.min(1, Math.max(0, fraction))).toFixed(0).padStart(3)}%`);
    },
    done() {
      if (shown) io.stderr('\r\x1b[K');
    },
  };
}
