/**
 * worker_threads adapter for particle-mesh Ewald (protocol in parallelPme.ts): a pinned setup over the
 * shared buffers, then phases on request (app/common/pmePhases.ts), then the real-space sums handed back. No numerics.
 */
import { parentPort } from 'node:worker_threads';
import { pmeRealCollect } from '../../engine/pme/index';
import type { PmeWorkerReply, PmeWorkerRequest } from './parallelPme';
import { type PmeShared, pmePhaseRun } from '../common/pmePhases';
import { pmeSharedJoin } from '../common/pmeShared';

let shared: PmeShared | null = null;

function reply(r: PmeWorkerReply, transfer: ArrayBuffer[] = []): void {
  parentPort!.postMessage(r, transfer);
}

parentPort!.on('message', (msg: PmeWorkerRequest) => {
  try {
    switch (msg.type) {
      case 'setup': {
        shared = pmeSharedJoin(msg);
        reply({ type: 'done' });
        break;
      }
      case 'phases': {
        for (const p of msg.phases) pmePhaseRun(shared!, p);
        reply({ type: 'done' });
        break;
      }
      case 'collect': {
        const n = shared!.setup.masses.length;
        const acc = new Float64Array(3 * n);
        const phi = new Float64Array(n);
        pmeRealCollect(shared!.setup, acc, phi);
        reply({ type: 'collected', acc, phi }, [acc.buffer as ArrayBuffer, phi.buffer as ArrayBuffer]);
        break;
      }
    }
  } catch (e) {
    reply({ type: 'error', message: e instanceof Error ? e.message : String(e) });
  }
});
