/**
 * `torusgrav forces`: periodic (Ewald) accelerations and potentials for the particles of a snapshot,
 * written as CSV id,ax,ay,az,phi (or, with --method direct, a plain image sum: forcesDirect.ts). Reading, checking and writing only; the numerics are the engine's.
 */
import { resolve } from 'node:path';
import { EngineInputError } from '../../engine/ewald/ewald';
import type { EwaldOptions } from '../../engine/ewald/params';
import { type CsvColumn, csvChunksBytes } from '../../engine/formats/csvWrite';
import { type Snapshot, SnapshotFormatError } from '../../engine/formats/snapshot';
import { snapshotPlace, snapshotValidate } from '../../engine/formats/validate';
import type { Softening } from '../../engine/softening';
import { targetsResolve } from '../../engine/targets';
import { outputProblem, outputWriteAtomic } from './atomicOutput';
import { nonFiniteTarget } from './resultCheck';
import { PhaseClock, phaseLines, timingEnabled } from './phaseTiming';
import { CliError, UsageError } from './cliErrors';
import type { CliIo } from './cliIo';
import { engineErrorExplain, outsideWarning, targetIds } from './engineErrors';
import { FORCES_COMMAND, forcesSettings } from './forcesOptions';
import { ewaldForcesThreads } from './parallelEwald';
import { ewaldThreadsWarm } from './workerWarm';
import { progressLine } from './progress';
import { particlePlace, snapshotFileRead } from './snapshotFile';
import { forcesSummary } from './summary';

/** Particle count below which ewaldForcesThreads stays on one thread (its own rule, mirrored for the summary). */
const THREADED_MIN_PARTICLES = 2048;
const COMMAND = FORCES_COMMAND;

/** The one softening length of a --softening-column (all must be equal); none when all are 0. */
function softeningFromColumn(snapshot: Snapshot, kind: 'plummer' | 'spline', file: string): Softening {
  const e = snapshot.softening!;
  let lo = 0;
  let hi = 0;
  for (let p = 0; p < e.length; p++) {
    if (!(e[p] >= 0) || !Number.isFinite(e[p])) {
      throw new SnapshotFormatError(file, `softening length ${e[p]} must be a finite number ≥ 0`, snapshotPlace(snapshot, p, 'softening'));
    }
    if (e[p] < e[lo]) lo = p;
    if (e[p] > e[hi]) hi = p;
  }
  if (e[lo] !== e[hi]) {
    throw new CliError(
      `${file}: the softening lengths (${snapshot.sources?.softening ?? 'softening column'}) vary from ${e[lo]} (${particlePlace(snapshot, lo)}) to ${e[hi]} (${particlePlace(snapshot, hi)}); ` +
        `the periodic reference uses one length: give --softening ${kind}:LENGTH instead of --softening-column (e.g. the largest, ${e[hi]})`,
    );
  }
  if (e[hi] === 0) return { kind: 'none' };
  return kind === 'plummer' ? { kind, eps: e[hi] } : { kind, h: e[hi] };
}

/** |a_file − a|/|a| for each target (file accelerations in the snapshot's order, reference per target). */
function relativeErrors(fileAcc: Float64Array, targets: Int32Array, acc: Float64Array): Float64Array {
  const err = new Float64Array(targets.length);
  for (let t = 0; t < targets.length; t++) {
    const p = targets[t];
    let num = 0;
    let den = 0;
    for (let d = 0; d < 3; d++) {
      const r = acc[3 * t + d];
      const diff = fileAcc[3 * p + d] - r;
      num += diff * diff;
      den += r * r;
    }
    err[t] = den > 0 ? Math.sqrt(num / den) : num > 0 ? Infinity : 0;
  }
  return err;
}

