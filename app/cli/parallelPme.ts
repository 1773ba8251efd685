/**
 * Particle-mesh Ewald on worker_threads over shared memory. Scheduling only; the numerics are the
 * engine's (engine/pme/pme.ts), in the same order of pieces as pmeForces on one thread:
 *   workers start loading → this thread chooses the parameters (pmeChoose, with the error model) → the
 *   workers page in the fresh shared mesh and sums while this thread builds the cell list and tables
 *   (pmeSetupBuild; it joins the paging after) → each worker makes a pinned setup from this one's cell
 *   list (shared memory) and tables (same sorted order) → phases, every one split over all threads (this
 *   one included) by a shared counter, with a barrier after each (app/common/pmePhases.ts): spreading in
 *   x-slab blocks of one parity at a time (disjoint mesh planes), FFT column blocks, spectrum slabs,
 *   column blocks, then interpolation (particle ranges) and the real-space sums (cell chunks) → each
 *   worker adds its real-space sums into the shared ones in turn → pmeFinalize.
 * Ctrl-C ends the process (workers included) with the default signal action; nothing is written before.
 */
import { Worker } from 'node:worker_threads';
import { type Box } from '../../engine/box';
import type { Progress } from '../../engine/ewald/ewald';
import {
  type PmeOptions,
  type PmeResult,
  pmeFinalize,
  pmeForces,
  pmePredictedErrors,
  pmeRealCollect,
  pmeChoose,
  pmeMeshLengthOf,
  pmeSetupBuild,
} from '../../engine/pme/index';
import { type PmePhase, pmePhaseRun } from '../common/pmePhases';
import { type PmeSetupMessage, pmeSharedBuffers, pmeSharedStart } from '../common/pmeShared';
import { pagesTouch } from '../common/sharedMemory';

/**
 * Largest automatic mesh on the command line (points): 10^8 (0.8 GB), larger than the engine's default
 * (a browser tab's budget), so that clustered 10^6-particle snapshots get a fine mesh and a short
 * real-space cutoff while two threads stay under 1.5 GB in all (measured: `npm run bench`).
 */
export const PME_CLI_MAX_MESH = 1e8;

/** Runs below this many particles stay on one thread (worker start-up costs more than it saves). */
export const PME_THREADED_MIN_PARTICLES = 8192;

export type PmeWorkerRequest =
  | { type: 'touch'; buffers: SharedArrayBuffer[]; counter: SharedArrayBuffer }
  | PmeSetupMessage
  | { type: 'phases'; phases: PmePhase[] }
  | { type: 'collect' };

/** `units`: work units the worker ran (for phases). */
export type PmeWorkerReply = { type: 'done'; units?: number } | { type: 'error'; message: string };

export interface PmeThreadsResult extends PmeResult {
  /** Threads that computed (this one included). */
  readonly threadsUsed: number;
  /** Work units of the phases run by the workers (0 on one thread; all of them would mean this thread idled). */
  readonly workerUnits?: number;
  /** Predicted acceleration error per particle (acceleration units; pmePredictedErrors), when threaded. */
  readonly predictedErrors?: Float64Array;
  /** Wall-clock seconds per stage: setup (parameters), spread, fft, interpolation + real space, finish. */
  readonly phases: Readonly<Record<string, number>>;
  /** CPU seconds of the process (all threads) per stage, when threaded. */
  readonly cpuPhases?: Readonly<Record<string, number>>;
}

/** One worker with a request/reply channel: replies come in request order (a FIFO of pending requests). */
class PmeWorkerHandle {
  private readonly worker: Worker;
  private readonly pending: { resolve: (r: PmeWorkerReply) => void; reject: (e: Error) => void }[] = [];
  private failed: Error | null = null;

  constructor(url: URL) {
    this.worker = new Worker(url);
    this.worker.on('message', (r: PmeWorkerReply) => {
      const p = this.pending.shift();
      if (r.type === 'error') p?.reject(new Error(r.message));
      else p?.resolve(r);
    });
    this.worker.on('error', (e) => {
      this.failed = e instanceof Error ? e : new Error(String(e));
      for (const p of this.pending.splice(0)) p.reject(this.failed);
    });
    this.worker.on('exit', (code) => {
      this.failed ??= new Error(`pme worker stopped (exit code ${code})`);
      for (const p of this.pending.splice(0)) p.reject(this.failed);
    });
  }

  send(msg: PmeWorkerRequest): Promise<PmeWorkerReply> {
    if (this.failed) return Promise.reject(this.failed);
    return new Promise((resolve, reject) => {
      this.pending.push({ resolve, reject });
      this.worker.postMessage(msg);
    });
  }

  close(): Promise<number> {
    return this.worker.terminate();
  }
}

