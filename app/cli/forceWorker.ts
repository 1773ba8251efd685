/**
 * worker_threads adapter over the engine's Ewald pieces (see parallelEwald.ts for the protocol).
 * It owns no numerics: every message maps to one engine call.
 */
import { parentPort, workerData } from 'node:worker_threads';
import {
  type EwaldSetup,
  ewaldAllRealChunk,
  ewaldAllRealCollect,
  ewaldFourierChunk,
  ewaldStructureFactor,
  ewaldTargetsChunk,
} from '../../engine/ewald/ewald';
import { kernelModule, kernelModuleShare } from '../../engine/wasm/module';
import type { WorkerRequest } from './parallelProtocol';
import { PhaseClock } from './phaseTiming';

const clock = new PhaseClock();
clock.mark('start');
// The main thread's compiled kernels (shared code), else compiled here while the main thread reads.
kernelModuleShare((workerData as { kernelModule?: WebAssembly.Module | null } | null)?.kernelModule ?? null);
kernelModule();
clock.mark('compile');

let setup: EwaldSetup | null = null;
let weighted: Float64Array | null = null;
let targets: Int32Array | null = null;
let acc: Float64Array | null = null;
let phi: Float64Array | null = null;

parentPort!.on('message', (msg: WorkerRequest) => {
  clock.mark('idle');
  try {
    switch (msg.type) {
      case 'setup': {
        setup = msg.setup;
        targets = new Int32Array(msg.targets);
        acc = new Float64Array(msg.acc);
        phi = new Float64Array(msg.phi);
        parentPort!.postMessage({ type: 'ready' });
        break;
      }
      case 'structure': {
        const s = ewaldStructureFactor(setup!, msg.begin, msg.end);
        parentPort!.postMessage({ type: 'structure', s }, [s.buffer as ArrayBuffer]);
        break;
      }
      case 'weighted': {
        weighted = new Float64Array(msg.weighted);
        parentPort!.postMessage({ type: 'done' });
        break;
      }
      case 'targets': {
        ewaldTargetsChunk(setup!, weighted!, targets!, msg.begin, msg.end, acc!, phi!);
        parentPort!.postMessage({ type: 'done' });
        break;
      }
      case 'fourier': {
        ewaldFourierChunk(setup!, weighted!, targets!, msg.begin, msg.end, acc!, phi!);
        parentPort!.postMessage({ type: 'done' });
        break;
      }
      case 'cells': {
        ewaldAllRealChunk(setup!, msg.begin, msg.end);
        parentPort!.postMessage({ type: 'done' });
        break;
      }
      case 'timing': {
        parentPort!.postMessage({ type: 'timing', records: clock.records });
        return;
      }
      case 'collect': {
        const { accSorted: a, phiSorted: p } = ewaldAllRealCollect(setup!);
        parentPort!.postMessage({ type: 'collected', accSorted: a, phiSorted: p }, [a.buffer as ArrayBuffer, p.buffer as ArrayBuffer]);
        break;
      }
    }
    clock.mark(msg.type);
  } catch (e) {
    parentPort!.postMessage({ type: 'error', message: e instanceof Error ? e.message : String(e) });
  }
});
