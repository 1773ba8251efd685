/**
 * The page's handle on the compute worker: one computation at a time. Cancelling terminates the
 * worker and starts a fresh one; starting a computation while one runs cancels the first; a worker
 * that crashes is replaced and its computation fails with the crash message.
 */
import type { Box } from '../../../engine/box';
import type { EwaldOptions } from '../../../engine/ewald/params';
import type { EwaldReply, WorkerReply, WorkerRequest } from './protocol';

/** What the client needs from a worker; `workerSpawn` adapts a real Worker, tests pass fakes. */
export interface WorkerPort {
  post(request: WorkerRequest, transfer: Transferable[]): void;
  terminate(): void;
}

/** Starts a worker whose replies go to `onReply` and whose uncaught failures go to `onCrash`. */
export type WorkerSpawn = (onReply: (reply: WorkerReply) => void, onCrash: (message: string) => void) => WorkerPort;

/** The input of one computation. Its buffers are moved to the worker: pass copies you can lose. */
export interface EwaldJob {
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  readonly targets: Int32Array | null;
  readonly options: EwaldOptions;
}

export type EwaldOutcome = Omit<EwaldReply, 'type' | 'id'>;

/** The computation was cancelled (by `cancel()` or by a newer `run()`). */
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
  /** Runs one computation; rejects with CancelledError, WorkerCrashError or the engine's error. */
  run(job: EwaldJob, onProgress?: (fraction: number) => void): Promise<EwaldOutcome>;
  /** Cancels the running computation (terminating its worker); false when nothing was running. */
  cancel(): boolean;
  busy(): boolean;
  /** Terminates the worker for good. */
  dispose(): void;
}

interface Pending {
  readonly id: number;
  readonly resolve: (outcome: EwaldOutcome) => void;
  readonly reject: (error: Error) => void;
  readonly onProgress?: (fraction: number) => void;
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
      const { type: _t, id: _i, ...outcome } = reply;
      settle()!.resolve(outcome);
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
    restart();
    p.reject(new CancelledError());
    return true;
  }

  let disposed = false;

  return {
    run(job, onProgress) {
      if (disposed) return Promise.reject(new Error('compute client was disposed'));
      cancel();
      port ??= start();
      const id = nextId++;
      return new Promise<EwaldOutcome>((resolve, reject) => {
        pending = { id, resolve, reject, onProgress };
        const request: WorkerRequest = { type: 'ewald', id, ...job };
        const transfer: ArrayBuffer[] = [job.positions.buffer as ArrayBuffer, job.masses.buffer as ArrayBuffer];
        if (job.targets) transfer.push(job.targets.buffer as ArrayBuffer);
        try {
          port!.post(request, transfer);
        } catch (e) {
          settle();
          reject(e instanceof Error ? e : new Error(String(e)));
        }
      });
    },
    cancel,
    busy: () => pending !== null,
    dispose() {
      settle()?.reject(new CancelledError());
      disposed = true;
      port?.terminate();
      port = null;
      generation++;
    },
  };
}
