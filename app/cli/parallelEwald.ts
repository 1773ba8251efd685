/**
 * Ewald forces on this thread and threads − 1 worker_threads over shared memory. Scheduling only: the
 * numerics are the engine's (ewald.ts), run in the same pieces as ewaldForces on one thread:
 *   setup (here, once; its arrays are shared with the workers, which ewaldThreadsWarm may have started
 *   while the snapshot was read) → partial structure factors over source ranges (one per thread, summed
 *   here, while the workers go on with real-space cells) → real-space cell chunks, then Fourier chunks,
 *   taken from one queue by every thread → unsort + finalize here.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { type Box } from '../../engine/box';
import {
  type EwaldResult,
  type EwaldSetup,
  type Progress,
  ewaldAllRealChunk,
  ewaldAllRealCollect,
  ewaldCellCount,
  ewaldFourierChunk,
  ewaldStructureFactor,
  ewaldTargetsChunk,
  ewaldFinalize,
  ewaldForces,
  ewaldRefineWeak,
  ewaldSetup,
  ewaldTargetsValidate,
  ewaldUnsort,
  ewaldWeighStructureFactor,
} from '../../engine/ewald/ewald';
import type { EwaldOptions } from '../../engine/ewald/params';
import { kernelModule } from '../../engine/wasm/module';
import type { WorkerReply, WorkerRequest } from './parallelProtocol';
import { sharedArray } from '../common/sharedMemory';
import { PhaseClock, phaseLines, phaseTotals, threadTimes, timingEnabled } from './phaseTiming';

/** Default thread count: all cores. */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

/** Runs below this many particles stay on one thread. */
const THREADED_MIN_PARTICLES = 2048;

/** The setup with its arrays in shared memory and without this thread's WebAssembly contexts. */
function setupShared(s: EwaldSetup): EwaldSetup {
  const { cells, kernel, kspace } = s;
  return {
    ...s,
    positions: sharedArray(s.positions),
    masses: sharedArray(s.masses),
    cells: { ...cells, xyzm: sharedArray(cells.xyzm), order: sharedArray(cells.order), slot: sharedArray(cells.slot), start: sharedArray(cells.start), stencil: sharedArray(cells.stencil) },
    kernel: { ...kernel, table: { ...kernel.table, coef: sharedArray(kernel.table.coef) } },
    kspace: {
      ...kspace,
      colHx: sharedArray(kspace.colHx),
      colHy: sharedArray(kspace.colHy),
      colHz0: sharedArray(kspace.colHz0),
      colHz1: sharedArray(kspace.colHz1),
      colK0: sharedArray(kspace.colK0),
      weight: sharedArray(kspace.weight),
    },
    kWasm: undefined,
    rWasm: undefined,
    allSorted: undefined,
  };
}

const WORKER_URL = new URL('./forceWorker.mjs', import.meta.url);
/** Workers started ahead. */
interface WarmPool {
  url: string;
  workers: Worker[];
  broken: boolean;
}
let warm: WarmPool | null = null;
let warmClock: PhaseClock | null = null;

/**
 * Starts the threads − 1 workers of a coming ewaldForcesThreads call now (e.g. before the snapshot is read),
 * so that their start-up overlaps the reading. Unused workers do not keep the process alive; a later
 * call with another count or URL, or a run that stays on one thread, terminates them.
 */
export function ewaldThreadsWarm(threads: number, workerUrl: URL = WORKER_URL): void {
  if (timingEnabled()) {
    const [cpu, wait] = threadTimes();
    process.stderr.write(phaseLines('main', [{ name: 'process-start→warm', wall: performance.now(), cpu, wait }]));
    warmClock = new PhaseClock();
    process.once('exit', () => {
      const [c, w] = threadTimes();
      process.stderr.write(phaseLines('main', [{ name: 'process total', wall: performance.now(), cpu: c, wait: w }]));
    });
  }
  if (threads <= 1 || warm) return;
  const workers = Array.from({ length: threads - 1 }, () => workerStart(workerUrl));
  const record: WarmPool = { url: workerUrl.href, workers, broken: false };
  for (const w of workers) {
    // A worker that fails or stops before it is used is replaced by a fresh one when the pool is made.
    w.on('error', () => (record.broken = true));
    w.on('exit', () => (record.broken = true));
    w.unref();
  }
  warm = record;
}

