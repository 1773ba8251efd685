/** Messages between parallelEwald.ts and forceWorker.ts. */
import type { EwaldOptions } from '../../engine/ewald/params';

export type WorkerRequest =
  | {
      type: 'setup';
      positions: SharedArrayBuffer;
      masses: SharedArrayBuffer;
      box: [number, number, number];
      options: EwaldOptions;
      targetCount: number;
      targets: SharedArrayBuffer;
      acc: SharedArrayBuffer;
      phi: SharedArrayBuffer;
    }
  | { type: 'structure'; begin: number; end: number }
  | { type: 'weighted'; weighted: SharedArrayBuffer }
  | { type: 'targets'; begin: number; end: number }
  | { type: 'fourier'; begin: number; end: number }
  | { type: 'cells'; begin: number; end: number }
  | { type: 'collect' };

export type WorkerReply =
  | { type: 'ready' }
  | { type: 'done' }
  | { type: 'structure'; s: Float64Array }
  | { type: 'collected'; accSorted: Float64Array; phiSorted: Float64Array }
  | { type: 'error'; message: string };
