/**
 * The worker threads of a direct-Ewald forces run, started ahead of need: before the snapshot is read, and
 * for `torusgrav forces` before the rest of the command line is even loaded (forcesPrestart). A Node
 * worker takes ~60 ms of an idle core to start, and about twice that while this thread loads and reads;
 * the run's structure factor should not wait for it. Small on purpose: main.ts loads it first.
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
 * the loading and reading. Unused workers do not keep the process alive; a later call with another count
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

/** The value of option `--name` in raw arguments (`--name V` or `--name=V`), without parsing the rest. */
function optionPeek(argv: readonly string[], name: string): string | undefined {
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === name) return argv[i + 1];
    if (argv[i].startsWith(`${name}=`)) return argv[i].slice(name.length + 1);
  }
  return undefined;
}

/**
 * How many threads a `torusgrav forces` run with direct Ewald (the default method) will ask for, from a
 * peek at the raw arguments; 0 when they are not such a run, ask for one thread, or do not say clearly.
 * forcesOptions.ts parses the arguments for real afterwards.
 */
export function forcesPrestartThreads(argv: readonly string[]): number {
  if (argv[0] !== 'forces' || argv.includes('--help') || argv.includes('-h')) return 0;
  const method = optionPeek(argv, '--method');
  if (method !== undefined && method.trim().toLowerCase() !== 'ewald') return 0;
  const text = optionPeek(argv, '--threads');
  const threads = text !== undefined ? Number(text) : argv.includes('--threads') ? 0 : defaultThreads();
  return Number.isInteger(threads) && threads > 1 && threads <= 1024 ? threads : 0;
}

/**
 * Starts the workers of a `torusgrav forces` run with direct Ewald before the command line's modules are
 * loaded (forcesPrestartThreads); the run's own ewaldThreadsWarm keeps them when the count agrees, and a
 * wrong guess costs only a terminated worker.
 */
export function forcesPrestart(argv: readonly string[]): void {
  const threads = forcesPrestartThreads(argv);
  if (threads > 1) ewaldThreadsWarm(threads);
}
