/** What a command needs from the process: output streams, whether stderr is a terminal, a clock. */
export interface CliIo {
  readonly stdout: (text: string) => void;
  readonly stderr: (text: string) => void;
  readonly stderrIsTTY: boolean;
  /** Milliseconds, monotonic. */
  readonly now: () => number;
}

/** The real process streams. */
export function processIo(): CliIo {
  return {
    stdout: (t) => void process.stdout.write(t),
    stderr: (t) => void process.stderr.write(t),
    stderrIsTTY: process.stderr.isTTY === true,
    now: () => performance.now(),
  };
}
