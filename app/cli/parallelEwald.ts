/**
 * Ewald forces on this thread and threads − 1 worker_threads over shared memory. Scheduling only: the
 * numerics are the engine's (ewald.ts), run in the same pieces as ewaldForces on one thread:
 *   choose (here: wrap, parameters, k-vectors; the workers, which ewaldThreadsWarm may have started
 *   while the snapshot was read, start on the structure factor at once) → cell list (here, meanwhile) →
 *   structure-factor units, then real-space cell units and Fourier units, which every thread takes from
 *   shared counters (ewaldUnits.ts) → each worker unsorts its real-space sums → finalize here (adding this
 *   thread's and the workers' sums, ewaldFinalizeAll) and the weak-field refinement (on this thread for a
 *   few targets, else a second threaded run on the same workers).
 */
import { Worker } from 'node:worker_threads';
import { type Box } from '../../engine/box';
import {
  type EwaldChecked,
  type EwaldChosen,
  type EwaldResult,
  type EwaldSetup,
  type Progress,
  ewaldFinalizeAll,
  ewaldChoose,
  ewaldFinalize,
  ewaldForces,
  ewaldWeakFind,
  ewaldWeakReplace,
  ewaldSetupBuild,
  ewaldSetupRefine,
  ewaldTargetsRun,
  ewaldTargetsValidate,
} from '../../engine/ewald/ewald';
import { targetsAll, targetsAreAll } from '../../engine/targets';
import type { EwaldOptions } from '../../engine/ewald/params';
import { CTL_STOP, type RunCursor, runUnits, structureUnitsRun, unitsPlan, unitsShared, weightedWaitSlot } from './ewaldUnits';
import type { WorkerReply, WorkerRequest } from './parallelProtocol';
import { sharedArray } from '../common/sharedMemory';
import { PhaseClock, phaseLines, phaseTotals } from './phaseTiming';
import { WORKER_URL, defaultThreads, warmClockTake, warmTake, workerStart } from './workerWarm';

/** Weak-field refinements of at most this many targets run on this thread alone (no round trip to the workers). */
const REFINE_HERE_MAX = 64;

/** Runs below this many particles stay on one thread. */
const THREADED_MIN_PARTICLES = 2048;

/** The first half of the setup with its arrays in shared memory and without this thread's WebAssembly context. */
function chosenShared(c: EwaldChosen): EwaldChosen {
  const { kspace } = c;
  return {
    box: c.box,
    positions: sharedArray(c.positions),
    masses: sharedArray(c.masses),
    wrapped: c.wrapped,
    params: c.params,
    totalMass: c.totalMass,
    kspace: {
      ...kspace,
      colHx: sharedArray(kspace.colHx),
      colHy: sharedArray(kspace.colHy),
      colHz0: sharedArray(kspace.colHz0),
      colHz1: sharedArray(kspace.colHz1),
      colK0: sharedArray(kspace.colK0),
      weight: sharedArray(kspace.weight),
    },
  };
}

/** The second half of the setup (cell list, kernel table) in shared memory, for a 'run' message. */
function buildShared(s: EwaldSetup): Pick<EwaldSetup, 'params' | 'cells' | 'kernel'> {
  const { cells, kernel } = s;
  return {
    params: s.params,
    cells: { ...cells, xyzm: sharedArray(cells.xyzm), order: sharedArray(cells.order), slot: sharedArray(cells.slot), start: sharedArray(cells.start), stencil: sharedArray(cells.stencil) },
    kernel: { ...kernel, table: { ...kernel.table, coef: sharedArray(kernel.table.coef) } },
  };
}

/** Workers with a FIFO of pending replies each (a worker answers its messages in order). */
class Pool {
  private workers: Worker[] = [];
  private pending: { resolve: (r: WorkerReply) => void; reject: (e: Error) => void }[][] = [];

  constructor(count: number, url: URL) {
    const ready = warmTake(count, url);
    for (let i = 0; i < count; i++) {
      const w = ready[i] ?? workerStart(url);
      w.ref();
      const queue: (typeof this.pending)[number] = [];
      w.on('message', (r: WorkerReply) => {
        const p = queue.shift();
        if (!p) return;
        if (r.type === 'error') p.reject(new Error(r.message));
        else p.resolve(r);
      });
      w.on('error', (e) => {
        const err = e instanceof Error ? e : new Error(String(e));
        for (const p of queue.splice(0)) p.reject(err);
      });
      w.on('exit', (code) => {
        for (const p of queue.splice(0)) p.reject(new Error(`force worker stopped (exit code ${code})`));
      });
      this.workers.push(w);
      this.pending.push(queue);
    }
  }

