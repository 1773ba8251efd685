/**
 * The worker's whole job, without the worker: one request in, progress and one reply out through
 * `post`. Each request type maps to one engine call; nothing numerical happens here.
 */
import { ewaldForces } from '../../../engine/ewald/ewald';
import { PROGRESS_STEP, type WorkerReply, type WorkerRequest } from './protocol';

/** Sends a reply, moving the listed buffers instead of copying them. */
export type Post = (reply: WorkerReply, transfer: Transferable[]) => void;

/** Wraps a progress sink so that it fires only when the fraction grew by `step`, and always at 1. */
export function progressThrottle(send: (fraction: number) => void, step: number = PROGRESS_STEP): (fraction: number) => void {
  let last = -Infinity;
  return (fraction) => {
    if (fraction >= 1 || fraction - last >= step) {
      last = fraction;
      send(Math.min(1, Math.max(0, fraction)));
    }
  };
}

/** Handles one request; engine errors become an `error` reply (never a throw). */
export function handleRequest(request: WorkerRequest, post: Post, now: () => number = () => performance.now()): void {
  const id = typeof request?.id === 'number' ? request.id : -1;
  try {
    switch (request?.type) {
      case 'ewald': {
        const t0 = now();
        const progress = progressThrottle((fraction) => post({ type: 'progress', id, fraction }, []));
        const r = ewaldForces(request.positions, request.masses, request.box, request.targets, request.options, progress);
        const reply: WorkerReply = {
          type: 'result',
          id,
          targets: r.targets,
          acc: r.acc,
          phi: r.phi,
          params: r.params,
          wrapped: r.wrapped,
          workerMs: now() - t0,
        };
        post(reply, [r.targets.buffer, r.acc.buffer, r.phi.buffer] as ArrayBuffer[]);
        return;
      }
      default:
        post({ type: 'error', id, name: 'RequestError', message: `unknown request type ${JSON.stringify((request as { type?: unknown })?.type)}` }, []);
    }
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    post({ type: 'error', id, name: err.name, message: err.message }, []);
  }
}
