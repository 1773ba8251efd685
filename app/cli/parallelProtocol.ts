/** Messages between parallelEwald.ts and forceWorker.ts (the work itself is taken from shared counters: ewaldUnits.ts). */
import type { EwaldChosen, EwaldSetup } from '../../engine/ewald/ewald';
import type { UnitsPlan, UnitsShared } from './ewaldUnits';
import type { PhaseRecord } from './phaseTiming';

export type WorkerRequest =
  | {
      /** Phase 1: structure-factor units, as thread `thread` (the main thread is 0). */
      type: 'structure';
      /** The main thread's first half of the setup, arrays in shared memory, without WebAssembly contexts. */
      chosen: EwaldChosen;
      plan: UnitsPlan;
      shared: UnitsShared;
      thread: number;
    }
  | {
      /** Phase 2: real-space cell and Fourier (or per-target) units. */
      type: 'run';
      /** The second half of the setup (arrays in shared memory). */
      params: EwaldSetup['params'];
      cells: EwaldSetup['cells'];
      kernel: EwaldSetup['kernel'];
      targets: SharedArrayBuffer;
      acc: SharedArrayBuffer;
      phi: SharedArrayBuffer;
      /**
       * All-particle runs: when its units are done, the worker unsorts its real-space sums into these
       * (zeroed, input order: 3N and N doubles).
       */
      realAcc?: SharedArrayBuffer;
      realPhi?: SharedArrayBuffer;
    }
  | { type: 'timing' };

export type WorkerReply =
  | { type: 'ran'; units: number }
  | { type: 'timing'; records: PhaseRecord[] }
  | { type: 'error'; message: string };
