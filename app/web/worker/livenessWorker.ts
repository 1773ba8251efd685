/// <reference lib="webworker" />
/**
 * The worker's side of liveness.ts: on the page's `init` message, holds the named Web Lock for as long as
 * the worker lives and then says `alive`; turns unhandled promise rejections into uncaught errors (which
 * the page sees as `error` events). Test hooks, when the page enabled them: `arm` makes the next request
 * throw an uncaught error or close the worker.
 */
import { isLivenessMessage } from './liveness';

const scope = self as unknown as DedicatedWorkerGlobalScope;

let armed: 'throw' | 'close' | null = null;
let hooks = false;
/** Whether the lock is held (or cannot be); requests wait until then, so that the page can see them die. */
let ready = false;
const queued: (() => void)[] = [];

function readyNow(): void {
  ready = true;
  // each in a task of its own: what they throw stays an uncaught error of the worker
  for (const f of queued.splice(0)) setTimeout(f);
}

/**
 * Runs `f` (a request's handling) now when the worker holds its liveness lock, else as soon as it does:
 * a worker killed while computing is then always noticed by the page.
 */
export function livenessWhenReady(f: () => void): void {
  if (ready) f();
  else queued.push(f);
}

/**
 * Handles liveness messages (true when `data` was one). Call first in the worker's onmessage.
 */
export function livenessHandle(data: unknown): boolean {
  if (!isLivenessMessage(data)) return false;
  if (data.__torusgrav === 'init') {
    hooks = data.testHooks;
    const locks = scope.navigator.locks;
    if (locks) {
      void locks
        .request(data.lock, () => {
          scope.postMessage({ __torusgrav: 'alive' });
          readyNow();
          return new Promise<void>(() => undefined); // held until the worker ends
        })
        .catch(() => readyNow());
    } else readyNow();
  } else if (data.__torusgrav === 'arm' && hooks) {
    armed = data.how;
  }
  return true;
}

/**
 * Test hooks: fails the way it was armed to, before a request is handled — throws an uncaught error, or
 * closes the worker and returns true (drop the request: nothing is answered). False when not armed.
 */
export function livenessArmedFail(): boolean {
  const how = armed;
  armed = null;
  if (how === 'close') {
    scope.close();
    return true;
  }
  if (how === 'throw') throw new Error('test hook: an uncaught error in the worker');
  return false;
}

/** Makes an unhandled rejection an uncaught error, so that the page hears of it. */
export function livenessRejectionsReport(): void {
  scope.addEventListener('unhandledrejection', (event) => {
    event.preventDefault();
    const reason: unknown = event.reason;
    setTimeout(() => {
      throw reason instanceof Error ? reason : new Error(String(reason));
    });
  });
}