/**
 * A worker sharing this thread's compiled WebAssembly kernels: one compilation, and code that one thread
 * has optimised is optimised for all (this thread's weak-field refinement runs warm code).
 */
function workerStart(url: URL): Worker {
  return new Worker(url, { workerData: { kernelModule: kernelModule() } });
}

function warmTake(count: number, url: URL): Worker[] {
  const w = warm;
  warm = null;
  if (!w) return [];
  if (w.url !== url.href || w.workers.length !== count || w.broken) {
    for (const x of w.workers) void x.terminate();
    return [];
  }
  return w.workers;
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

  /**
   * Hands the tasks out in order: two lanes per worker (so a worker always has its next task queued) and
   * one lane in this thread, which runs its task with `local` and then yields to the event loop. `gate(task)`
   * is awaited before a task is taken on (for tasks that need data still being prepared).
   */
  async distribute(
    tasks: WorkerRequest[],
    gate: (t: WorkerRequest) => Promise<void> | void,
    local: (t: WorkerRequest) => void,
    onDone: (t: WorkerRequest) => void,
  ): Promise<void> {
    let next = 0;
    let failed = false;
    const guard = (lane: () => Promise<void>) =>
      lane().catch((e) => {
        failed = true; // the other lanes stop taking tasks
        throw e;
      });
    const remote = async (i: number) => {
      while (next < tasks.length && !failed) {
        const task = tasks[next++];
        await gate(task);
        await this.send(i, task);
        onDone(task);
      }
    };
    const here = async () => {
      while (next < tasks.length && !failed) {
        const task = tasks[next++];
        await gate(task);
        local(task);
        onDone(task);
        await new Promise((r) => setImmediate(r)); // let replies in and hand out the next tasks
      }
    };
    await Promise.all([guard(here), ...this.workers.flatMap((_, i) => [guard(() => remote(i)), guard(() => remote(i))])]);
  }

  /** Stops the workers without waiting for their exit (nothing of theirs is needed any more). */
  close(): void {
    for (const w of this.workers) {
      w.unref();
      void w.terminate();
    }
  }
}

