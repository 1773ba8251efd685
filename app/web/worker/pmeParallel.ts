/**
 * Particle-mesh Ewald in the compute worker with helper web workers over shared memory: the same
 * scheduling as the CLI's (app/cli/parallelPme.ts), the numerics the engine's. This thread chooses the
 * parameters (pmeSetup) while the helpers load; each helper makes a pinned setup from this one's cell list
 * (shared) and tables (copied); then every phase is split over all threads by a shared counter
 * (app/common/pmePhases.ts), with the helpers' replies as the barrier after each; the helpers' real-space
 * sums are added here and pmeFinalize runs here. Helpers are started per run and terminated after it.
 * Without cross-origin isolation (no SharedArrayBuffer) the run stays on this thread (pmeForces).
 * Cancel sets the request's stop flag (shared) and terminates the compute worker; every thread checks the
 * flag before each unit of work, so the nested helpers stop within a unit instead of finishing their
 * phase (the browser ends them with the compute worker).
 */
import type { Box } from '../../../engine/box';
import type { Progress } from '../../../engine/ewald/ewald';
import {
  type PmeOptions,
  type PmeResult,
  pmeFinalize,
  pmeForces,
  pmePredictedErrors,
  pmeRealCollect,
  pmeSetup,
} from '../../../engine/pme/index';
import { type PmePhase, pmePhaseRun } from '../../common/pmePhases';
import { pmeSharedStart } from '../../common/pmeShared';
import type { PmeHelperReply, PmeHelperRequest } from './pmeHelperHandle';

/** Most threads "auto" uses (this one included): more rarely pays in a tab that also draws. */
export const PME_WEB_MAX_THREADS = 4;

/** Runs below this many particles stay on one thread when the count is "auto" (start-up costs more than it saves). */
export const PME_WEB_THREADED_MIN_PARTICLES = 8192;

/** What the compute worker knows about where it runs. */
export interface PmeThreadsEnv {
  /** navigator.hardwareConcurrency (undefined or 0 when the browser does not say). */
  readonly hardwareConcurrency: number | undefined;
  /** self.crossOriginIsolated (SharedArrayBuffer usable). */
  readonly isolated: boolean;
}

/**
 * Threads for a run (this one included): 1 without cross-origin isolation; else the requested count, or
 * for "auto" (undefined) min(hardwareConcurrency, 4) when there are at least 8192 particles, else 1.
 */
export function pmeThreadsChoose(requested: number | undefined, n: number, env: PmeThreadsEnv, minParticles: number = PME_WEB_THREADED_MIN_PARTICLES): number {
  if (!env.isolated) return 1;
  if (requested !== undefined) {
    if (!(Number.isInteger(requested) && requested >= 1)) throw new RangeError(`PME threads: expected a whole number ≥ 1, got ${requested}`);
    return requested;
  }
  if (n < minParticles) return 1;
  const hw = env.hardwareConcurrency && env.hardwareConcurrency > 0 ? Math.floor(env.hardwareConcurrency) : 1;
  return Math.max(1, Math.min(hw, PME_WEB_MAX_THREADS));
}

/** The environment of the running worker (or page). */
export function pmeThreadsEnvHere(): PmeThreadsEnv {
  const g = globalThis as { crossOriginIsolated?: boolean; navigator?: { hardwareConcurrency?: number } };
  return { hardwareConcurrency: g.navigator?.hardwareConcurrency, isolated: g.crossOriginIsolated === true && typeof SharedArrayBuffer === 'function' };
}

/** A helper as this file needs it; pmeHelperSpawn makes one from a module worker, tests pass in-process fakes. */
export interface PmeHelperPort {
  post(msg: PmeHelperRequest): void;
  terminate(): void;
}

/** Starts a helper whose replies go to onReply and whose failures (load error, uncaught error) go to onFail. */
export type PmeHelperSpawn = (onReply: (r: PmeHelperReply) => void, onFail: (message: string) => void) => PmeHelperPort;

/** A module web worker running pmeHelper.worker.ts. */
export const pmeHelperSpawn: PmeHelperSpawn = (onReply, onFail) => {
  const w = new Worker(new URL('./pmeHelper.worker.ts', import.meta.url), { type: 'module', name: 'pme-helper' });
  w.onmessage = (e: MessageEvent<PmeHelperReply>) => onReply(e.data);
  w.onerror = (e: ErrorEvent) => {
    e.preventDefault();
    onFail(e.message || 'the PME helper worker failed to start');
  };
  w.onmessageerror = () => onFail('a PME helper reply could not be read');
  return { post: (msg) => w.postMessage(msg), terminate: () => w.terminate() };
};

