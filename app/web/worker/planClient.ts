/**
 * The page's handle on the plan worker: method plans and target samples for large snapshots, measured
 * off the page's thread. The snapshot's arrays are sent to the worker once, a slice per task, and kept there.
 * A worker that crashes fails its requests (the caller then plans on the page) and is replaced at the
 * next request.
 */
import type { Box } from '../../../engine/box';
import type { MethodOptions } from '../methods/methodOptions';
import type { MethodPlan } from '../methods/methodPlan';
import { COPY_SLICE, yieldTask } from './chunkedCopy';
import type { PlanReply, PlanRequest } from './planProtocol';

/** A started plan worker behind a small interface (tests pass fakes). */
export interface PlanPort {
  post(request: PlanRequest, transfer: Transferable[]): void;
  terminate(): void;
}

export type PlanSpawn = (onReply: (reply: PlanReply) => void, onCrash: (reason: string) => void) => PlanPort;

/** The particles a plan measures (identified by their positions array). */
export interface PlanData {
  readonly positions: Float64Array;
  readonly masses: Float64Array;
}

export interface PlanClient {
  /** methodPlan(m, positions, masses, box, targets), computed in the worker. */
  methodPlan(data: PlanData, box: Box, m: MethodOptions, targets: number): Promise<MethodPlan>;
  /** A seeded sample of `count` of n rows (sorted), as targetsResolve draws it. */
  sample(n: number, count: number, seed: number): Promise<Int32Array>;
  dispose(): void;
}

export class PlanWorkerError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'PlanWorkerError';
  }
}

/** Creates a client; the worker starts at the first request. */
export function planClientCreate(spawn: PlanSpawn): PlanClient {
  let port: PlanPort | null = null;
  /** Positions array whose copy the current worker holds, and its id there. */
  let held: Float64Array | null = null;
  const ids = new WeakMap<Float64Array, number>();
  let nextDataId = 1;
  let nextId = 1;
  const pending = new Map<number, { resolve: (r: PlanReply) => void; reject: (e: Error) => void }>();
  // requests go one after another, so that a snapshot is copied once even when plans are asked together
  let queue: Promise<unknown> = Promise.resolve();
  let disposed = false;

  function portGet(): PlanPort {
    if (port) return port;
    const me: { port: PlanPort | null } = { port: null };
    me.port = spawn(
      (reply) => {
        const p = pending.get(reply.id);
        if (!p) return;
        pending.delete(reply.id);
        p.resolve(reply);
      },
      (reason) => {
        if (port !== me.port) return;
        port?.terminate();
        port = null;
        held = null;
        const all = [...pending.values()];
        pending.clear();
        for (const p of all) p.reject(new PlanWorkerError(`the planning worker stopped: ${reason}`));
      },
    );
    port = me.port;
    held = null;
    return port;
  }

  function ask(make: (id: number) => PlanRequest, transfer: Transferable[] = []): Promise<PlanReply> {
    const id = nextId++;
    return new Promise<PlanReply>((resolve, reject) => {
      pending.set(id, { resolve, reject });
      try {
        portGet().post(make(id), transfer);
      } catch (e) {
        pending.delete(id);
        reject(e instanceof Error ? e : new Error(String(e)));
      }
    });
  }

  function dataIdOf(positions: Float64Array): number {
    let id = ids.get(positions);
    if (id === undefined) {
      id = nextDataId++;
      ids.set(positions, id);
    }
    return id;
  }

  async function ensureData(data: PlanData): Promise<number> {
    const dataId = dataIdOf(data.positions);
    if (held === data.positions && port) return dataId;
    held = null;
    const p = portGet();
    p.post({ type: 'data', id: 0, dataId, n: data.masses.length }, []);
    for (const array of ['positions', 'masses'] as const) {
      const a = data[array];
      for (let offset = 0; offset < a.length; offset += COPY_SLICE) {
        if (offset > 0) await yieldTask();
        if (port !== p) throw new PlanWorkerError('the planning worker stopped while receiving the snapshot');
        const values = a.slice(offset, Math.min(a.length, offset + COPY_SLICE));
        p.post({ type: 'dataPart', id: 0, dataId, array, offset, values }, [values.buffer]);
      }
    }
    held = data.positions;
    return dataId;
  }

  function enqueue<T>(job: () => Promise<T>): Promise<T> {
    if (disposed) return Promise.reject(new PlanWorkerError('plan client was disposed'));
    const run = queue.then(job, job);
    queue = run.catch(() => undefined);
    return run;
  }

  function unwrap(reply: PlanReply): PlanReply {
    if (reply.type === 'error') {
      const err = new Error(reply.message);
      err.name = reply.name;
      throw err;
    }
    return reply;
  }

  return {
    methodPlan(data, box, m, targets) {
      return enqueue(async () => {
        const dataId = await ensureData(data);
        const r = unwrap(await ask((id) => ({ type: 'method', id, dataId, box, method: m, targets })));
        if (r.type !== 'method') throw new PlanWorkerError(`plan worker answered ${r.type} to a method plan`);
        return r.plan;
      });
    },
    sample(n, count, seed) {
      return enqueue(async () => {
        const r = unwrap(await ask((id) => ({ type: 'sample', id, n, count, seed })));
        if (r.type !== 'sample') throw new PlanWorkerError(`plan worker answered ${r.type} to a sample`);
        return r.indices;
      });
    },
    dispose() {
      disposed = true;
      port?.terminate();
      port = null;
      const all = [...pending.values()];
      pending.clear();
      for (const p of all) p.reject(new PlanWorkerError('plan client was disposed'));
    },
  };
}