/** Chunks [b, e) of [0, total) of about `step`, as tasks of the given type. */
function chunks(type: 'cells' | 'fourier' | 'targets', total: number, step: number): WorkerRequest[] {
  const out: WorkerRequest[] = [];
  for (let b = 0; b < total; b += step) out.push({ type, begin: b, end: Math.min(total, b + step) });
  return out;
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
): Promise<EwaldResult> {
  const n = masses.length;
  if (threads <= 1 || n < THREADED_MIN_PARTICLES) {
    warmTake(-1, workerUrl);
    return ewaldForces(positions, masses, box, targets, options, onProgress);
  }
  const tg = targets ?? Int32Array.from({ length: n }, (_, i) => i);
  ewaldTargetsValidate(tg, n);
  const all = tg.length === n && tg.every((v, i) => v === i);
  const clock = warmClock ?? new PhaseClock();
  warmClock = null;
  clock.mark('warm→threads (read, validate)');
  // This thread computes too: threads − 1 workers.
  const pool = new Pool(threads - 1, workerUrl);
  let setup: EwaldSetup;
  try {
    setup = ewaldSetup(positions, masses, box, { ...options, sharedMemory: true }, all ? n : tg.length);
  } catch (e) {
    pool.close();
    throw e;
  }
  clock.mark('setup');
  const K = tg.length;
  const accBuf = new SharedArrayBuffer(8 * 3 * K);
  const phiBuf = new SharedArrayBuffer(8 * K);
  try {
    const plain = setupShared(setup);
    const tgShared = sharedArray(tg);
    const ready = Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'setup', setup: plain, targets: tgShared.buffer as SharedArrayBuffer, acc: accBuf, phi: phiBuf }));
    // Structure factor: source range 0 here, range i + 1 on worker i; summed here while the workers go on.
    const range = (r: number) => [Math.floor((r * n) / threads), Math.floor(((r + 1) * n) / threads)];
    const parts = Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'structure', begin: range(i + 1)[0], end: range(i + 1)[1] }));
    clock.mark('share setup');
    const sHere = ewaldStructureFactor(setup, range(0)[0], range(0)[1]);
    clock.mark('structure (own part)');
    let weightedHere: Float64Array | null = null;
    const weightedReady = Promise.all(parts).then((replies) => {
      const s = sHere;
      for (const r of replies) if (r.type === 'structure') for (let k = 0; k < s.length; k++) s[k] += r.s[k];
      const weighted = sharedArray(ewaldWeighStructureFactor(setup, s));
      weightedHere = weighted;
      // Queued behind each worker's current tasks, so before any Fourier task it is given.
      for (let i = 0; i < pool.size; i++) pool.send(i, { type: 'weighted', weighted: weighted.buffer as SharedArrayBuffer }).catch(() => undefined);
      return weighted;
    });
    weightedReady.catch(() => undefined); // a failure surfaces where the Fourier tasks wait for it
    const gate = (t: WorkerRequest) => (t.type === 'cells' ? undefined : weightedReady.then(() => undefined));
    await Promise.all(ready);
    const acc = new Float64Array(accBuf);
    const phi = new Float64Array(phiBuf);
    const local = (t: WorkerRequest) => {
      if (t.type === 'cells') ewaldAllRealChunk(setup, t.begin, t.end);
      else if (t.type === 'fourier') ewaldFourierChunk(setup, weightedHere!, tg, t.begin, t.end, acc, phi);
      else if (t.type === 'targets') ewaldTargetsChunk(setup, weightedHere!, tg, t.begin, t.end, acc, phi);
    };
    if (all) {
      const nc = ewaldCellCount(setup);
      const cellTasks = chunks('cells', nc, Math.max(1, Math.ceil(nc / (threads * 24))));
      const fourierTasks = chunks('fourier', K, Math.max(64, Math.ceil(K / (threads * 24))));
      let realDone = 0, fourierDone = 0;
      await pool.distribute([...cellTasks, ...fourierTasks], gate, local, (t) => {
        if (t.type === 'cells') realDone += t.end - t.begin;
        else if (t.type === 'fourier') fourierDone += t.end - t.begin;
        onProgress?.(0.6 * (realDone / nc) + 0.4 * (fourierDone / K));
      });
      clock.mark('real + fourier');
      const collected = await Promise.all(Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'collect' })));
      const own = ewaldAllRealCollect(setup);
      ewaldUnsort(setup, own.accSorted, own.phiSorted, acc, phi);
      for (const r of collected) if (r.type === 'collected') ewaldUnsort(setup, r.accSorted, r.phiSorted, acc, phi);
      clock.mark('collect');
    } else {
      let done = 0;
      await pool.distribute(chunks('targets', K, Math.max(16, Math.ceil(K / (threads * 24)))), gate, local, (t) => {
        if (t.type === 'targets') done += t.end - t.begin;
        onProgress?.(done / K);
      });
      clock.mark('targets');
    }
    await weightedReady;
    const accOut = new Float64Array(acc);
    const phiOut = new Float64Array(phi);
    ewaldFinalize(setup, tg, accOut, phiOut);
    clock.mark('finalize');
    const refined = ewaldRefineWeak(positions, masses, box, tg, accOut, phiOut, setup.params, options);
    clock.mark(`refine (${refined})`);
    if (clock.enabled) {
      const timings = await Promise.all(Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'timing' })));
      timings.forEach((r, i) => r.type === 'timing' && process.stderr.write(phaseLines(`worker${i}`, phaseTotals(r.records))));
      process.stderr.write(phaseLines('main', clock.records));
    }
    return { targets: tg, acc: accOut, phi: phiOut, params: setup.params, wrapped: setup.wrapped, refined };
  } finally {
    pool.close();
  }
}
