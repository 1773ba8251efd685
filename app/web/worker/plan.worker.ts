/// <reference lib="webworker" />
/** The plan worker: measures snapshots for the run plan (planHandle.ts) so that the page's thread stays free. */
import { livenessHandle, livenessRejectionsReport, livenessWhenReady } from './livenessWorker';
import { type PlanHolder, planHandle } from './planHandle';
import type { PlanRequest } from './planProtocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const holder: PlanHolder = { data: null };

livenessRejectionsReport();

scope.onmessage = (event: MessageEvent<PlanRequest>) => {
  if (livenessHandle(event.data)) return;
  livenessWhenReady(() => {
    const out = planHandle(holder, event.data);
    if (out) scope.postMessage(out.reply, out.transfer);
  });
};
