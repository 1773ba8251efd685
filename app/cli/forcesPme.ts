/**
 * `torusgrav forces --method pme`: particle-mesh Ewald accelerations and potentials for all particles
 * (engine/pme through parallelPme.ts), written as id,ax,ay,az,phi[,rel_err] for the chosen targets,
 * with a short report of the parameters, the predicted rms relative error and the timing.
 */
import type { Box } from '../../engine/box';
import { EngineInputError } from '../../engine/ewald/ewald';
import { type CsvColumn, csvChunksBytes } from '../../engine/formats/csvWrite';
import type { Snapshot } from '../../engine/formats/snapshot';
import type { SnapshotValidation } from '../../engine/formats/validate';
import type { PmeOptions } from '../../engine/pme/index';
import type { Softening } from '../../engine/softening';
import { targetsResolve } from '../../engine/targets';
import { outputWriteAtomic } from './atomicOutput';
import { CliError } from './cliErrors';
import type { CliIo } from './cliIo';
import { engineErrorExplain, outsideWarning, targetIds } from './engineErrors';
import type { ForcesSettings } from './forcesOptions';
import { type PmeThreadsResult, pmeForcesThreads } from './parallelPme';
import { progressLine } from './progress';
import { particlePlace } from './snapshotFile';
import { nonFiniteTarget } from './resultCheck';

/** A number with `digits` significant digits, in exponent form when very small or large. */
function g(v: number, digits = 4): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(digits - 1).replace(/\.?0+e/, 'e');
  return String(Number(v.toPrecision(digits)));
}

/** |a_file − a|/|a| per target (file accelerations in snapshot order, reference in snapshot order). */
function relativeErrors(fileAcc: Float64Array, targets: Int32Array, acc: Float64Array): Float64Array {
  const err = new Float64Array(targets.length);
  for (let t = 0; t < targets.length; t++) {
    const p = targets[t];
    let num = 0, den = 0;
    for (let d = 0; d < 3; d++) {
      const diff = fileAcc[3 * p + d] - acc[3 * p + d];
      num += diff * diff;
      den += acc[3 * p + d] ** 2;
    }
    err[t] = den > 0 ? Math.sqrt(num / den) : num > 0 ? Infinity : 0;
  }
  return err;
}

/** The report lines (stderr): input and tolerance, parameters, predicted error, [file errors,] timing. */
function pmeSummary(file: string, out: string, s: ForcesSettings, snapshot: Snapshot, box: Box, r: PmeThreadsResult, rows: number, errors: Float64Array | null, seconds: { read: number; compute: number; write: number; total: number }): string {
  const p = r.params;
  const b = box.lx === box.ly && box.ly === box.lz ? `${box.lx}` : `${box.lx} x ${box.ly} x ${box.lz}`;
  const soft = p.softening.kind === 'plummer' ? `plummer eps=${g(p.softening.eps, 6)}` : p.softening.kind === 'spline' ? `spline h=${g(p.softening.h, 6)}` : 'none';
  const lines = [
    `torusgrav: ${file}: N=${snapshot.count}; method pme (all particles; ${rows} rows written); box ${b}; G=${g(p.G, 6)}${s.units ? ` (${s.units.label})` : ''}; tol=${g(p.tol)} (rms relative error over all particles); softening ${soft}`,
    `torusgrav: mesh=${p.mesh.join('x')} order=${p.order} influence=${p.influence} alpha=${g(p.alpha)} rCut=${g(p.rCut)} cells=${p.cells.join('x')}` +
      (p.softening.kind === 'plummer' ? ` softened within ${g(p.rSoft)}` : ''),
    `torusgrav: predicted rms relative error ${g(r.predictedRmsRelativeError, 3)} after the run (${g(p.predictedRelativeError, 3)} before it); predicted rms force error ${g(p.predictedRmsError, 3)}`,
  ];
  if (errors && errors.length > 0) {
    const sorted = Float64Array.from(errors).sort();
    const q = (f: number) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(f * sorted.length) - 1))];
    lines.push(`torusgrav: relative error of the file's accelerations against the pme reference: 50% ${g(q(0.5), 3)}, 90% ${g(q(0.9), 3)}, 99% ${g(q(0.99), 3)}, max ${g(sorted[sorted.length - 1], 3)}`);
  }
  lines.push(
    `torusgrav: wrote ${rows} rows to ${out} in ${seconds.total.toFixed(2)} s (read ${seconds.read.toFixed(2)}, forces ${seconds.compute.toFixed(2)}, write ${seconds.write.toFixed(2)}) on ${r.threadsUsed} thread${r.threadsUsed === 1 ? '' : 's'}`,
    '',
  );
  return lines.join('\n');
}

/** Runs the pme method on a loaded, validated snapshot; resolves to the exit code. */
export async function forcesPmeRun(settings: ForcesSettings, snapshot: Snapshot, box: Box, softening: Softening, validation: SnapshotValidation, io: CliIo, t0: number): Promise<number> {
  const { file, out } = settings;
  const n = snapshot.count;
  const targets = targetsResolve(settings.targets, n);
  const options: PmeOptions = { G: settings.G, tol: settings.tol, softening, ...settings.pme };
  const progress = progressLine(io, `torusgrav: pme forces on ${n} particles`);
  const tRead = io.now();
  let result: PmeThreadsResult;
  try {
    result = await pmeForcesThreads(snapshot.positions, snapshot.masses, box, options, settings.threads, progress.update);
  } catch (e) {
    if (e instanceof EngineInputError) throw engineErrorExplain(e, snapshot, file, validation.outside > 0);
    throw e;
  } finally {
    progress.done();
  }
  const tComputed = io.now();
  if (validation.outside > 0) io.stderr(outsideWarning(validation.outside, n, box, file, snapshot, validation.firstOutside));
  const acc = new Float64Array(3 * targets.length);
  const phi = new Float64Array(targets.length);
  for (let t = 0; t < targets.length; t++) {
    const p = targets[t];
    for (let d = 0; d < 3; d++) acc[3 * t + d] = result.acc[3 * p + d];
    phi[t] = result.phi[p];
  }
  const bad = nonFiniteTarget(acc, phi);
  if (bad >= 0) throw new CliError(`internal error: non-finite result for ${particlePlace(snapshot, targets[bad])}; please report this with the input file`, 1);
  const errors = snapshot.accelerations ? relativeErrors(snapshot.accelerations, targets, result.acc) : null;
  const columns: CsvColumn[] = [
    { name: 'id', values: targetIds(snapshot, targets), integer: true },
    { name: 'ax', values: acc, stride: 3, offset: 0 },
    { name: 'ay', values: acc, stride: 3, offset: 1 },
    { name: 'az', values: acc, stride: 3, offset: 2 },
    { name: 'phi', values: phi },
    ...(errors ? [{ name: 'rel_err', values: errors }] : []),
  ];
  await outputWriteAtomic(out, csvChunksBytes(columns, targets.length, 4096, { transient: true }));
  const tEnd = io.now();
  const seconds = { read: (tRead - t0) / 1000, compute: (tComputed - tRead) / 1000, write: (tEnd - tComputed) / 1000, total: (tEnd - t0) / 1000 };
  io.stderr(pmeSummary(file, out, settings, snapshot, box, result, targets.length, errors, seconds));
  return 0;
}
