/**
 * Worker requests of the image-sum orders and particle-mesh Ewald: their message types and how each runs
 * (engine calls only). Long runs go in chunks of targets (orders) or phases (PME) with progress between
 * them; cancelling terminates the worker (client.ts), so no chunk needs to look for it.
 */
import { targetsAll } from '../../../engine/targets';
import type { Box } from '../../../engine/box';
import type { Progress } from '../../../engine/ewald/ewald';
import { extrapolateToZero } from '../../../engine/orders/extrapolation';
import type { ImageSumOptions } from '../../../engine/orders/imageSumOptions';
import { type ImageSumParams, imageSumFinalize, imageSumPartialAlloc, imageSumSetup, imageSumTargetsChunk } from '../../../engine/orders/imageSumOrder';
import { pmeForces, type PmeResult } from '../../../engine/pme/pme';
import type { PmeOptions, PmeParams } from '../../../engine/pme/pmeParams';
import { pmeForcesParallel, pmeThreadsChoose, pmeThreadsEnvHere } from './pmeParallel';

interface Particles {
  /** Flat xyz, length units. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
}

/** An image-sum order's accelerations for the targets (input rows; null = all). */
export interface OrderRequest extends Particles {
  readonly type: 'order';
  readonly targets: Int32Array | null;
  readonly options: ImageSumOptions;
}

/**
 * The partial sums of an order shell by shell (or λ by λ) for a few targets, with their predicted limit
 * from the given Ewald accelerations of the same targets (3 per target, same G).
 */
export interface OrderTraceRequest extends Particles {
  readonly type: 'orderTrace';
  readonly targets: Int32Array;
  readonly options: ImageSumOptions;
  readonly ewald: Float64Array;
}

/** Particle-mesh Ewald for every particle; the targets' rows are returned (null = all). */
export interface PmeRequest extends Particles {
  readonly type: 'pme';
  readonly targets: Int32Array | null;
  readonly options: PmeOptions;
  /** Threads asked for (this worker and helpers, pmeParallel.ts); undefined = auto. */
  readonly threads?: number;
}

export type MethodRequest = OrderRequest | OrderTraceRequest | PmeRequest;

export interface MethodForcesPayload {
  readonly kind: 'methodForces';
  readonly method: 'order' | 'pme';
  /** Targets (input rows) in output order. */
  readonly targets: Int32Array;
  /** Accelerations, 3 per target (G·mass/length²). */
  readonly acc: Float64Array;
  readonly wrapped: number;
  readonly order: ImageSumParams | null;
  readonly pme: PmeParams | null;
  /** PME: the a-posteriori predicted rms relative error over all particles; else null. */
  readonly predictedRmsRelative: number | null;
  /** PME: threads that computed (the compute worker and its helpers); absent otherwise. */
  readonly threads?: number;
}

export interface OrderTracePayload {
  readonly kind: 'orderTrace';
  readonly targets: Int32Array;
  /** Shell radius R (cells; slab layers) or λ (1/length, screened) of each row. */
  readonly shell: Float64Array;
  /** Partial sums: acc[(s·K + t)·3 + d]. */
  readonly partial: Float64Array;
  readonly ewald: Float64Array;
  /** Predicted limit, 3 per target; null for nearest. */
  readonly limit: Float64Array | null;
  /** Box mass dipole D (mass·length). */
  readonly dipole: Float64Array;
  readonly params: ImageSumParams;
}

export type MethodPayload = MethodForcesPayload | OrderTracePayload;

/** Whether a request type is one of this file's. */
export function isMethodRequest(r: { readonly type: string }): r is MethodRequest {
  return r.type === 'order' || r.type === 'orderTrace' || r.type === 'pme';
}

/** Targets per chunk: about 1 % of the run each, at most 256 (the partial-sum table is per chunk). */
function chunkSize(k: number): number {
  return Math.max(1, Math.min(256, Math.ceil(k / 100)));
}

/** The web app lets the user run what the plan shows (with its time); the engine's work limit is lifted. */
function unlimited(options: ImageSumOptions): ImageSumOptions {
  return { ...options, maxWork: Infinity };
}

/** An order over the targets in chunks: final accelerations only (largest shell, λ → 0, or nearest image). */
export function orderRun(r: OrderRequest, progress: Progress): MethodForcesPayload {
  const n = r.masses.length;
  const targets = r.targets ?? targetsAll(n);
  const K = targets.length;
  const step = chunkSize(K);
  const setup = imageSumSetup(r.positions, r.masses, r.box, unlimited(r.options), Math.min(K, step));
  progress(0.02);
  const acc = new Float64Array(3 * K);
  const rows = setup.rows;
  const lambda2 = setup.options.order === 'screened' ? Array.from(setup.options.lambdas, (l) => l * l) : null;
  for (let b = 0; b < K; b += step) {
    const sub = targets.subarray(b, Math.min(K, b + step));
    const k = sub.length;
    const partial = imageSumPartialAlloc(setup, k);
    imageSumTargetsChunk(setup, sub, 0, k, partial);
    acc.set(lambda2 ? extrapolateToZero(lambda2, partial, 3 * k) : partial.subarray((rows - 1) * 3 * k, rows * 3 * k), 3 * b);
    progress(0.02 + (0.98 * (b + k)) / K);
  }
  return { kind: 'methodForces', method: 'order', targets, acc, wrapped: setup.wrapped, order: setup.params, pme: null, predictedRmsRelative: null };
}

/** The partial sums of a few targets and their predicted limit. */
export function orderTraceRun(r: OrderTraceRequest, progress: Progress): OrderTracePayload {
  const K = r.targets.length;
  const setup = imageSumSetup(r.positions, r.masses, r.box, unlimited(r.options), K);
  progress(0.05);
  const partial = imageSumPartialAlloc(setup, K);
  for (let t = 0; t < K; t++) {
    imageSumTargetsChunk(setup, r.targets, t, t + 1, partial);
    progress(0.05 + (0.95 * (t + 1)) / K);
  }
  const res = imageSumFinalize(setup, r.targets, partial, r.ewald);
  return { kind: 'orderTrace', targets: r.targets, shell: res.partial.shell, partial, ewald: res.ewald, limit: res.limit, dipole: res.dipole, params: res.params };
}

/** The payload of a PME run: the targets' rows of its all-particle result. */
function pmePayload(r: PmeRequest, res: PmeResult, threads: number): MethodForcesPayload {
  const n = r.masses.length;
  const targets = r.targets ?? targetsAll(n);
  let acc = res.acc;
  if (r.targets) {
    acc = new Float64Array(3 * targets.length);
    for (let t = 0; t < targets.length; t++) for (let d = 0; d < 3; d++) acc[3 * t + d] = res.acc[3 * targets[t] + d];
  }
  return { kind: 'methodForces', method: 'pme', targets, acc, wrapped: res.wrapped, order: null, pme: res.params, predictedRmsRelative: res.predictedRmsRelativeError, threads };
}

/** PME for every particle on this thread, then the targets' rows. */
export function pmeRun(r: PmeRequest, progress: Progress): MethodForcesPayload {
  return pmePayload(r, pmeForces(r.positions, r.masses, r.box, r.options, progress), 1);
}

/** PME for every particle, on helper workers too where shared memory allows (pmeParallel.ts), then the targets' rows. */
export async function pmeRunThreads(r: PmeRequest, progress: Progress, stop?: SharedArrayBuffer): Promise<MethodForcesPayload> {
  const threads = pmeThreadsChoose(r.threads, r.masses.length, pmeThreadsEnvHere());
  if (threads <= 1) return pmeRun(r, progress);
  const res = await pmeForcesParallel(r.positions, r.masses, r.box, r.options, threads, progress, undefined, stop);
  return pmePayload(r, res, res.threadsUsed);
}

/** Runs one of this file's requests to its payload (PME asynchronously: it waits for its helpers). */
export function methodRequestRun(r: MethodRequest, progress: Progress, stop?: SharedArrayBuffer): MethodPayload | Promise<MethodPayload> {
  switch (r.type) {
    case 'order':
      return orderRun(r, progress);
    case 'orderTrace':
      return orderTraceRun(r, progress);
    case 'pme':
      return pmeRunThreads(r, progress, stop);
  }
}
