/// <reference lib="webworker" />
/** The compute worker: every message goes to handleRequest, every reply goes back with its buffers moved. */
import { handleRequest } from './handleRequest';
import type { WorkerRequest } from './protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;

scope.onmessage = (event: MessageEvent<WorkerRequest>) => {
  void handleRequest(event.data, (reply, transfer) => scope.postMessage(reply, transfer));
};
