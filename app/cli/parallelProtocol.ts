/** Messages between parallelEwald.ts and forceWorker.ts. */
import type { EwaldSetup } from '../../engine/ewald/ewald';
import type { PhaseRecord } from './phaseTiming';

export type WorkerRequest =
  | {
      type: 'setup';
      /** The main thread's setup, without its WebAssembly contexts (structured copy). */
      setup: EwaldSetup;
      targets: SharedArrayBuffer;
      acc: SharedArrayBuffer;
      phi: SharedArrayBuffer;
    }
  | { type: 'structure'; begin: number; end: number }
  | { type: 'weighted'; weighted: SharedArrayBuffer }
  | { type: 'targets'; begin: number; end: number }
  | { type: 'fourier'; begin: number; end: number }
  | { type: 'cells'; begin: number; end: number }
  | { type: 'collect' }
  | { type: 'timing' };

export type WorkerReply =
  | { type: 'ready' }
  | { type: 'done' }
  | { type: 'structure'; s: Float64Array }
  | { type: 'collected'; accSorted: Float64Array; phiSorted: Float64Array }
  | { type: 'timing'; records: PhaseRecord[] }
  | { type: 'error'; message: string };