  get size(): number {
    return this.workers.length;
  }

  send(i: number, msg: WorkerRequest): Promise<WorkerReply> {
    return new Promise((resolve, reject) => {
      this.pending[i].push({ resolve, reject });
      this.workers[i].postMessage(msg);
    });
  }

  /** Stops the workers without waiting for their exit (nothing of theirs is needed any more). */
  close(): void {
    for (const w of this.workers) {
      w.unref();
      void w.terminate();
    }
  }
}

/**
 * One threaded run on the pool: raw sums (before finalizing) for targets `tg` (input rows; `all`: every
 * particle in order, symmetric real space), in fresh arrays. In an all-particle run acc/phi hold the
 * Fourier sums; this thread's real-space sums stay in its setup and the workers' come apart (workerParts,
 * input order): ewaldFinalizeAll adds both. `checked` as for ewaldSetup.
 */
async function threadedRun(
  pool: Pool,
  threads: number,
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  tg: Int32Array,
  all: boolean,
  options: EwaldOptions,
  checked?: EwaldChecked,
  clock?: PhaseClock,
  onProgress?: Progress,
): Promise<{ setup: EwaldSetup; acc: Float64Array; phi: Float64Array; workerParts: { acc: Float64Array; phi: Float64Array }[]; workerUnits: number }> {
  const n = masses.length;
  const K = tg.length;
  const opts = { ...options, sharedMemory: true };
  let stopFlag: Int32Array | null = null;
  try {
    const chosen = ewaldChoose(positions, masses, box, opts, all ? n : K, checked);
    const [gx, gy, gz] = chosen.params.cells;
    const plan = unitsPlan(n, K, gx * gy * gz, threads, all);
    const shared = unitsShared(threads, chosen.kspace.count);
    stopFlag = new Int32Array(shared.ctl);
    // Every reply of a worker, so that a failing worker ends the waits below instead of leaving them hanging.
    const replies: Promise<WorkerReply>[] = [];
    const track = (r: Promise<WorkerReply>) => {
      r.catch(() => undefined); // awaited below, unless this thread fails first (then the workers are stopped)
      replies.push(r);
    };
    const plainChosen = chosenShared(chosen);
    for (let i = 0; i < pool.size; i++) track(pool.send(i, { type: 'structure', chosen: plainChosen, plan, shared, thread: i + 1 }));
    clock?.mark('choose');
    const setup = ewaldSetupBuild(chosen, opts, checked);
    const accBuf = new SharedArrayBuffer(8 * 3 * K);
    const phiBuf = new SharedArrayBuffer(8 * K);
    const tgShared = sharedArray(tg);
    const built = buildShared(setup);
    // All-particle runs: each worker unsorts its real-space sums into buffers of its own when its units are
    // done; ewaldFinalizeAll adds them after this thread's own (per particle, the same additions as
    // unsorting them all here).
    const parts = Array.from({ length: all ? pool.size : 0 }, () => ({ acc: new SharedArrayBuffer(8 * 3 * n), phi: new SharedArrayBuffer(8 * n) }));
    for (let i = 0; i < pool.size; i++) {
      track(pool.send(i, { type: 'run', ...built, targets: tgShared.buffer as SharedArrayBuffer, acc: accBuf, phi: phiBuf, realAcc: parts[i]?.acc, realPhi: parts[i]?.phi }));
    }
    const failed = Promise.all(replies).then(() => new Promise<never>(() => undefined));
    failed.catch(() => undefined); // raced below; every reply is also awaited
    clock?.mark('setup (cell list, table)');
    structureUnitsRun(setup, plan, shared, 0);
    clock?.mark('structure (own part)');
    const acc = new Float64Array(accBuf);
    const phi = new Float64Array(phiBuf);
    const cursor: RunCursor = { held: -1, ran: 0 };
    const onUnit = onProgress ? (taken: number, total: number) => onProgress(taken / total) : undefined;
    while (!runUnits(setup, plan, shared, tg, acc, phi, cursor, onUnit)) {
      // Another thread is still on its structure-factor units or weighing the sum: wait without blocking
      // this thread's event loop, so that a worker's failure still arrives.
      const wait = weightedWaitSlot(plan, stopFlag);
      if (!wait) continue;
      const w = Atomics.waitAsync(stopFlag, wait[0], wait[1], 200);
      if (w.async) await Promise.race([w.value, failed]);
    }
    const workerUnits = (await Promise.all(replies)).reduce((u, r) => u + (r.type === 'ran' ? r.units : 0), 0);
    clock?.mark(all ? 'real + fourier, collect' : 'targets');
    // Every worker has replied, so nothing writes into the shared arrays any more: they are returned as
    // they are (a copy would touch fresh memory, ~15 µs per 4 KiB page on these machines).
    const workerParts = parts.map((q) => ({ acc: new Float64Array(q.acc), phi: new Float64Array(q.phi) }));
    return { setup, acc, phi, workerParts, workerUnits };
  } catch (e) {
    if (stopFlag) Atomics.store(stopFlag, CTL_STOP, 1); // the workers stop taking units
    throw e;
  }
}

