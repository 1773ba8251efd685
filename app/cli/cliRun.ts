/**
 * The command dispatcher: picks the command, turns every failure into one line on stderr and an exit
 * code (2 for the user's input or command line, 1 for an internal error).
 */
import { EngineInputError } from '../../engine/ewald/ewald';
import { SnapshotFormatError } from '../../engine/formats/snapshot';
import { version } from '../../package.json';
import { CliError, UsageError, oneLine } from './cliErrors';
import type { CliIo } from './cliIo';

type HelpModule = typeof import('./help');

/**
 * Each command's module (and the help text, which names every command's options) is loaded by dynamic
 * import() so that the bundle split by esbuild parses only what the chosen command needs at start-up.
 * The help module is loaded up front only when the arguments ask for help (`--help` is an exact flag).
 */
async function helpFor(rest: readonly string[], pick: (h: HelpModule) => () => string): Promise<() => string> {
  if (!rest.includes('--help')) return () => 'see torusgrav --help\n';
  const help = await import('./help');
  return pick(help);
}

/** Runs the command line `argv` (without node and the script); resolves to the exit code. */
export async function cliRun(argv: readonly string[], io: CliIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case undefined:
        io.stderr((await import('./help')).mainHelp(version));
        return 2;
      case '--help':
      case '-h':
        io.stdout((await import('./help')).mainHelp(version));
        return 0;
      case '--version':
        io.stdout(`torusgrav ${version}\n`);
        return 0;
      case 'help': {
        const { checkHelp, convergeHelp, demoHelp, forcesHelp, mainHelp } = await import('./help');
        io.stdout(rest[0] === 'forces' ? forcesHelp() : rest[0] === 'demo' ? demoHelp() : rest[0] === 'converge' ? convergeHelp() : rest[0] === 'check' ? checkHelp() : mainHelp(version));
        return 0;
      }
      case 'forces': {
        const [{ forcesRun }, help] = await Promise.all([import('./forcesCommand'), helpFor(rest, (h) => h.forcesHelp)]);
        return await forcesRun(rest, io, help);
      }
      case 'check': {
        const [{ checkRun }, help] = await Promise.all([import('./checkCommand'), helpFor(rest, (h) => h.checkHelp)]);
        return await checkRun(rest, io, help);
      }
      case 'converge': {
        const [{ convergeRun }, help] = await Promise.all([import('./convergeCommand'), helpFor(rest, (h) => h.convergeHelp)]);
        return await convergeRun(rest, io, help);
      }
      case 'demo': {
        const [{ demoRun }, help] = await Promise.all([import('./demoCommand'), helpFor(rest, (h) => h.demoHelp)]);
        return await demoRun(rest, io, help);
      }
      default:
        throw new UsageError(`unknown command ${JSON.stringify(command)}; commands are forces, converge, check and demo`);
    }
  } catch (e) {
    const { text, code } = errorReport(e);
    io.stderr(`torusgrav: ${oneLine(text)}\n`);
    return code;
  }
}

function errorReport(e: unknown): { text: string; code: number } {
  if (e instanceof UsageError) return { text: `${e.message} (see torusgrav ${e.command ? `${e.command} ` : ''}--help)`, code: 2 };
  if (e instanceof CliError) return { text: e.message, code: e.exitCode };
  if (e instanceof SnapshotFormatError) return { text: e.message, code: 2 };
  if (e instanceof EngineInputError || e instanceof RangeError) return { text: e.message, code: 2 };
  return { text: `internal error: ${e instanceof Error ? e.message : String(e)}`, code: 1 };
}
