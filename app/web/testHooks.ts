/**
 * Hooks for the browser tests, present only when the page was opened with `?testhooks` (the flag is read
 * once at start): `await window.__torusgravTest.workerCrash(how)` makes the compute worker fail — 'terminate'
 * kills it at once from outside (as the browser does when it runs out of memory), 'throw' / 'close' make
 * the next request it receives throw an uncaught error / close the worker without answering.
 */
import type { WorkerSpawn } from './worker/client';
import type { WatchedWorker } from './worker/liveness';
import { workerSpawnMake } from './worker/spawn';

export type CrashHow = 'terminate' | 'throw' | 'close';

declare global {
  interface Window {
    __torusgravTest?: { workerCrash(how?: CrashHow): Promise<boolean> };
  }
}

/** Whether the page's address asks for the test hooks. */
export function testHooksWanted(search: string): boolean {
  return new URLSearchParams(search).has('testhooks');
}

/** The compute worker spawn to use: with the hooks installed on `window` when `wanted`, else the plain one. */
export function computeSpawnFor(wanted: boolean): WorkerSpawn {
  if (!wanted) return workerSpawnMake();
  let current: WatchedWorker | null = null;
  window.__torusgravTest = {
    // once the worker holds its liveness lock (it has started), as any worker that has been computing
    async workerCrash(how: CrashHow = 'terminate') {
      const w = current;
      if (!w) return false;
      await w.alive;
      if (how === 'terminate') w.raw.terminate();
      else w.post({ __torusgrav: 'arm', how }, []);
      return true;
    },
  };
  return workerSpawnMake(true, (w) => {
    current = w;
  });
}