/** One helper with a request/reply channel (one request at a time). */
class Helper {
  private readonly port: PmeHelperPort;
  private pending: { type: PmeHelperRequest['type']; resolve: (r: PmeHelperReply) => void; reject: (e: Error) => void } | null = null;
  private failed: Error | null = null;

  constructor(spawn: PmeHelperSpawn) {
    this.port = spawn(
      (r) => {
        const p = this.pending;
        this.pending = null;
        if (r.type === 'error') return p?.reject(new Error(`PME helper: ${r.message}`));
        p?.resolve(r);
      },
      (message) => {
        this.failed = new Error(`PME helper: ${message}`);
        this.pending?.reject(this.failed);
        this.pending = null;
      },
    );
  }

  send(msg: PmeHelperRequest): Promise<PmeHelperReply> {
    if (this.failed) return Promise.reject(this.failed);
    return new Promise((resolve, reject) => {
      this.pending = { type: msg.type, resolve, reject };
      this.port.post(msg);
    });
  }

  terminate(): void {
    this.port.terminate();
  }
}

export interface PmeParallelResult extends PmeResult {
  /** Threads that computed (this one included). */
  readonly threadsUsed: number;
}

/**
 * All-particle accelerations (G·mass/length², input order) and zero-mean potentials by particle-mesh
 * Ewald on `threads` threads (this one and threads − 1 helpers from `spawn`); threads = 1 is pmeForces
 * here. Same results as pmeForces up to rounding. A helper that fails before its setup is done is left
 * out (it took no work); one that fails later fails the run.
 */
export async function pmeForcesParallel(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: PmeOptions,
  threads: number,
  onProgress?: Progress,
  spawn: PmeHelperSpawn = pmeHelperSpawn,
  stop?: SharedArrayBuffer,
): Promise<PmeParallelResult> {
  if (threads <= 1) return { ...pmeForces(positions, masses, box, options, onProgress), threadsUsed: 1 };
  // helpers load their module while the parameters are chosen here
  const helpers = Array.from({ length: threads - 1 }, () => new Helper(spawn));
  try {
    const setup = pmeSetup(positions, masses, box, options);
    onProgress?.(0.05);
    const { mine, message: setupMsg } = pmeSharedStart(setup, masses, box, threads, true, undefined, stop);
    // true once set up, false if it failed before: such a helper never takes a unit and is left out. The
    // helpers loaded while the parameters were chosen; their setup takes them a moment, and every phase is
    // then posted to them before this thread runs its own (synchronous) share of it.
    const ready = await Promise.all(helpers.map((h) => h.send(setupMsg!).then(() => true, () => false)));
    const stage = async (list: PmePhase[], from: number, to: number) => {
      const msg: PmeHelperRequest = { type: 'phases', phases: list };
      const replies = helpers.map((h, i) => (ready[i] ? h.send(msg) : null));
      for (const p of list) pmePhaseRun(mine, p, p === 'real' ? (done, total) => onProgress?.(from + ((to - from) * done) / total) : undefined);
      await Promise.all(replies);
      onProgress?.(to);
    };
    await stage(['spreadEven'], 0.05, 0.08);
    await stage(['spreadOdd', 'spreadAll'], 0.08, 0.12);
    await stage(['forward'], 0.12, 0.17);
    await stage(['solve'], 0.17, 0.21);
    await stage(['inverse'], 0.21, 0.26);
    await stage(['interpolate', 'real'], 0.26, 0.97);
    if (mine.stop && Atomics.load(mine.stop, 0) !== 0) throw new Error('PME run stopped (cancelled)'); // units were skipped
    pmeRealCollect(setup, mine.accSorted, mine.phiSorted);
    let used = 1;
    for (let i = 0; i < helpers.length; i++) {
      if (!ready[i]) continue;
      const r = await helpers[i].send({ type: 'collect' });
      if (r.type !== 'collected') throw new Error('PME helper: unexpected reply to collect');
      for (let k = 0; k < r.acc.length; k++) mine.accSorted[k] += r.acc[k];
      for (let k = 0; k < r.phi.length; k++) mine.phiSorted[k] += r.phi[k];
      used++;
    }
    const { acc, phi } = pmeFinalize(setup, mine.accSorted, mine.phiSorted);
    const predicted = pmePredictedErrors(setup, acc);
    onProgress?.(1);
    return { acc, phi, params: setup.params, wrapped: setup.wrapped, predictedRmsRelativeError: predicted.rmsRelative, threadsUsed: used };
  } finally {
    for (const h of helpers) h.terminate();
  }
}