/** Runs `torusgrav forces`; resolves to the exit code. */
export async function forcesRun(argv: readonly string[], io: CliIo, helpText: () => string): Promise<number> {
  const settings = forcesSettings(argv);
  if (settings === 'help') {
    io.stdout(helpText());
    return 0;
  }
  const { file, out } = settings;
  if (resolve(out) === resolve(file)) throw new UsageError(`--out ${out} is the input file; choose another name`, COMMAND);
  const problem = outputProblem(out);
  if (problem) throw new CliError(`--out ${out}: ${problem}`);
  if (settings.method === 'ewald') ewaldThreadsWarm(settings.threads); // worker start-up overlaps the reading
  const t0 = io.now();
  const snapshot = await snapshotFileRead(file, settings.mapping, {
    maxBytes: settings.maxBytes,
    every: settings.every,
    limitAdvice: 'raise it with --max-size SIZE if the machine has the memory, or read every K-th particle with --every K',
  });
  const box = settings.box ?? snapshot.box!;
  // the other methods' code is loaded only when asked for (start-up of the default path)
  if (settings.direct) return (await import('./forcesDirect')).forcesDirectRun(settings, settings.direct, snapshot, box, io, t0);
  const softening = settings.softeningFromColumn ? softeningFromColumn(snapshot, settings.softeningFromColumn, file) : settings.softening;
  const outside = snapshotValidate(snapshot, file, box, { softened: softening.kind !== 'none', coincident: false });
  if (settings.method === 'pme') return (await import('./forcesPme')).forcesPmeRun(settings, snapshot, box, softening, outside, io, t0);
  const n = snapshot.count;
  const targets = targetsResolve(settings.targets, n);
  const all = targets.length === n && settings.targets.kind === 'all';
  const options: EwaldOptions = { G: settings.G, tol: settings.tol, softening };
  const progress = progressLine(io, `torusgrav: forces on ${targets.length} of ${n} particles`);
  const tRead = io.now();
  let result;
  try {
    result = await ewaldForcesThreads(snapshot.positions, snapshot.masses, box, all ? null : targets, options, settings.threads, progress.update);
  } catch (e) {
    if (e instanceof EngineInputError) throw engineErrorExplain(e, snapshot, file, outside.outside > 0);
    throw e;
  } finally {
    progress.done();
  }
  const tComputed = io.now();
  // Reported after the run so that a failing run still prints exactly one line.
  if (outside.outside > 0) io.stderr(outsideWarning(outside.outside, n, box, file, snapshot, outside.firstOutside));
  const bad = nonFiniteTarget(result.acc, result.phi);
  if (bad >= 0) throw new CliError(`internal error: non-finite result for ${particlePlace(snapshot, result.targets[bad])}; please report this with the input file`, 1);
  const ids = targetIds(snapshot, result.targets);
  const errors = snapshot.accelerations ? relativeErrors(snapshot.accelerations, result.targets, result.acc) : null;
  const columns: CsvColumn[] = [
    { name: 'id', values: ids, integer: true },
    { name: 'ax', values: result.acc, stride: 3, offset: 0 },
    { name: 'ay', values: result.acc, stride: 3, offset: 1 },
    { name: 'az', values: result.acc, stride: 3, offset: 2 },
    { name: 'phi', values: result.phi },
    ...(errors ? [{ name: 'rel_err', values: errors }] : []),
  ];
  const writeClock = timingEnabled() ? new PhaseClock(true) : null;
  await outputWriteAtomic(out, csvChunksBytes(columns, result.targets.length, 4096, { transient: true }));
  if (writeClock) {
    writeClock.mark('write (format, write, sync, rename)');
    io.stderr(phaseLines('main', writeClock.records));
  }
  const tEnd = io.now();
  io.stderr(
    forcesSummary({
      file,
      out,
      snapshot,
      settings,
      box,
      errors,
      params: result.params,
      targetCount: result.targets.length,
      threadsUsed: settings.threads <= 1 || n < THREADED_MIN_PARTICLES ? 1 : settings.threads,
      seconds: { read: (tRead - t0) / 1000, compute: (tComputed - tRead) / 1000, write: (tEnd - tComputed) / 1000, total: (tEnd - t0) / 1000 },
    }),
  );
  return 0;
}
