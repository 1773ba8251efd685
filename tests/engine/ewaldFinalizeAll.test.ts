/**
 * ewaldFinalizeAll (the all-particle finish of a threaded run: this thread's kept real-space sums, other
 * threads' parts, G, the self term and the background constant, in WebAssembly where the kernels run
 * there) against the route it replaces on an identical setup: ewaldAllRealAddUnsorted into zeroed arrays,
 * then ewaldFinalize with those and the parts. Same operations in the same order, so the same bits.
 */
import { expect, it } from 'vitest';
import {
  ewaldAllRealAddUnsorted,
  ewaldAllRealChunk,
  ewaldCellCount,
  ewaldFinalize,
  ewaldFinalizeAll,
  ewaldFourierChunk,
  ewaldSetup,
  ewaldStructureFactor,
  ewaldWeighStructureFactor,
} from '../../engine/ewald/ewald';
import { targetsAll } from '../../engine/targets';
import { randomSeeded } from '../../engine/util/random';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { snapshotClustered } from '../helpers/snapshots';

const s = snapshotClustered(1500, 12, [1, 1.4, 0.8], 3);
const n = 1500;

/** A setup whose real-space sums are kept inside it, and the Fourier sums of every particle. */
function runToFinish() {
  const setup = ewaldSetup(s.positions, s.masses, s.box, { tol: 1e-8, G: 2.5 });
  const nc = ewaldCellCount(setup);
  ewaldAllRealChunk(setup, 0, Math.floor(nc / 3));
  ewaldAllRealChunk(setup, Math.floor(nc / 3), nc);
  const weighted = ewaldWeighStructureFactor(setup, ewaldStructureFactor(setup));
  const acc = new Float64Array(3 * n), phi = new Float64Array(n);
  ewaldFourierChunk(setup, weighted, targetsAll(n), 0, n, acc, phi);
  return { setup, acc, phi };
}

describeKernelPaths('ewaldFinalizeAll', () => {
  it('equals unsorting into zeroed arrays and ewaldFinalize with them and the other parts, bit for bit', () => {
    const rand = randomSeeded(3);
    const part = { acc: Float64Array.from({ length: 3 * n }, () => rand() - 0.5), phi: Float64Array.from({ length: n }, () => rand()) };
    const a = runToFinish();
    ewaldFinalizeAll(a.setup, a.acc, a.phi, [part]);
    const b = runToFinish();
    const own = { acc: new Float64Array(3 * n), phi: new Float64Array(n) };
    ewaldAllRealAddUnsorted(b.setup, own.acc, own.phi);
    ewaldFinalize(b.setup, targetsAll(n), b.acc, b.phi, [own, part]);
    expect(Array.from(a.acc)).toEqual(Array.from(b.acc));
    expect(Array.from(a.phi)).toEqual(Array.from(b.phi));
    expect(a.acc.some((v) => v !== 0)).toBe(true);
  });
});
