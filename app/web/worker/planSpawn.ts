/** Starts the real plan worker (plan.worker.ts) behind the PlanPort interface, watched for crashes. */
import { workerWatch } from './liveness';
import type { PlanSpawn } from './planClient';
import type { PlanReply } from './planProtocol';

export const planSpawn: PlanSpawn = (onReply, onCrash) => {
  const worker = new Worker(new URL('./plan.worker.ts', import.meta.url), { type: 'module', name: 'torusgrav-plan' });
  const w = workerWatch(worker, 'plan', (data) => onReply(data as PlanReply), onCrash);
  return { post: (request, transfer) => w.post(request, transfer), terminate: () => w.terminate() };
};