/** ewaldForcesThreads' result: the engine's, and how many units of work the workers ran (0 on one thread). */
export interface EwaldThreadsResult extends EwaldResult {
  readonly workerUnits?: number;
}

/**
 * Accelerations (G·mass/length²) and potentials (zero-mean) for `targets` (input rows; null = all) on
 * `threads` threads: this one and threads − 1 workers (threads = 1, or fewer than 2048 particles: this
 * thread alone, ewaldForces). Same results as ewaldForces up to rounding.
 * workerUrl: the compiled worker module (defaults to forceWorker.mjs beside this bundle).
 */
export async function ewaldForcesThreads(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: EwaldOptions,
  threads: number = defaultThreads(),
  onProgress?: Progress,
  workerUrl: URL = WORKER_URL,
): Promise<EwaldThreadsResult> {
  const n = masses.length;
  if (threads <= 1 || n < THREADED_MIN_PARTICLES) {
    warmTake(-1, workerUrl);
    return ewaldForces(positions, masses, box, targets, options, onProgress);
  }
  const tg = targets ?? targetsAll(n);
  if (targets) ewaldTargetsValidate(tg, n);
  const all = !targets || targetsAreAll(tg, n);
  const clock = warmClockTake();
  clock.mark('warm→threads (read, validate)');
  // This thread computes too: threads − 1 workers.
  const pool = new Pool(threads - 1, workerUrl);
  try {
    const run = await threadedRun(pool, threads, positions, masses, box, tg, all, options, undefined, clock, onProgress);
    const { setup, acc, phi } = run;
    if (all) ewaldFinalizeAll(setup, acc, phi, run.workerParts);
    else ewaldFinalize(setup, tg, acc, phi);
    clock.mark('finalize');
    // Weak-field refinement (the engine's rule, ewaldRefineWeak): a few targets (the usual case) here on
    // the run's own particles and cell list; many on all threads.
    const weak = ewaldWeakFind(tg, acc, setup.params, options);
    if (weak && weak.rows.length <= REFINE_HERE_MAX) {
      ewaldWeakReplace(weak, ewaldTargetsRun(ewaldSetupRefine(setup, { ...options, tol: weak.tol }, weak.rows.length), weak.rows), acc, phi);
    } else if (weak) {
      const r = await threadedRun(pool, threads, positions, masses, box, weak.rows, false, { ...options, tol: weak.tol }, { clustering: setup.params.clustering });
      ewaldFinalize(r.setup, weak.rows, r.acc, r.phi);
      ewaldWeakReplace(weak, r, acc, phi);
    }
    const refined = weak ? weak.rows.length : 0;
    clock.mark(`refine (${refined})`);
    if (clock.enabled) {
      const timings = await Promise.all(Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'timing' })));
      timings.forEach((r, i) => r.type === 'timing' && process.stderr.write(phaseLines(`worker${i}`, phaseTotals(r.records))));
      process.stderr.write(phaseLines('main', clock.records));
    }
    return { targets: tg, acc, phi, params: setup.params, wrapped: setup.wrapped, refined, workerUnits: run.workerUnits };
  } finally {
    pool.close();
  }
}
