/**
 * The compute steps of the image-sum orders and particle-mesh Ewald (pipeline.ts hooks them in): one
 * method run for a slot, and the partial sums of the compared orders for the convergence plot.
 */
import type { Box } from '../../../engine/box';
import type { ImageSumOrderName } from '../../../engine/orders/imageSumOptions';
import type { MethodOptions } from '../methods/methodOptions';
import { isOrderMethod, type OrderMethodId, pmeLabelThreads } from '../methods/moreOptions';
import type { ComputeClient, Outcome } from '../worker/client';
import type { MethodForcesPayload, OrderTracePayload } from '../worker/methodRequests';
import type { RequestBody } from '../worker/protocol';
import type { SlotPlan } from './runPlan';
import type { Comparison, MethodRun } from './types';

/** Partial sums of one order for a few targets, with Ewald and the predicted limit of each. */
export interface OrderTrace {
  readonly method: OrderMethodId;
  /** Key of the method run the trace follows (a comparison shows only its own runs' traces). */
  readonly runKey: string;
  readonly order: ImageSumOrderName;
  /** The run's words ("sphere R 32"). */
  readonly label: string;
  readonly background: boolean;
  /** Input rows followed, and a tag per row ("worst 1", or "" for the others). */
  readonly targets: Int32Array;
  readonly tags: readonly string[];
  /** Shell radius R per row (cells; slab layers), or λ (1/length) for screened. */
  readonly shell: Float64Array;
  /** partial[(s·K + t)·3 + d] (G·mass/length²). */
  readonly partial: Float64Array;
  /** Tight Ewald accelerations and the order's predicted limit (null for nearest), 3 per target. */
  readonly ewald: Float64Array;
  readonly limit: Float64Array | null;
  readonly dipole: Float64Array;
}

/** Whether a run's method has partial sums to show. */
export function runHasTrace(run: MethodRun): boolean {
  return isOrderMethod(run.method) && run.method !== 'nearest' && !!run.order;
}

/** The particles a request carries (copies that move to the worker). */
export interface RequestBase {
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  readonly targets: Int32Array | null;
}

/** The worker request of an order or PME slot (other methods have theirs in pipeline.ts). */
export function methodRequestMore(opts: MethodOptions, base: RequestBase): RequestBody {
  if (opts.method === 'pme') return { type: 'pme', ...base, options: opts.options, ...(opts.threads !== undefined ? { threads: opts.threads } : {}) };
  if (opts.method !== 'ewald' && opts.method !== 'mesh' && opts.method !== 'file') return { type: 'order', ...base, options: opts.options };
  throw new Error(`no order or PME request for method ${opts.method}`);
}

/** The finished run of a slot from its worker payload. */
export function methodRunFrom(sp: SlotPlan, targetsKey: string, p: MethodForcesPayload, workerMs: number): MethodRun {
  return { key: sp.key, method: sp.method, label: p.threads !== undefined ? pmeLabelThreads(sp.label, p.threads) : sp.label, targetsKey, acc: p.acc, ewald: null, mesh: null, order: p.order, pme: p.pme, wrapped: p.wrapped, workerMs };
}

/**
 * The partial sums of the comparison's orders (A and/or B) for `rows` (input rows, sorted), against the
 * tight Ewald accelerations `ewald` of those rows; tagging the worst few of the comparison.
 */
export async function orderTracesRun(
  c: ComputeClient,
  cmp: Comparison,
  base: () => Promise<RequestBase & { readonly targets: Int32Array }>,
  ewald: Float64Array,
  worstCount: number,
): Promise<OrderTrace[]> {
  const rows = (await base()).targets;
  const worstRows = new Map<number, number>();
  for (let i = 0; i < Math.min(worstCount, cmp.summary.worst.length); i++) worstRows.set(cmp.targets.indices[cmp.summary.worst[i]], i + 1);
  const tags = Array.from(rows, (r) => (worstRows.has(r) ? `worst ${worstRows.get(r)}` : ''));
  const traces: OrderTrace[] = [];
  const seen = new Set<string>();
  for (const run of [cmp.runA, cmp.runB]) {
    if (!runHasTrace(run) || seen.has(run.key)) continue;
    seen.add(run.key);
    const o = run.order!;
    const options = {
      order: o.order,
      background: o.background,
      G: o.G,
      tol: o.tol,
      ...(o.shells !== null ? { shells: o.shells } : {}),
      ...(o.lambdas ? { lambdas: Float64Array.from(o.lambdas) } : {}),
    };
    const out = (await c.run({ type: 'orderTrace', ...(await base()), options, ewald: ewald.slice() })) as Outcome<OrderTracePayload>;
    const p = out.payload;
    traces.push({
      method: run.method as OrderMethodId,
      runKey: run.key,
      order: o.order,
      label: run.label,
      background: o.background,
      targets: p.targets,
      tags,
      shell: p.shell,
      partial: p.partial,
      ewald: p.ewald,
      limit: p.limit,
      dipole: p.dipole,
    });
  }
  return traces;
}
