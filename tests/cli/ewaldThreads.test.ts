/**
 * ewaldForcesThreads (worker threads over the built dist-cli/forceWorker.mjs) against ewaldForces on this
 * thread: same pieces, so equal up to summation order (1e-12 relative in accelerations, 1e-12 of rms φ),
 * for all targets and for a subset (the per-target path, whose chunks wait for the weighted structure
 * factor), with and without a prestarted (warm) pool, and through both routes of the weak-field
 * refinement (a few targets on this thread over the run's own cell list; many on all threads).
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { ewaldForcesThreads } from '../../app/cli/parallelEwald';
import { ewaldThreadsWarm } from '../../app/cli/workerWarm';
import { ewaldForces } from '../../engine/ewald/ewald';
import { boxMake, randomSeeded } from '../../engine/index';
import { snapshotClustered, snapshotUniform } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';
import { ROOT, cliEnsureBuilt } from './cliHarness';

const workerUrl = pathToFileURL(join(ROOT, 'dist-cli', 'forceWorker.mjs'));
const s = snapshotClustered(3001, 9, [1, 1.3, 0.8]);

beforeAll(() => cliEnsureBuilt());

describe('ewaldForcesThreads on 2 threads (this one and a worker)', () => {
  it('all targets, spline softening, warm pool: the one-thread values to 1e-12', async () => {
    const options = { tol: 1e-7, softening: { kind: 'spline', h: 0.02 } } as const;
    ewaldThreadsWarm(2, workerUrl);
    const two = await ewaldForcesThreads(s.positions, s.masses, s.box, null, options, 2, undefined, workerUrl);
    const one = ewaldForces(s.positions, s.masses, s.box, null, options);
    expect(maxVectorRelativeError(two.acc, one.acc)).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(two.phi, one.phi)).toBeLessThan(1e-12);
    expect(two.params.alpha).toBe(one.params.alpha);
    // the worker took units from the shared counters (a scheduling bug can leave it idle with equal numbers)
    expect(two.workerUnits).toBeGreaterThan(0);
  });

  it('a subset of 700 targets (odd rows), no warm pool: the one-thread values to 1e-12, in target order', async () => {
    const targets = Int32Array.from({ length: 700 }, (_, t) => 2 * t + 1);
    const two = await ewaldForcesThreads(s.positions, s.masses, s.box, targets, { tol: 1e-6 }, 2, undefined, workerUrl);
    const one = ewaldForces(s.positions, s.masses, s.box, targets, { tol: 1e-6 });
    expect(Array.from(two.targets)).toEqual(Array.from(targets));
    expect(maxVectorRelativeError(two.acc, one.acc)).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(two.phi, one.phi)).toBeLessThan(1e-12);
  });

  it('a uniform snapshot with 2 weak-field particles, refined on this thread: the one-thread values to 1e-12', async () => {
    const u = snapshotUniform(3001, 2, [1, 1.3, 0.8]);
    const two = await ewaldForcesThreads(u.positions, u.masses, u.box, null, { tol: 1e-6 }, 2, undefined, workerUrl);
    const one = ewaldForces(u.positions, u.masses, u.box, null, { tol: 1e-6 });
    expect(two.refined).toBe(2);
    expect(one.refined).toBe(2);
    expect(maxVectorRelativeError(two.acc, one.acc)).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(two.phi, one.phi)).toBeLessThan(1e-12);
  });

  it('a perturbed lattice (every particle weak-field), refined on all threads: within tol of the reference, the one-thread values to rounding', async () => {
    // 16³ particles on a grid displaced by up to ±1 % of the spacing: forces far below the Holtsmark scale.
    const g = 16, n = g ** 3, rand = randomSeeded(7), positions = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const c = [i % g, Math.floor(i / g) % g, Math.floor(i / (g * g))];
      for (let d = 0; d < 3; d++) positions[3 * i + d] = (c[d] + 0.5 + 0.02 * (rand() - 0.5)) / g;
    }
    const masses = new Float64Array(n).fill(1 / n);
    const two = await ewaldForcesThreads(positions, masses, boxMake(1), null, { tol: 1e-6 }, 2, undefined, workerUrl);
    const one = ewaldForces(positions, masses, boxMake(1), null, { tol: 1e-6 });
    expect(two.refined).toBe(n);
    // The promise: every particle within tol of a tol = 1e-13 evaluation.
    const ref = ewaldForces(positions, masses, boxMake(1), null, { tol: 1e-13 });
    expect(maxVectorRelativeError(two.acc, ref.acc)).toBeLessThan(1e-6);
    // The two routes sum the same terms in other orders. The terms are of the order of the acceleration
    // scale while each |a| here lies far below it (near-cancelling lattice), so rounding is bounded relative
    // to the scale, not to |a| (measured: 1.8e-13 of the scale, 1e-11 of the smallest |a|).
    let worst = 0;
    for (let k = 0; k < 3 * n; k++) worst = Math.max(worst, Math.abs(two.acc[k] - one.acc[k]));
    expect(worst / two.params.accelerationScale).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(two.phi, one.phi)).toBeLessThan(1e-12);
  });

  it('a worker module that cannot be loaded (warm or not): the call rejects instead of waiting forever', async () => {
    const missing = pathToFileURL(join(ROOT, 'dist-cli', 'no-such-worker.mjs'));
    ewaldThreadsWarm(2, missing);
    await new Promise((r) => setTimeout(r, 200));
    await expect(ewaldForcesThreads(s.positions, s.masses, s.box, null, { tol: 1e-4 }, 2, undefined, missing)).rejects.toThrow();
    await expect(ewaldForcesThreads(s.positions, s.masses, s.box, null, { tol: 1e-4 }, 2, undefined, missing)).rejects.toThrow();
  });

  it('a warm pool of another size is replaced, and bad input still fails with the engine error', async () => {
    ewaldThreadsWarm(3, workerUrl);
    const p = Float64Array.from(s.positions);
    p.set(p.subarray(0, 3), 3 * 5);
    await expect(ewaldForcesThreads(p, s.masses, s.box, null, {}, 2, undefined, workerUrl)).rejects.toThrow(/particles 0 and 5 sit at the same position/);
  });
});
