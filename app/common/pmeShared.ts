/**
 * The shared memory of a multi-threaded particle-mesh Ewald run, for both front ends (the CLI's
 * worker_threads, the browser's web workers): the coordinating thread makes it from its setup
 * (pmeSharedStart) and posts the setup message; each helper joins it (pmeSharedJoin) with a pinned setup
 * over the same cell list, so nothing is re-sorted. No node: imports, no DOM.
 */
import type { Box } from '../../engine/box';
import { boxMake } from '../../engine/box';
import {
  type PmeParams,
  type PmeSetup,
  type PmeSetupShared,
  pmeMeshLength,
  pmeScratch,
  pmeSetupPinned,
  pmeSpreadBlocks,
} from '../../engine/pme/index';
import { PME_PHASES, type PmeShared } from './pmePhases';
import { sharedArray, sharedCopy } from './sharedMemory';

/** What a helper needs to join a run (every big array in shared memory: posted without copying). */
export interface PmeSetupMessage {
  readonly type: 'setup';
  /** The coordinating setup's wrapped positions and the masses (read only). */
  readonly positions: SharedArrayBuffer;
  readonly masses: SharedArrayBuffer;
  readonly box: readonly [number, number, number];
  readonly params: PmeParams;
  /** The coordinating setup's cell list (over shared memory) and small tables (copied). */
  readonly reuse: PmeSetupShared;
  readonly mesh: SharedArrayBuffer;
  readonly acc: SharedArrayBuffer;
  readonly phi: SharedArrayBuffer;
  readonly counters: SharedArrayBuffer;
  readonly cuts: SharedArrayBuffer | null;
  /** The run's stop flag (one Int32), when the coordinator was given one. */
  readonly stop?: SharedArrayBuffer;
}

/** The setup's cell list with its big arrays in shared memory (shared, not copied, when they already are), and its tables. */
export function pmeReuseShared(setup: PmeSetup): PmeSetupShared {
  const c = setup.cells;
  return {
    cells: { ...c, xyzm: sharedArray(c.xyzm), order: sharedArray(c.order), slot: sharedArray(c.slot), start: sharedArray(c.start) },
    influence: setup.influence,
    selfForce: setup.selfForce,
  };
}

/** Spreading blocks: several per thread for balance, fewer when the mesh is thin, null (one unit) at worst. */
export function pmeSpreadCuts(setup: PmeSetup, threads: number): Int32Array | null {
  for (let perThread = 4; perThread >= 1; perThread--) {
    const cuts = pmeSpreadBlocks(setup, 2 * threads * perThread);
    if (cuts) return cuts;
  }
  return pmeSpreadBlocks(setup, 2);
}

/** The big zeroed shared buffers of a run: mesh, sorted accelerations (3N) and potentials (N). */
export interface PmeSharedBuffers {
  readonly mesh: SharedArrayBuffer;
  readonly acc: SharedArrayBuffer;
  readonly phi: SharedArrayBuffer;
}

/** Fresh buffers for a mesh of `meshLength` numbers (pmeMeshLengthOf) and n particles. */
export function pmeSharedBuffers(meshLength: number, n: number): PmeSharedBuffers {
  return { mesh: new SharedArrayBuffer(8 * meshLength), acc: new SharedArrayBuffer(24 * n), phi: new SharedArrayBuffer(8 * n) };
}

/**
 * The coordinating thread's view of a run on `threads` threads (mesh, sorted sums, phase counters and
 * spreading blocks in shared memory) and, when `helpers` is true, the message that lets helpers join it.
 */
export function pmeSharedStart(
  setup: PmeSetup,
  masses: Float64Array,
  box: Box,
  threads: number,
  helpers: boolean,
  buffers: PmeSharedBuffers = pmeSharedBuffers(pmeMeshLength(setup), masses.length),
  stop?: SharedArrayBuffer,
): { mine: PmeShared; message: PmeSetupMessage | null } {
  const { mesh, acc, phi } = buffers;
  if (mesh.byteLength !== 8 * pmeMeshLength(setup) || acc.byteLength !== 24 * masses.length) throw new RangeError('pmeSharedStart: buffers of another size');
  const counters = new SharedArrayBuffer(4 * PME_PHASES.length);
  const cutsArray = pmeSpreadCuts(setup, threads);
  const cuts = cutsArray ? sharedCopy(cutsArray) : null;
  const mine: PmeShared = {
    setup,
    mesh: new Float64Array(mesh),
    accSorted: new Float64Array(acc),
    phiSorted: new Float64Array(phi),
    counters: new Int32Array(counters),
    cuts: cuts ? new Int32Array(cuts) : null,
    scratch: pmeScratch(setup),
    stop: stop ? new Int32Array(stop) : undefined,
  };
  const message: PmeSetupMessage | null = helpers
    ? {
        type: 'setup',
        positions: sharedCopy(setup.positions),
        masses: sharedCopy(masses),
        box: [box.lx, box.ly, box.lz],
        params: setup.params,
        reuse: pmeReuseShared(setup),
        mesh,
        acc,
        phi,
        counters,
        cuts,
        stop,
      }
    : null;
  return { mine, message };
}

/** A helper's view of the run described by `msg`: a pinned setup (same parameters and order) over its buffers. */
export function pmeSharedJoin(msg: PmeSetupMessage): PmeShared {
  const setup = pmeSetupPinned(new Float64Array(msg.positions), new Float64Array(msg.masses), boxMake(...msg.box), msg.params, msg.reuse);
  return {
    setup,
    mesh: new Float64Array(msg.mesh),
    accSorted: new Float64Array(msg.acc),
    phiSorted: new Float64Array(msg.phi),
    counters: new Int32Array(msg.counters),
    cuts: msg.cuts ? new Int32Array(msg.cuts) : null,
    scratch: pmeScratch(setup),
    stop: msg.stop ? new Int32Array(msg.stop) : undefined,
  };
}
