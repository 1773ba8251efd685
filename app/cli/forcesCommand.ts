/**
 * `torusgrav forces`: periodic (Ewald) accelerations and potentials for the particles of a snapshot,
 * written as CSV id,ax,ay,az,phi. Reading, checking and writing only; the numerics are the engine's.
 */
import { resolve } from 'node:path';
import { type Box, positionsWrap } from '../../engine/box';
import { EngineInputError } from '../../engine/ewald/ewald';
import type { EwaldOptions } from '../../engine/ewald/params';
import { csvChunks } from '../../engine/formats/csvWrite';
import type { Snapshot } from '../../engine/formats/snapshot';
import { targetsResolve } from '../../engine/targets';
import { outputProblem, outputWriteAtomic } from './atomicOutput';
import { CliError, UsageError } from './cliErrors';
import type { CliIo } from './cliIo';
import { FORCES_COMMAND, forcesSettings } from './forcesOptions';
import { ewaldForcesThreads } from './parallelEwald';
import { progressLine } from './progress';
import { particlePlace, snapshotFileRead } from './snapshotFile';
import { forcesSummary } from './summary';

/** Particle count below which ewaldForcesThreads stays on one thread (its own rule, mirrored for the summary). */
const THREADED_MIN_PARTICLES = 2048;
const COMMAND = FORCES_COMMAND;

/** Refuses negative masses (one line naming file, row, column). */
function massesCheck(snapshot: Snapshot, file: string): void {
  const m = snapshot.masses;
  for (let p = 0; p < m.length; p++) {
    if (m[p] < 0) throw new CliError(`${file}: ${particlePlace(snapshot, p)}, column ${JSON.stringify(snapshot.massColumn ?? 'm')}: mass ${m[p]} is negative`);
  }
}

/** How many particles lie outside the home cell, and the first of them. */
function outsideCount(positions: Float64Array, box: Box): { count: number; first: number } {
  const copy = positions.slice();
  const count = positionsWrap(copy, box);
  let first = -1;
  if (count > 0) {
    for (let i = 0; i < copy.length; i++) {
      if (copy[i] !== positions[i]) {
        first = Math.floor(i / 3);
        break;
      }
    }
  }
  return { count, first };
}

/** Engine complaints about particles, pointed at the input rows. */
function engineErrorExplain(e: EngineInputError, snapshot: Snapshot, file: string, wrapped: boolean): CliError {
  if (e.index !== undefined && e.other !== undefined) {
    return new CliError(
      `${file}: ${particlePlace(snapshot, e.index)} and ${particlePlace(snapshot, e.other)} sit at the same position${wrapped ? ' (after wrapping into the box)' : ''}; ` +
        'without softening their force is infinite: remove one, or use --softening plummer:EPS or spline:H',
    );
  }
  if (e.index !== undefined) return new CliError(`${file}: ${particlePlace(snapshot, e.index)}: ${e.message}`);
  return new CliError(`${file}: ${e.message}`);
}

/** Runs `torusgrav forces`; resolves to the exit code. */
export async function forcesRun(argv: readonly string[], io: CliIo, helpText: () => string): Promise<number> {
  const settings = forcesSettings(argv);
  if (settings === 'help') {
    io.stdout(helpText());
    return 0;
  }
  const { file, out, box } = settings;
  if (resolve(out) === resolve(file)) throw new UsageError(`--out ${out} is the input file; choose another name`, COMMAND);
  const problem = outputProblem(out);
  if (problem) throw new CliError(`--out ${out}: ${problem}`);
  const t0 = io.now();
  const snapshot = await snapshotFileRead(file);
  massesCheck(snapshot, file);
  const n = snapshot.count;
  const targets = targetsResolve(settings.targets, n);
  const all = targets.length === n && settings.targets.kind === 'all';
  const outside = outsideCount(snapshot.positions, box);
  const options: EwaldOptions = { G: settings.G, tol: settings.tol, softening: settings.softening };
  const progress = progressLine(io, `torusgrav: forces on ${targets.length} of ${n} particles`);
  const tRead = io.now();
  let result;
  try {
    result = await ewaldForcesThreads(snapshot.positions, snapshot.masses, box, all ? null : targets, options, settings.threads, progress.update);
  } catch (e) {
    if (e instanceof EngineInputError) throw engineErrorExplain(e, snapshot, file, outside.count > 0);
    throw e;
  } finally {
    progress.done();
  }
  const tComputed = io.now();
  // Reported after the run so that a failing run still prints exactly one line.
  if (outside.count > 0) {
    io.stderr(
      `torusgrav: warning: ${outside.count} of ${n} particle${n === 1 ? '' : 's'} ${outside.count === 1 ? 'lies' : 'lie'} outside the box ` +
        `[0,${box.lx})x[0,${box.ly})x[0,${box.lz}) and ${outside.count === 1 ? 'was' : 'were'} wrapped into it ` +
        `(the first: ${file} ${particlePlace(snapshot, outside.first)})\n`,
    );
  }
  for (let t = 0; t < result.targets.length; t++) {
    const bad = !Number.isFinite(result.phi[t]) || !Number.isFinite(result.acc[3 * t]) || !Number.isFinite(result.acc[3 * t + 1]) || !Number.isFinite(result.acc[3 * t + 2]);
    if (bad) throw new CliError(`internal error: non-finite result for ${particlePlace(snapshot, result.targets[t])}; please report this with the input file`, 1);
  }
  await outputWriteAtomic(
    out,
    csvChunks(
      [
        { name: 'id', values: result.targets, integer: true },
        { name: 'ax', values: result.acc, stride: 3, offset: 0 },
        { name: 'ay', values: result.acc, stride: 3, offset: 1 },
        { name: 'az', values: result.acc, stride: 3, offset: 2 },
        { name: 'phi', values: result.phi },
      ],
      result.targets.length,
    ),
  );
  const tEnd = io.now();
  io.stderr(
    forcesSummary({
      file,
      out,
      snapshot,
      settings,
      params: result.params,
      targetCount: result.targets.length,
      threadsUsed: settings.threads <= 1 || n < THREADED_MIN_PARTICLES ? 1 : settings.threads,
      seconds: { read: (tRead - t0) / 1000, compute: (tComputed - tRead) / 1000, write: (tEnd - tComputed) / 1000, total: (tEnd - t0) / 1000 },
    }),
  );
  return 0;
}
