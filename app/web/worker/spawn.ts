/** Starts the real module worker (compute.worker.ts) behind the WorkerPort interface. */
import type { WorkerSpawn } from './client';

export const workerSpawn: WorkerSpawn = (onReply, onCrash) => {
  const worker = new Worker(new URL('./compute.worker.ts', import.meta.url), { type: 'module', name: 'torusgrav-compute' });
  worker.onmessage = (event) => onReply(event.data);
  worker.onerror = (event) => {
    event.preventDefault();
    onCrash(event.message ? `compute worker failed: ${event.message}` : 'compute worker failed to start or stopped with an error');
  };
  worker.onmessageerror = () => onCrash('a message from the compute worker could not be read');
  return {
    post: (request, transfer) => worker.postMessage(request, transfer),
    terminate: () => worker.terminate(),
  };
};
