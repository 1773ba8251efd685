/**
 * Messages between the page and the compute worker. Typed arrays travel as transfers (their buffers
 * move, they are not copied); `id` ties every reply to the request that caused it.
 */
import type { Box } from '../../../engine/box';
import type { EwaldOptions, EwaldParams } from '../../../engine/ewald/params';

/** Ewald accelerations and potentials for `targets` (input rows; null = all particles). */
export interface EwaldRequest {
  readonly type: 'ewald';
  readonly id: number;
  /** Flat xyz, length units. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  readonly targets: Int32Array | null;
  readonly options: EwaldOptions;
}

export type WorkerRequest = EwaldRequest;

/** Fraction done in [0, 1]; sent at most every PROGRESS_STEP and always at 1. */
export interface ProgressReply {
  readonly type: 'progress';
  readonly id: number;
  readonly fraction: number;
}

export interface EwaldReply {
  readonly type: 'result';
  readonly id: number;
  /** Targets (input rows) in output order. */
  readonly targets: Int32Array;
  /** Accelerations, 3 per target (G·mass/length²). */
  readonly acc: Float64Array;
  /** Potentials per target (G·mass/length), zero-mean convention. */
  readonly phi: Float64Array;
  readonly params: EwaldParams;
  /** Particles that lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  /** Time spent inside the worker on this request (ms). */
  readonly workerMs: number;
}

/** The engine refused the request (bad input) or failed; the worker itself is still usable. */
export interface ErrorReply {
  readonly type: 'error';
  readonly id: number;
  readonly name: string;
  readonly message: string;
}

export type WorkerReply = ProgressReply | EwaldReply | ErrorReply;

/** Progress messages are sent when the fraction has grown by at least this much (2 %). */
export const PROGRESS_STEP = 0.02;
