/**
 * Noticing that a worker has gone, on the page's side. A worker that throws an uncaught error fires
 * `error`, but one that closes itself, is killed or runs out of memory just goes silent. So each worker
 * holds a Web Lock named for it while it lives (livenessHold in the worker); the page asks for the same
 * lock once the worker says it holds it, and is granted it only when the worker is gone. Where Web Locks
 * are missing, only the `error` and `messageerror` events are watched.
 */

/** Messages between this helper and livenessHold; never seen by the worker's own protocol. */
export type LivenessMessage =
  | { readonly __torusgrav: 'init'; readonly lock: string; readonly testHooks: boolean }
  | { readonly __torusgrav: 'alive' }
  | { readonly __torusgrav: 'arm'; readonly how: 'throw' | 'close' };

export function isLivenessMessage(data: unknown): data is LivenessMessage {
  return typeof data === 'object' && data !== null && '__torusgrav' in data;
}

/** What the page keeps of a watched worker. */
export interface WatchedWorker {
  post(message: unknown, transfer: Transferable[]): void;
  /** Terminates the worker on purpose (not reported as a crash). */
  terminate(): void;
  /** Test hooks only: the raw worker (terminating it directly looks like a crash). */
  readonly raw: Worker;
  /** Resolves when the worker holds its liveness lock (from then on its end is always noticed). */
  readonly alive: Promise<void>;
}

/** A worker that has not taken its liveness lock this long after it was started is taken for dead (ms). */
export const WORKER_START_TIMEOUT_MS = 30_000;

let lockCounter = 0;

function lockName(label: string): string {
  const rnd = typeof crypto !== 'undefined' && 'randomUUID' in crypto ? crypto.randomUUID() : `${Date.now()}-${Math.random()}`;
  return `torusgrav-${label}-${++lockCounter}-${rnd}`;
}

/**
 * Watches `worker`: its own messages go to `onMessage`; an uncaught error, an unreadable message or its
 * silent end go once to `onCrash` with a reason in words (never after `terminate()`).
 */
export function workerWatch(worker: Worker, label: string, onMessage: (data: unknown) => void, onCrash: (reason: string) => void, testHooks = false): WatchedWorker {
  let over = false;
  let aliveResolve: () => void = () => undefined;
  const alive = new Promise<void>((resolve) => (aliveResolve = resolve));
  const crash = (reason: string) => {
    clearTimeout(startTimer);
    if (over) return;
    over = true;
    onCrash(reason);
  };
  const lock = lockName(label);
  const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
  const startTimer = locks ? setTimeout(() => crash(`it did not start within ${WORKER_START_TIMEOUT_MS / 1000} s`), WORKER_START_TIMEOUT_MS) : undefined;
  worker.onmessage = (event: MessageEvent) => {
    const data: unknown = event.data;
    if (isLivenessMessage(data)) {
      if (data.__torusgrav === 'alive' && locks) {
        clearTimeout(startTimer);
        aliveResolve();
        // granted only once the worker no longer holds it: it has ended
        void locks.request(lock, () => crash('it ended without an error message (out of memory, closed or killed)')).catch(() => undefined);
      }
      return;
    }
    if (!over) onMessage(data);
  };
  worker.onerror = (event) => {
    event.preventDefault();
    crash(event.message ? event.message : 'it failed to start or stopped with an error');
  };
  worker.onmessageerror = () => crash('a message from it could not be read');
  const init: LivenessMessage = { __torusgrav: 'init', lock, testHooks };
  worker.postMessage(init);
  return {
    post: (message, transfer) => worker.postMessage(message, transfer),
    terminate() {
      over = true;
      clearTimeout(startTimer);
      worker.terminate();
    },
    raw: worker,
    alive,
  };
}
