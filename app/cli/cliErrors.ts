/**
 * Errors the command line reports as one line on stderr with an exit code (2: the user's input or
 * command line is at fault; 1: something inside torusgrav went wrong).
 */

/** A failure to report as `torusgrav: <message>` with the given exit code. */
export class CliError extends Error {
  constructor(message: string, readonly exitCode: number = 2) {
    super(message);
    this.name = 'CliError';
  }
}

/** A command-line mistake (unknown option, bad value); reported with a pointer to --help. */
export class UsageError extends CliError {
  constructor(message: string, readonly command?: string) {
    super(message, 2);
    this.name = 'UsageError';
  }
}

/** Collapses a message to one line. */
export function oneLine(text: string): string {
  return text.replace(/\s*[\r\n]+\s*/g, ' ').trim();
}
