/**
 * The command dispatcher: picks the command, turns every failure into one line on stderr and an exit
 * code (2 for the user's input or command line, 1 for an internal error).
 */
import { EngineInputError } from '../../engine/ewald/ewald';
import { SnapshotFormatError } from '../../engine/formats/snapshot';
import { version } from '../../package.json';
import { CliError, UsageError, oneLine } from './cliErrors';
import type { CliIo } from './cliIo';
import { checkRun } from './checkCommand';
import { convergeRun } from './convergeCommand';
import { demoRun } from './demoCommand';
import { forcesRun } from './forcesCommand';
import { checkHelp, convergeHelp, demoHelp, forcesHelp, mainHelp } from './help';

/** Runs the command line `argv` (without node and the script); resolves to the exit code. */
export async function cliRun(argv: readonly string[], io: CliIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case undefined:
        io.stderr(mainHelp(version));
        return 2;
      case '--help':
      case '-h':
        io.stdout(mainHelp(version));
        return 0;
      case '--version':
        io.stdout(`torusgrav ${version}\n`);
        return 0;
      case 'help':
        io.stdout(rest[0] === 'forces' ? forcesHelp() : rest[0] === 'demo' ? demoHelp() : rest[0] === 'converge' ? convergeHelp() : rest[0] === 'check' ? checkHelp() : mainHelp(version));
        return 0;
      case 'forces':
        return await forcesRun(rest, io, forcesHelp);
      case 'check':
        return await checkRun(rest, io, checkHelp);
      case 'converge':
        return await convergeRun(rest, io, convergeHelp);
      case 'demo':
        return await demoRun(rest, io, demoHelp);
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
