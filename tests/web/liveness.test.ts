import { afterEach, describe, expect, test, vi } from 'vitest';
import { WORKER_START_TIMEOUT_MS, workerWatch } from '../../app/web/worker/liveness';

/** A Worker stand-in: records what the page posts; the test plays the worker's side. */
function fakeWorker() {
  const w = {
    posted: [] as unknown[],
    terminated: false,
    onmessage: null as ((e: { data: unknown }) => void) | null,
    onerror: null as ((e: { message: string; preventDefault(): void }) => void) | null,
    onmessageerror: null as (() => void) | null,
    postMessage(m: unknown) {
      w.posted.push(m);
    },
    terminate() {
      w.terminated = true;
    },
  };
  return w;
}

/** Web Locks stand-in: a lock is granted to the page when the worker "releases" it. */
function fakeLocks() {
  const waiting = new Map<string, () => void>();
  return {
    waiting,
    locks: {
      request(name: string, cb: () => unknown) {
        return new Promise((resolve) => waiting.set(name, () => resolve(cb())));
      },
    },
    release(name: string) {
      waiting.get(name)?.();
    },
  };
}

afterEach(() => {
  vi.unstubAllGlobals();
  vi.useRealTimers();
});

describe('workerWatch(worker, label, onMessage, onCrash)', () => {
  test('sends init with a lock name; after "alive" it asks for the lock and reports the worker’s silent end once', async () => {
    const L = fakeLocks();
    vi.stubGlobal('navigator', { locks: L.locks });
    const w = fakeWorker();
    const seen: unknown[] = [];
    const crashes: string[] = [];
    workerWatch(w as unknown as Worker, 'compute', (d) => seen.push(d), (r) => crashes.push(r), true);
    const init = w.posted[0] as { __torusgrav: string; lock: string; testHooks: boolean };
    expect(init).toMatchObject({ __torusgrav: 'init', testHooks: true });
    expect(init.lock).toMatch(/^torusgrav-compute-/);
    expect(L.waiting.size).toBe(0);
    w.onmessage!({ data: { __torusgrav: 'alive' } });
    w.onmessage!({ data: { type: 'progress', id: 1, fraction: 0.5 } });
    expect(seen).toEqual([{ type: 'progress', id: 1, fraction: 0.5 }]); // liveness messages are not passed on
    expect(L.waiting.has(init.lock)).toBe(true);
    L.release(init.lock);
    await Promise.resolve();
    expect(crashes).toEqual(['it ended without an error message (out of memory, closed or killed)']);
    w.onerror!({ message: 'later', preventDefault() {} });
    expect(crashes).toHaveLength(1);
  });

  test('an uncaught error is reported with its message; terminate() on purpose is never reported', async () => {
    const L = fakeLocks();
    vi.stubGlobal('navigator', { locks: L.locks });
    const a = fakeWorker();
    const crashes: string[] = [];
    workerWatch(a as unknown as Worker, 'compute', () => undefined, (r) => crashes.push(r));
    a.onerror!({ message: 'Uncaught Error: boom', preventDefault() {} });
    expect(crashes).toEqual(['Uncaught Error: boom']);
    const b = fakeWorker();
    const watched = workerWatch(b as unknown as Worker, 'compute', () => undefined, (r) => crashes.push(`b: ${r}`));
    b.onmessage!({ data: { __torusgrav: 'alive' } });
    watched.terminate();
    expect(b.terminated).toBe(true);
    L.release((b.posted[0] as { lock: string }).lock);
    await Promise.resolve();
    b.onmessage!({ data: { type: 'result' } });
    expect(crashes).toEqual(['Uncaught Error: boom']);
  });

  test('a worker that never says "alive" is taken for dead after the start timeout; "alive" resolves `alive`', async () => {
    vi.useFakeTimers();
    const L = fakeLocks();
    vi.stubGlobal('navigator', { locks: L.locks });
    const slow = fakeWorker();
    const crashes: string[] = [];
    workerWatch(slow as unknown as Worker, 'plan', () => undefined, (r) => crashes.push(r));
    vi.advanceTimersByTime(WORKER_START_TIMEOUT_MS + 1);
    expect(crashes).toEqual([`it did not start within ${WORKER_START_TIMEOUT_MS / 1000} s`]);
    const fine = fakeWorker();
    const watched = workerWatch(fine as unknown as Worker, 'plan', () => undefined, (r) => crashes.push(r));
    let alive = false;
    void watched.alive.then(() => (alive = true));
    fine.onmessage!({ data: { __torusgrav: 'alive' } });
    await vi.advanceTimersByTimeAsync(WORKER_START_TIMEOUT_MS + 1);
    expect(alive).toBe(true);
    expect(crashes).toHaveLength(1);
  });
});
