/**
 * Messages between the page and the compute worker. Typed arrays travel as transfers (their buffers
 * move, they are not copied); `id` ties every reply to the request that caused it. Each request type
 * is one engine call (or one short loop of engine calls); its result comes back as one payload.
 */
import type { Box } from '../../../engine/box';
import type { EwaldOptions, EwaldParams } from '../../../engine/ewald/params';
import type { MeshOptions, MeshParams } from '../../../engine/codeUnderTest/meshForces';
import type { CdfPoints, LogHistogram } from '../../../engine/stats/bins';
import type { ErrorSummary } from '../../../engine/stats/errorSummary';
import type { DescribePayload, DescribeRequest, LoadPayload, LoadRequest } from './loadProtocol';
import type { MethodPayload, MethodRequest } from './methodRequests';

export type { DescribePayload, DescribeRequest, LoadPayload, LoadRequest } from './loadProtocol';

interface ParticlesIn {
  /** Flat xyz, length units. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  /** Input rows to compute for; null = all particles. */
  readonly targets: Int32Array | null;
}

/** Ewald accelerations and potentials (the reference). */
export interface EwaldRequest extends ParticlesIn {
  readonly type: 'ewald';
  readonly options: EwaldOptions;
}

/** The coarse particle-mesh "code under test". */
export interface MeshRequest extends ParticlesIn {
  readonly type: 'mesh';
  readonly options: MeshOptions;
}

/** The same method at several parameter sets, for the same targets (convergence plots). */
export type SweepRequest =
  | (ParticlesIn & { readonly type: 'sweep'; readonly method: 'ewald'; readonly options: readonly EwaldOptions[] })
  | (ParticlesIn & { readonly type: 'sweep'; readonly method: 'mesh'; readonly options: readonly MeshOptions[] });

/** Nearest-neighbour distances and local densities of the targets. */
export interface NeighboursRequest {
  readonly type: 'neighbours';
  readonly positions: Float64Array;
  readonly box: Box;
  readonly targets: Int32Array | null;
  readonly k: number;
}

/** Statistics of A against reference B (flat xyz, 3 per target). */
export interface CompareRequest {
  readonly type: 'compare';
  readonly accA: Float64Array;
  readonly accB: Float64Array;
  readonly worst: number;
}

/** The built-in demo snapshot (engine/demo), for sizes too large to make on the page's thread. */
export interface DemoRequest {
  readonly type: 'demo';
  readonly n: number;
  readonly seed: number;
}

export type RequestBody = DemoRequest | EwaldRequest | MeshRequest | SweepRequest | NeighboursRequest | CompareRequest | DescribeRequest | LoadRequest | MethodRequest;
/**
 * A request as posted: its body, an id, and (on a cross-origin isolated page) a stop flag, one Int32 in
 * shared memory that the page sets before it terminates the worker on Cancel, so that helper workers
 * the compute worker started stop at their next unit of work instead of finishing their phase.
 */
export type WorkerRequest = RequestBody & { readonly id: number; readonly stop?: SharedArrayBuffer };

export interface ForcesPayload {
  readonly kind: 'forces';
  /** Targets (input rows) in output order. */
  readonly targets: Int32Array;
  /** Accelerations, 3 per target (G·mass/length²). */
  readonly acc: Float64Array;
  /** Potentials per target (Ewald only; zero-mean convention). */
  readonly phi: Float64Array | null;
  readonly ewald: EwaldParams | null;
  readonly mesh: MeshParams | null;
  /** Particles that lay outside the home cell and were wrapped. */
  readonly wrapped: number;
}

export interface SweepPayload {
  readonly kind: 'sweep';
  readonly targets: Int32Array;
  /** One acceleration set (3 per target) per parameter set, in request order. */
  readonly acc: Float64Array[];
  readonly ewald: (EwaldParams | null)[];
  readonly mesh: (MeshParams | null)[];
}

export interface NeighboursPayload {
  readonly kind: 'neighbours';
  readonly nearest: Float64Array;
  readonly kth: Float64Array;
  readonly density: Float64Array;
  readonly kUsed: number;
  readonly meanDensity: number;
}

export interface ComparePayload {
  readonly kind: 'compare';
  readonly relative: Float64Array;
  readonly summary: ErrorSummary;
  readonly histogram: LogHistogram;
  readonly cdf: CdfPoints;
}

export interface DemoPayload {
  readonly kind: 'demo';
  readonly positions: Float64Array;
  readonly masses: Float64Array;
}

export type ResultPayload = DemoPayload | ForcesPayload | SweepPayload | NeighboursPayload | ComparePayload | DescribePayload | LoadPayload | MethodPayload;

/** Fraction done in [0, 1]; sent at most every PROGRESS_STEP and always at 1. */
export interface ProgressReply {
  readonly type: 'progress';
  readonly id: number;
  readonly fraction: number;
}

export interface ResultReply {
  readonly type: 'result';
  readonly id: number;
  readonly payload: ResultPayload;
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

export type WorkerReply = ProgressReply | ResultReply | ErrorReply;

/** Progress messages are sent when the fraction has grown by at least this much (2 %). */
export const PROGRESS_STEP = 0.02;

/** Buffers of the typed arrays among an object's own values and arrays of them (each buffer once). */
export function transferables(obj: object): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>();
  const add = (v: unknown) => {
    if (ArrayBuffer.isView(v) && v.buffer instanceof ArrayBuffer && v.buffer.byteLength > 0) out.add(v.buffer);
  };
  for (const v of Object.values(obj)) {
    if (Array.isArray(v)) v.forEach(add);
    else add(v);
  }
  return [...out];
}
