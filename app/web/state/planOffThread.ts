/**
 * The run plan's measurements of large snapshots, made in the plan worker. runPlan.ts asks here first:
 * a finished answer is returned; one not yet there throws PlanPending with the worker's promise (the
 * caller waits, yields and plans again); when there is no plan worker, or it failed for this piece, the
 * answer is null and the page measures itself (in budgeted slices, planBudget.ts).
 */
import type { Box } from '../../../engine/box';
import type { MethodOptions } from '../methods/methodOptions';
import type { MethodPlan } from '../methods/methodPlan';
import type { PlanClient, PlanData } from '../worker/planClient';
import { PLAN_SLICE_MIN_N, PlanPending } from './planBudget';

/** Snapshots with at least this many particles are measured in the plan worker. */
export const PLAN_OFF_THREAD_MIN_N = PLAN_SLICE_MIN_N;

type Entry<T> = { readonly state: 'pending'; readonly wait: Promise<unknown> } | { readonly state: 'done'; readonly value: T } | { readonly state: 'failed' };

let client: PlanClient | null = null;
const entries = new Map<string, Entry<unknown>>();
const MAX_ENTRIES = 128;

/** Connects the plan worker's client (the page passes one; tests a fake or null). */
export function planClientSet(next: PlanClient | null): void {
  client = next;
  entries.clear();
}

/** Whether measurements of n particles go to the plan worker. */
export function planOffThread(n: number): boolean {
  return client !== null && n >= PLAN_OFF_THREAD_MIN_N;
}

function answer<T>(key: string, start: (c: PlanClient) => Promise<T>): T | null {
  const e = entries.get(key) as Entry<T> | undefined;
  if (e?.state === 'done') return e.value;
  if (e?.state === 'failed' || !client) return null;
  if (e?.state === 'pending') throw new PlanPending(e.wait);
  if (entries.size >= MAX_ENTRIES) entries.delete(entries.keys().next().value!);
  const wait = start(client).then(
    (value) => {
      entries.set(key, { state: 'done', value });
    },
    (err: unknown) => {
      // the page measures this piece itself from now on
      entries.set(key, { state: 'failed' });
      console.warn(`planning on the page instead: ${err instanceof Error ? err.message : String(err)}`);
    },
  );
  entries.set(key, { state: 'pending', wait });
  throw new PlanPending(wait);
}

/**
 * methodPlan(m, positions, masses, box, targets) from the plan worker, keyed by `key` (which must name the
 * snapshot, the method's options and the target count). Throws PlanPending while it is measured; null
 * when the page should measure itself.
 */
export function methodPlanOffThread(key: string, data: PlanData, box: Box, m: MethodOptions, targets: number): MethodPlan | null {
  return answer(`method|${key}`, (c) => c.methodPlan(data, box, m, targets));
}

/** A seeded sample of `count` of n rows from the plan worker (as methodPlanOffThread). */
export function sampleOffThread(n: number, count: number, seed: number): Int32Array | null {
  return answer(`sample|${n}|${count}|${seed}`, (c) => c.sample(n, count, seed));
}
