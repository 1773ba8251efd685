/// <reference lib="webworker" />
/**
 * A PME helper: a module worker that the compute worker starts for a parallel particle-mesh Ewald run
 * (pmeParallel.ts) and terminates after it. Its whole job is in pmeHelperHandle.ts.
 */
import { type PmeHelperRequest, pmeHelperHandler } from './pmeHelperHandle';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const handle = pmeHelperHandler((reply, transfer) => scope.postMessage(reply, transfer));

scope.onmessage = (event: MessageEvent<PmeHelperRequest>) => handle(event.data);
