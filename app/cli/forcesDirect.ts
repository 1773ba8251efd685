/**
 * `torusgrav forces --method direct`: the plain periodic image sum in a summation order (engine/orders)
 * for the targets, written as CSV id,ax,ay,az (no potential: the plain sums' potentials carry
 * order-dependent constants).
 */
import type { Box } from '../../engine/box';
import { csvChunksBytes } from '../../engine/formats/csvWrite';
import type { Snapshot } from '../../engine/formats/snapshot';
import { snapshotValidate } from '../../engine/formats/validate';
import { targetsResolve } from '../../engine/targets';
import { outputWriteAtomic } from './atomicOutput';
import { CliError } from './cliErrors';
import type { CliIo } from './cliIo';
import { outsideWarning, targetIds, withEngineErrors } from './engineErrors';
import type { ForcesSettings } from './forcesOptions';
import { type OrderSettings, orderEngineOptions } from './orderOptions';
import { imageSumRun } from './orderRun';
import { progressLine } from './progress';
import { particlePlace } from './snapshotFile';
import { nonFiniteTarget } from './resultCheck';

/** What the acceleration of each order is, for the summary. */
export function orderAccelerationText(s: OrderSettings, shells: number | null): string {
  if (s.order === 'screened') return 'the λ → 0 extrapolation of the screened sums';
  if (s.order === 'nearest') return 'the nearest-image sum';
  return `the partial sum of shell ${shells}`;
}

/** Runs the direct method on a loaded snapshot; resolves to the exit code. */
export async function forcesDirectRun(settings: ForcesSettings, order: OrderSettings, snapshot: Snapshot, box: Box, io: CliIo, t0: number): Promise<number> {
  const { file, out } = settings;
  const outside = snapshotValidate(snapshot, file, box, { softened: false, coincident: false });
  const n = snapshot.count;
  const targets = targetsResolve(settings.targets, n);
  const options = orderEngineOptions(order, settings.G, settings.tolGiven ? settings.tol : undefined);
  const progress = progressLine(io, `torusgrav: ${order.order} image sum on ${targets.length} of ${n} particles`);
  let result;
  try {
    result = withEngineErrors(
      () => imageSumRun(snapshot.positions, snapshot.masses, box, targets, options, progress.update),
      snapshot,
      file,
      outside.outside > 0,
      'remove one (the plain image sums are unsoftened)',
    );
  } finally {
    progress.done();
  }
  if (outside.outside > 0) io.stderr(outsideWarning(outside.outside, n, box, file, snapshot, outside.firstOutside));
  const bad = nonFiniteTarget(result.acc, null);
  if (bad >= 0) throw new CliError(`internal error: non-finite result for ${particlePlace(snapshot, result.targets[bad])}; please report this with the input file`, 1);
  const columns = [
    { name: 'id', values: targetIds(snapshot, result.targets), integer: true },
    { name: 'ax', values: result.acc, stride: 3, offset: 0 },
    { name: 'ay', values: result.acc, stride: 3, offset: 1 },
    { name: 'az', values: result.acc, stride: 3, offset: 2 },
  ];
  await outputWriteAtomic(out, csvChunksBytes(columns, result.targets.length, 4096, { transient: true }));
  const seconds = (io.now() - t0) / 1000;
  io.stderr(
    `torusgrav: ${file}: ${n} particles, ${result.targets.length} targets; order ${order.order}${order.background ? '' : ' without background'}, ` +
      `acceleration = ${orderAccelerationText(order, result.params.shells)}; wrote ${out} (id,ax,ay,az) in ${seconds.toFixed(2)} s\n`,
  );
  return 0;
}