/**
 * All-particle accelerations (G·mass/length², input order) and zero-mean potentials by particle-mesh
 * Ewald on `threads` threads (this one and threads − 1 workers; threads = 1 runs the same phases here
 * alone); fewer particles than `minParticles` run pmeForces here. Same results as pmeForces up to rounding.
 * workerUrl: the compiled worker module (defaults to pmeWorker.mjs beside this bundle).
 */
export async function pmeForcesThreads(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: PmeOptions,
  threads: number,
  onProgress?: Progress,
  workerUrl: URL = new URL('./pmeWorker.mjs', import.meta.url),
  minParticles: number = PME_THREADED_MIN_PARTICLES,
): Promise<PmeThreadsResult> {
  const n = masses.length;
  const t0 = performance.now();
  options = { maxMeshPoints: PME_CLI_MAX_MESH, ...options };
  if (n < minParticles) {
    const r = pmeForces(positions, masses, box, options, onProgress);
    return { ...r, threadsUsed: 1, phases: { total: (performance.now() - t0) / 1000 } };
  }
  const phases: Record<string, number> = {};
  const cpuPhases: Record<string, number> = {};
  let t = t0;
  let cpu = process.cpuUsage();
  const lap = (name: string) => {
    const now = performance.now();
    const c = process.cpuUsage(cpu);
    phases[name] = (now - t) / 1000;
    cpuPhases[name] = (c.user + c.system) / 1e6;
    t = now;
    cpu = process.cpuUsage();
  };
  // Workers load their module while the parameters are chosen here.
  const workers = Array.from({ length: Math.max(0, threads - 1) }, () => new PmeWorkerHandle(workerUrl));
  try {
    const choice = pmeChoose(positions, masses, box, { ...options, sharedMemory: workers.length > 0 });
    // The workers are idle until the setup is built: they have the run's fresh shared memory paged in
    // meanwhile (a first write costs ~3 ms per MB here; the mesh alone may be most of a gigabyte).
    const buffers = pmeSharedBuffers(pmeMeshLengthOf(choice.params), n);
    const touch = { type: 'touch' as const, buffers: [buffers.mesh, buffers.acc, buffers.phi], counter: new SharedArrayBuffer(4) };
    for (const w of workers) void w.send(touch).catch(() => undefined); // a failure resurfaces at the next request
    const setup = pmeSetupBuild(choice, masses, box);
    lap('setup');
    if (workers.length > 0) pagesTouch(touch.buffers, new Int32Array(touch.counter));
    const { mine, message } = pmeSharedStart(setup, masses, box, threads, workers.length > 0, buffers);
    // The workers loaded their module while the parameters were chosen; joining takes them tens of ms.
    // Every phase is posted to them before this thread runs its own (synchronous) share of it: a message
    // posted from a promise callback would only leave after that loop, with every unit already taken.
    await Promise.all(workers.map((w) => w.send(message!)));
    lap('touch');
    let workerUnits = 0;
    const stage = async (list: PmePhase[], from: number, to: number) => {
      const msg: PmeWorkerRequest = { type: 'phases', phases: list };
      const replies = workers.map((w) => w.send(msg).then((r) => void (workerUnits += r.type === 'done' ? (r.units ?? 0) : 0)));
      for (const p of list) {
        pmePhaseRun(mine, p, p === 'real' ? (done, total) => onProgress?.(from + ((to - from) * done) / total) : undefined);
      }
      await Promise.all(replies);
      onProgress?.(to);
    };
    await stage(['spreadEven'], 0, 0.05);
    await stage(['spreadOdd', 'spreadAll'], 0.05, 0.1);
    lap('spread');
    await stage(['forward'], 0.1, 0.15);
    await stage(['solve'], 0.15, 0.2);
    await stage(['inverse'], 0.2, 0.25);
    lap('fft');
    await stage(['interpolate', 'real'], 0.25, 0.98);
    lap('interpolateReal');
    // Each thread adds its real-space sums into the shared sorted sums, one thread after the other.
    pmeRealCollect(setup, mine.accSorted, mine.phiSorted);
    for (const w of workers) await w.send({ type: 'collect' });
    const { acc, phi } = pmeFinalize(setup, mine.accSorted, mine.phiSorted);
    const predicted = pmePredictedErrors(setup, acc);
    lap('finish');
    onProgress?.(1);
    return { acc, phi, params: setup.params, wrapped: setup.wrapped, predictedRmsRelativeError: predicted.rmsRelative, predictedErrors: predicted.perParticle, threadsUsed: workers.length + 1, workerUnits, phases, cpuPhases };
  } finally {
    await Promise.all(workers.map((w) => w.close()));
  }
}
