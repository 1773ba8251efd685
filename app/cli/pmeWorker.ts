/**
 * worker_threads adapter for particle-mesh Ewald (protocol in parallelPme.ts): a pinned setup over the
 * shared buffers, then phases on request (app/common/pmePhases.ts), then its real-space sums added into the
 * shared sorted sums. No numerics.
 */
import { parentPort } from 'node:worker_threads';
import { pmeRealCollect } from '../../engine/pme/index';
import type { PmeWorkerReply, PmeWorkerRequest } from './parallelPme';
import { type PmeShared, pmePhaseRun } from '../common/pmePhases';
import { pmeSharedJoin } from '../common/pmeShared';
import { pagesTouch } from '../common/sharedMemory';

let shared: PmeShared | null = null;

function reply(r: PmeWorkerReply): void {
  parentPort!.postMessage(r);
}

parentPort!.on('message', (msg: PmeWorkerRequest) => {
  try {
    switch (msg.type) {
      case 'touch': {
        reply({ type: 'done', units: pagesTouch(msg.buffers, new Int32Array(msg.counter)) });
        break;
      }
      case 'setup': {
        shared = pmeSharedJoin(msg);
        reply({ type: 'done' });
        break;
      }
      case 'phases': {
        let units = 0;
        for (const p of msg.phases) units += pmePhaseRun(shared!, p);
        reply({ type: 'done', units });
        break;
      }
      case 'collect': {
        // Into the shared sorted sums: the coordinating thread asks one worker at a time.
        pmeRealCollect(shared!.setup, shared!.accSorted, shared!.phiSorted);
        reply({ type: 'done' });
        break;
      }
    }
  } catch (e) {
    reply({ type: 'error', message: e instanceof Error ? e.message : String(e) });
  }
});
