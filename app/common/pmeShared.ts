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

/** The typed array's bytes in shared memory: its own buffer when it already is one (whole), else a copy. */
export function sharedCopy(a: Float64Array | Int32Array): SharedArrayBuffer {
  if (a.buffer instanceof SharedArrayBuffer && a.byteOffset === 0 && a.byteLength === a.buffer.byteLength) return a.buffer;
  const buf = new SharedArrayBuffer(a.byteLength);
  new Uint8Array(buf).set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  return buf;
}

/** The setup's cell list with its big arrays in shared memory (shared, not copied, when they already are), and its tables. */
export function pmeReuseShared(setup: PmeSetup): PmeSetupShared {
  const c = setup.cells;
  const view = <T extends Float64Array | Int32Array>(a: T, make: new (b: SharedArrayBuffer) => T): T => {
    const b = sharedCopy(a);
    return b === a.buffer ? a : new make(b);
  };
  return {
    cells: {
      ...c,
      xyzm: view(c.xyzm, Float64Array),
      order: view(c.order, Int32Array),
      slot: view(c.slot, Int32Array),
      start: view(c.start, Int32Array),
    },
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

/** Bytes per unit of pagesTouch. */
const TOUCH_BLOCK = 1 << 20;

/** Units of pagesTouch over these buffers (1 MiB blocks). */
export function pagesTouchUnits(buffers: readonly SharedArrayBuffer[]): number {
  return buffers.reduce((s, b) => s + Math.ceil(b.byteLength / TOUCH_BLOCK), 0);
}

/**
 * Writes a zero into every 4 KiB page of the buffers (still all zero), taking 1 MiB blocks from
 * counter[0] until none are left: the operating system supplies fresh memory on first write, at
 * ~3 ms per MB on the project machine, and this lets an idle thread pay that ahead of time. Returns the
 * blocks this thread touched.
 */
export function pagesTouch(buffers: readonly SharedArrayBuffer[], counter: Int32Array): number {
  const total = pagesTouchUnits(buffers);
  for (let ran = 0; ; ran++) {
    let k = Atomics.add(counter, 0, 1);
    if (k >= total) return ran;
    for (const b of buffers) {
      const blocks = Math.ceil(b.byteLength / TOUCH_BLOCK);
      if (k >= blocks) {
        k -= blocks;
        continue;
      }
      const bytes = new Uint8Array(b, k * TOUCH_BLOCK, Math.min(TOUCH_BLOCK, b.byteLength - k * TOUCH_BLOCK));
      for (let o = 0; o < bytes.length; o += 4096) bytes[o] = 0;
      break;
    }
  }
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
