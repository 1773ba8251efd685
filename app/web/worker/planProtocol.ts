/**
 * Messages between the page and the plan worker (plan.worker.ts), which measures snapshots for the run
 * plan off the page's thread. A snapshot is sent once and kept there under `dataId`: `data` announces its
 * size (the worker allocates the arrays), `dataPart`s carry slices of it (small copies, moved), so the
 * page never allocates or copies the whole snapshot in one task. Plan requests then carry only options.
 */
import type { Box } from '../../../engine/box';
import type { MethodOptions } from '../methods/methodOptions';
import type { MethodPlan } from '../methods/methodPlan';

export type PlanRequest =
  | { readonly type: 'data'; readonly id: number; readonly dataId: number; readonly n: number }
  | { readonly type: 'dataPart'; readonly id: number; readonly dataId: number; readonly array: 'positions' | 'masses'; readonly offset: number; readonly values: Float64Array }
  | { readonly type: 'method'; readonly id: number; readonly dataId: number; readonly box: Box; readonly method: MethodOptions; readonly targets: number }
  | { readonly type: 'sample'; readonly id: number; readonly n: number; readonly count: number; readonly seed: number };

export type PlanReply =
  | { readonly type: 'method'; readonly id: number; readonly plan: MethodPlan }
  | { readonly type: 'sample'; readonly id: number; readonly indices: Int32Array }
  | { readonly type: 'error'; readonly id: number; readonly name: string; readonly message: string };
