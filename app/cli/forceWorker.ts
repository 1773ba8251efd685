/**
 * worker_threads adapter over the engine's Ewald pieces (see parallelEwald.ts for the protocol and
 * ewaldUnits.ts for the unit loops). It owns no numerics: every message maps to engine calls.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { type EwaldChosen, type EwaldSetup, ewaldAllRealAddUnsorted } from '../../engine/ewald/ewald';
import { kernelModule, kernelModuleShare } from '../../engine/wasm/module';
import { type UnitsPlan, type UnitsShared, runUnitsBlocking, structureUnitsRun } from './ewaldUnits';
import type { WorkerReply, WorkerRequest } from './parallelProtocol';
import { PhaseClock } from './phaseTiming';

const clock = new PhaseClock();
clock.mark('start');
// The main thread's compiled kernels (shared code), else compiled here while the main thread reads.
kernelModuleShare((workerData as { kernelModule?: WebAssembly.Module | null } | null)?.kernelModule ?? null);
kernelModule();
clock.mark('compile');

let chosen: EwaldChosen | null = null;
let plan: UnitsPlan | null = null;
let shared: UnitsShared | null = null;
let setup: EwaldSetup | null = null;

const reply = (r: WorkerReply) => parentPort!.postMessage(r);

parentPort!.on('message', (msg: WorkerRequest) => {
  clock.mark('idle');
  try {
    switch (msg.type) {
      case 'structure': {
        chosen = msg.chosen;
        plan = msg.plan;
        shared = msg.shared;
        reply({ type: 'ran', units: structureUnitsRun(chosen, plan, shared, msg.thread) });
        break;
      }
      case 'run': {
        // The Fourier context made in phase 1 (chosen.kWasm) comes along with the spread.
        setup = { ...chosen!, params: msg.params, cells: msg.cells, kernel: msg.kernel };
        const units = runUnitsBlocking(setup, plan!, shared!, new Int32Array(msg.targets), new Float64Array(msg.acc), new Float64Array(msg.phi));
        if (msg.realAcc && msg.realPhi) ewaldAllRealAddUnsorted(setup, new Float64Array(msg.realAcc), new Float64Array(msg.realPhi));
        reply({ type: 'ran', units });
        break;
      }
      case 'timing': {
        reply({ type: 'timing', records: clock.records });
        return;
      }
    }
    clock.mark(msg.type);
  } catch (e) {
    reply({ type: 'error', message: e instanceof Error ? e.message : String(e) });
  }
});
