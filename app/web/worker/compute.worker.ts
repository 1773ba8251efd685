/// <reference lib="webworker" />
/**
 * The compute worker: every request goes to handleRequest, every reply goes back with its buffers moved.
 * It also holds its liveness lock (livenessWorker.ts), so that the page notices if it dies silently.
 */
import { handleRequest } from './handleRequest';
import { livenessArmedFail, livenessHandle, livenessRejectionsReport, livenessWhenReady } from './livenessWorker';
import type { WorkerRequest } from './protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;

livenessRejectionsReport();

scope.onmessage = (event: MessageEvent<WorkerRequest>) => {
  if (livenessHandle(event.data)) return;
  livenessWhenReady(() => {
    if (livenessArmedFail()) return;
    void handleRequest(event.data, (reply, transfer) => scope.postMessage(reply, transfer));
  });
};
