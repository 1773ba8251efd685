/** Starts the real module worker (compute.worker.ts) behind the WorkerPort interface, watched for crashes. */
import type { WorkerPort, WorkerSpawn } from './client';
import { type WatchedWorker, workerWatch } from './liveness';
import type { WorkerReply } from './protocol';

/** A spawn function; `onStart` (test hooks) sees each worker started. */
export function workerSpawnMake(testHooks = false, onStart?: (w: WatchedWorker) => void): WorkerSpawn {
  return (onReply, onCrash) => {
    const worker = new Worker(new URL('./compute.worker.ts', import.meta.url), { type: 'module', name: 'torusgrav-compute' });
    const w = workerWatch(worker, 'compute', (data) => onReply(data as WorkerReply), onCrash, testHooks);
    onStart?.(w);
    const port: WorkerPort = { post: (request, transfer) => w.post(request, transfer), terminate: () => w.terminate() };
    return port;
  };
}

export const workerSpawn: WorkerSpawn = workerSpawnMake();
