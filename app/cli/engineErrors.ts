/** Engine complaints and warnings about particles, pointed at the input file's rows (shared by the commands). */
import type { Box } from '../../engine/box';
import { EngineInputError } from '../../engine/ewald/ewald';
import type { Snapshot } from '../../engine/formats/snapshot';
import { CliError } from './cliErrors';
import { particlePlace } from './snapshotFile';

/** An EngineInputError as a one-line CliError naming the file and the particles' places. */
export function engineErrorExplain(
  e: EngineInputError,
  snapshot: Snapshot,
  file: string,
  wrapped: boolean,
  coincidentAdvice = 'remove one, or use --softening plummer:EPS or spline:H',
): CliError {
  if (e.index !== undefined && e.other !== undefined) {
    return new CliError(
      `${file}: ${particlePlace(snapshot, e.index)} and ${particlePlace(snapshot, e.other)} sit at the same position${wrapped ? ' (after wrapping into the box)' : ''}; ` +
        `without softening their force is infinite: ${coincidentAdvice}`,
    );
  }
  if (e.index !== undefined) return new CliError(`${file}: ${particlePlace(snapshot, e.index)}: ${e.message}`);
  return new CliError(`${file}: ${e.message}`);
}

/** Runs `compute`, turning EngineInputError into engineErrorExplain. */
export function withEngineErrors<T>(compute: () => T, snapshot: Snapshot, file: string, wrapped: boolean, coincidentAdvice?: string): T {
  try {
    return compute();
  } catch (e) {
    if (e instanceof EngineInputError) throw engineErrorExplain(e, snapshot, file, wrapped, coincidentAdvice);
    throw e;
  }
}

/** The warning line for particles wrapped into the box (k > 0). */
export function outsideWarning(k: number, n: number, box: Box, file: string, snapshot: Snapshot, first: number): string {
  return (
    `torusgrav: warning: ${k} of ${n} particle${n === 1 ? '' : 's'} ${k === 1 ? 'lies' : 'lie'} outside the box ` +
    `[0,${box.lx})x[0,${box.ly})x[0,${box.lz}) and ${k === 1 ? 'was' : 'were'} wrapped into it ` +
    `(the first: ${file} ${particlePlace(snapshot, first)})\n`
  );
}

/** Output ids of the targets: the file's ids, else the 0-based input row (before --every thinning). */
export function targetIds(snapshot: Snapshot, targets: Int32Array): ArrayLike<number> {
  const every = snapshot.every ?? 1;
  if (snapshot.ids) return Float64Array.from(targets, (p) => snapshot.ids![p]);
  return every > 1 ? Float64Array.from(targets, (p) => p * every) : targets;
}
