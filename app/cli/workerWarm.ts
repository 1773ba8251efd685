/**
 * The worker threads of a direct-Ewald forces run, started ahead of need (before the snapshot is read): a
 * Node worker takes ≈ 60 ms of an idle core and ≈ 2 100 page faults to start. Starting them even earlier,
 * before the command line's modules load, was measured and dropped: the two start-ups slowed each other
 * (0.63–0.71 s against 0.63–0.66 s for the whole command, alternating runs, 2026-12-02).
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { kernelModule, kernelVariant } from '../../engine/wasm/module';
import { PhaseClock, phaseLines, threadTimes, timingEnabled } from './phaseTiming';

/** Default thread count: all cores. */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

/** The compiled force worker beside this bundle. */
export const WORKER_URL = new URL('./forceWorker.mjs', import.meta.url);

/** Workers started ahead. */
interface WarmPool {
  url: string;
  workers: Worker[];
  broken: boolean;
}
let warm: WarmPool | null = null;
let warmClock: PhaseClock | null = null;
let timingStarted = false;

/**
 * Starts the threads − 1 workers of a coming ewaldForcesThreads call now, so that their start-up overlaps
 * the reading. Unused workers do not keep the process alive; a later call with another count
 * or URL, or a run that stays on one thread, terminates them; a call while workers wait does nothing.
 */
export function ewaldThreadsWarm(threads: number, workerUrl: URL = WORKER_URL): void {
  if (timingEnabled() && !timingStarted) {
    timingStarted = true;
    const [cpu, wait] = threadTimes();
    process.stderr.write(phaseLines('main', [{ name: 'process-start→warm', wall: performance.now(), cpu, wait }]));
    process.stderr.write(`timing kernels: ${kernelVariant() ?? 'javascript'}\n`);
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
export function workerStart(url: URL): Worker {
  return new Worker(url, { workerData: { kernelModule: kernelModule() } });
}

/** The warm workers when there are `count` of `url` in good order (else they are terminated: []). */
export function warmTake(count: number, url: URL): Worker[] {
  const w = warm;
  warm = null;
  if (!w) return [];
  if (w.url !== url.href || w.workers.length !== count || w.broken) {
    for (const x of w.workers) void x.terminate();
    return [];
  }
  return w.workers;
}

/** The phase clock started with the warm-up under TORUSGRAV_TIMING (once), else a fresh one. */
export function warmClockTake(): PhaseClock {
  const c = warmClock ?? new PhaseClock();
  warmClock = null;
  return c;
}
