/**
 * pmeForcesThreads (worker threads over the built dist-cli/pmeWorker.mjs) against pmeForces on this thread:
 * the same pieces in the same sorted order, so equal up to summation order (1e-12 relative), and the
 * worker really shares the work (a scheduling slip once let this thread take every unit before the
 * worker was even told about the phase: same numbers, no speed-up).
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { pmeForcesThreads } from '../../app/cli/parallelPme';
import { pmePhaseRun } from '../../app/common/pmePhases';
import { pmeSharedStart } from '../../app/common/pmeShared';
import { pagesTouch, pagesTouchUnits } from '../../app/common/sharedMemory';
import { pmeForces, pmeMeshLength, pmeMeshLengthOf, pmeSetup } from '../../engine/pme/index';
import { snapshotClustered } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';
import { ROOT, cliEnsureBuilt } from './cliHarness';

const workerUrl = pathToFileURL(join(ROOT, 'dist-cli', 'pmeWorker.mjs'));

beforeAll(() => cliEnsureBuilt());

describe('pmeForcesThreads on 2 threads (this one and a worker)', () => {
  it('the one-thread values to 1e-12, with the worker running a share of the work units', async () => {
    const s = snapshotClustered(20000, 4, [1, 1.2, 0.9]);
    const options = { tol: 1e-5 };
    const two = await pmeForcesThreads(s.positions, s.masses, s.box, options, 2, undefined, workerUrl);
    const one = pmeForces(s.positions, s.masses, s.box, options);
    expect(two.threadsUsed).toBe(2);
    expect(maxVectorRelativeError(two.acc, one.acc)).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(two.phi, one.phi)).toBeLessThan(1e-12);
    // Thousands of units (2048 real-space chunks alone) are handed out one at a time; the worker is told
    // of each phase before this thread starts on it, so it takes some (without the fix: exactly 0).
    expect(two.workerUnits).toBeGreaterThan(0);
  });
});

describe('paging in the shared buffers ahead of a run', () => {
  it('pagesTouch hands out every 1 MiB block once over threads sharing the counter and leaves the buffers zero', () => {
    const buffers = [new SharedArrayBuffer(3 * 2 ** 20 + 5), new SharedArrayBuffer(100)];
    expect(pagesTouchUnits(buffers)).toBe(5); // 4 blocks (the last one 5 bytes) + 1
    const counter = new Int32Array(new SharedArrayBuffer(4));
    const first = pagesTouch(buffers, counter);
    const second = pagesTouch(buffers, counter); // a late thread finds nothing left
    expect([first, second]).toEqual([5, 0]);
    for (const b of buffers) expect(new Uint8Array(b).every((v) => v === 0)).toBe(true);
  });

  it('pmeMeshLengthOf(params) is the mesh buffer length of the setup those parameters build', () => {
    const s = snapshotClustered(3000, 2, [1, 1.5, 0.7]);
    const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-5 });
    expect(pmeMeshLengthOf(setup.params)).toBe(pmeMeshLength(setup));
  });
});

describe('the stop flag of a shared run', () => {
  it('a thread takes no unit once the flag is set, and all of them while it is clear', () => {
    const s = snapshotClustered(3000, 3, [1, 1, 1]);
    const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-4 });
    const stop = new SharedArrayBuffer(4);
    const { mine, message } = pmeSharedStart(setup, s.masses, s.box, 2, true, undefined, stop);
    expect(message!.stop).toBe(stop); // helpers get the same flag
    new Int32Array(stop)[0] = 1;
    expect(pmePhaseRun(mine, 'interpolate')).toBe(0);
    new Int32Array(stop)[0] = 0;
    expect(pmePhaseRun(mine, 'interpolate')).toBeGreaterThan(0);
  });
});
