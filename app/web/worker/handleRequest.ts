/**
 * The worker's whole job, without the worker: one request in, progress and one reply out through
 * `post`. Each request type maps to one engine call (or a short loop of them); nothing numerical
 * happens here.
 */
import { targetsAll } from '../../../engine/targets';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { meshForces } from '../../../engine/codeUnderTest/meshForces';
import { errorReport } from '../../../engine/stats/errorReport';
import { neighbourTreeBuild, neighboursFind } from '../../../engine/stats/neighbours';
import { describeRun, loadRun } from './loadRequests';
import { methodRequestRun } from './methodRequests';
import { PROGRESS_STEP, type RequestBody, type ResultPayload, type SweepPayload, type WorkerReply, type WorkerRequest, transferables } from './protocol';

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

/** Runs one request body to its payload (synchronous engine calls; reading a file may be asynchronous). */
export async function requestRun(request: RequestBody, progress: (fraction: number) => void, stop?: SharedArrayBuffer): Promise<ResultPayload> {
  switch (request.type) {
    case 'demo': {
      const d = demoSnapshot(request.n, request.seed);
      progress(1);
      return { kind: 'demo', positions: d.positions, masses: d.masses };
    }
    case 'ewald': {
      const r = ewaldForces(request.positions, request.masses, request.box, request.targets, request.options, progress);
      return { kind: 'forces', targets: r.targets, acc: r.acc, phi: r.phi, ewald: r.params, mesh: null, wrapped: r.wrapped };
    }
    case 'mesh': {
      const r = meshForces(request.positions, request.masses, request.box, request.targets, request.options, progress);
      return { kind: 'forces', targets: r.targets, acc: r.acc, phi: null, ewald: null, mesh: r.params, wrapped: 0 };
    }
    case 'sweep': {
      const acc: Float64Array[] = [];
      const ewald: SweepPayload['ewald'] = [];
      const mesh: SweepPayload['mesh'] = [];
      let targets = request.targets ?? new Int32Array(0);
      const count = request.options.length;
      for (let s = 0; s < count; s++) {
        const sub = (f: number) => progress((s + f) / count);
        if (request.method === 'ewald') {
          const r = ewaldForces(request.positions, request.masses, request.box, request.targets, request.options[s], sub);
          acc.push(r.acc);
          ewald.push(r.params);
          mesh.push(null);
          targets = r.targets;
        } else {
          const r = meshForces(request.positions, request.masses, request.box, request.targets, request.options[s], sub);
          acc.push(r.acc);
          ewald.push(null);
          mesh.push(r.params);
          targets = r.targets;
        }
      }
      return { kind: 'sweep', targets, acc, ewald, mesh };
    }
    case 'neighbours': {
      // the tree first, then the targets in chunks, reporting progress between them
      const n = request.positions.length / 3;
      const targets = request.targets ?? targetsAll(n);
      const tree = neighbourTreeBuild(request.positions, request.box);
      progress(0.2);
      const step = 8192;
      let r = neighboursFind(request.positions, request.box, targets.subarray(0, Math.min(step, targets.length)), request.k, tree);
      const nearest = new Float64Array(targets.length), kth = new Float64Array(targets.length), density = new Float64Array(targets.length);
      for (let b = 0; b < targets.length; b += step) {
        if (b > 0) r = neighboursFind(request.positions, request.box, targets.subarray(b, Math.min(targets.length, b + step)), request.k, tree);
        nearest.set(r.nearest, b);
        kth.set(r.kth, b);
        density.set(r.density, b);
        progress(0.2 + (0.8 * Math.min(targets.length, b + step)) / targets.length);
      }
      return { kind: 'neighbours', nearest, kth, density, kUsed: r.kUsed, meanDensity: r.meanDensity };
    }
    case 'compare': {
      const r = errorReport(request.accA, request.accB, request.worst);
      progress(1);
      return { kind: 'compare', ...r };
    }
    case 'describe':
      return describeRun(request, progress);
    case 'load':
      return loadRun(request, progress);
    case 'order':
    case 'orderTrace':
    case 'pme':
      return methodRequestRun(request, progress, stop);
    default:
      throw Object.assign(new Error(`unknown request type ${JSON.stringify((request as { type?: unknown })?.type)}`), { name: 'RequestError' });
  }
}

/** Buffers to move with a payload (its typed arrays, arrays of them, and the summary's worst list). */
export function payloadTransferables(p: ResultPayload): ArrayBuffer[] {
  const list = transferables(p);
  if (p.kind === 'compare') {
    list.push(...transferables(p.summary), ...transferables(p.histogram), ...transferables(p.cdf));
  }
  return [...new Set(list)];
}

/** Handles one request; engine errors become an `error` reply (never a throw). Resolves when replied. */
export async function handleRequest(request: WorkerRequest, post: Post, now: () => number = () => performance.now()): Promise<void> {
  const id = typeof request?.id === 'number' ? request.id : -1;
  try {
    const t0 = now();
    const progress = progressThrottle((fraction) => post({ type: 'progress', id, fraction }, []));
    const payload = await requestRun(request, progress, request.stop);
    post({ type: 'result', id, payload, workerMs: now() - t0 }, payloadTransferables(payload));
  } catch (e) {
    const err = e instanceof Error ? e : new Error(String(e));
    post({ type: 'error', id, name: err.name, message: err.message }, []);
  }
}
