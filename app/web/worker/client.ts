/**
 * The page's handle on the compute worker: one request at a time. Cancelling terminates the worker and
 * starts a fresh one; a new request while one runs cancels the first; a worker that crashes is replaced
 * and its request fails with the crash message. The page's own data are never in the worker's hands
 * alone: requests carry copies, so a lost worker loses nothing.
 */
import { type RequestBody, type ResultPayload, type WorkerReply, type WorkerRequest, transferables } from './protocol';

/** What the client needs from a worker; `workerSpawn` adapts a real Worker, tests pass fakes. */
export interface WorkerPort {
  post(request: WorkerRequest, transfer: Transferable[]): void;
  terminate(): void;
}

/** Starts a worker whose replies go to `onReply` and whose uncaught failures go to `onCrash`. */
export type WorkerSpawn = (onReply: (reply: WorkerReply) => void, onCrash: (message: string) => void) => WorkerPort;

/** A finished request: its payload and the time spent in the worker (ms). */
export interface Outcome<P extends ResultPayload = ResultPayload> {
  readonly payload: P;
  readonly workerMs: number;
}

/** The request was cancelled (by `cancel()` or by a newer `run()`). */
export class CancelledError extends Error {
  constructor() {
    super('computation cancelled');
    this.name = 'CancelledError';
  }
}

/** The worker itself failed (an uncaught error, an unreadable message); it has been replaced. */
export class WorkerCrashError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'WorkerCrashError';
  }
}

export interface ComputeClient {
  /**
   * Runs one request; its typed arrays are moved to the worker (pass copies you can lose). Rejects with
   * CancelledError, WorkerCrashError or the engine's error.
   */
  run(request: RequestBody, onProgress?: (fraction: number) => void): Promise<Outcome>;
  /** Cancels the running request (terminating its worker); false when nothing was running. */
  cancel(): boolean;
  busy(): boolean;
  /** Terminates the worker for good. */
  dispose(): void;
}

interface Pending {
  readonly id: number;
  readonly stop?: SharedArrayBuffer;
  readonly resolve: (outcome: Outcome) => void;
  readonly reject: (error: Error) => void;
  readonly onProgress?: (fraction: number) => void;
}

/** A fresh stop flag where shared memory can be posted (a cross-origin isolated page), else undefined. */
function stopFlagMake(): SharedArrayBuffer | undefined {
  const g = globalThis as { crossOriginIsolated?: boolean };
  return typeof SharedArrayBuffer === 'function' && g.crossOriginIsolated === true ? new SharedArrayBuffer(4) : undefined;
}

/** Creates a client over workers made by `spawn` (one alive at a time, started right away). */
export function computeClientCreate(spawn: WorkerSpawn): ComputeClient {
  let generation = 0;
  let nextId = 1;
  let pending: Pending | null = null;
  let port: WorkerPort | null = start();

  function start(): WorkerPort {
    const gen = ++generation;
    return spawn(
      (reply) => {
        if (gen === generation) onReply(reply);
      },
      (message) => {
        if (gen === generation) onCrash(message);
      },
    );
  }

  function restart(): void {
    port?.terminate();
    port = start();
  }

  function settle(): Pending | null {
    const p = pending;
    pending = null;
    return p;
  }

  function onReply(reply: WorkerReply): void {
    if (!pending || reply.id !== pending.id) return;
    if (reply.type === 'progress') {
      pending.onProgress?.(reply.fraction);
    } else if (reply.type === 'result') {
      settle()!.resolve({ payload: reply.payload, workerMs: reply.workerMs });
    } else {
      const err = new Error(reply.message);
      err.name = reply.name;
      settle()!.reject(err);
    }
  }

  function onCrash(message: string): void {
    const p = settle();
    if (p) {
      restart();
      p.reject(new WorkerCrashError(message));
    } else {
      // crashed while idle (perhaps it cannot even load): start the next one only when needed, so a
      // worker that always fails cannot loop
      port?.terminate();
      port = null;
      generation++;
    }
  }

  function cancel(): boolean {
    const p = settle();
    if (!p) return false;
    if (p.stop) Atomics.store(new Int32Array(p.stop), 0, 1); // the worker's helpers see it before the worker is gone
    restart();
    p.reject(new CancelledError());
    return true;
  }

  let disposed = false;

  return {
    run(body, onProgress) {
      if (disposed) return Promise.reject(new Error('compute client was disposed'));
      cancel();
      port ??= start();
      const id = nextId++;
      const stop = stopFlagMake();
      return new Promise<Outcome>((resolve, reject) => {
        pending = { id, stop, resolve, reject, onProgress };
        const request = { ...body, id, ...(stop ? { stop } : {}) } as WorkerRequest;
        try {
          port!.post(request, transferables(body));
        } catch (e) {
          settle();
          reject(e instanceof Error ? e : new Error(String(e)));
        }
      });
    },
    cancel,
    busy: () => pending !== null,
    dispose() {
      const p = settle();
      if (p?.stop) Atomics.store(new Int32Array(p.stop), 0, 1);
      p?.reject(new CancelledError());
      disposed = true;
      port?.terminate();
      port = null;
      generation++;
    },
  };
}
