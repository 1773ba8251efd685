/**
 * Planning in slices: measuring a large snapshot (Ewald's parameter choice, drawing a target sample)
 * takes tens to hundreds of milliseconds each, and a plan may need several. Large snapshots are measured
 * in the plan worker (state/planOffThread.ts): a piece not yet there throws PlanPending carrying the
 * worker's answer to wait for. Without the worker, inside `withPlanBudget(1, …)` the plan does at most
 * one piece on the page and throws PlanPending if it needs more. Either way the caller yields to the
 * page and calls again (finished pieces are memoised), so the page stays responsive.
 */

/** The plan needs another piece of work; call again after yielding (and after `wait`, when given). */
export class PlanPending extends Error {
  constructor(readonly wait: Promise<unknown> | null = null) {
    super('plan pending');
    this.name = 'PlanPending';
  }
}

/** Snapshots smaller than this are planned in one go (their pieces are cheap). */
export const PLAN_SLICE_MIN_N = 20_000;

let budget = Infinity;

/** Called before a piece of heavy planning work on n particles (a memo miss). */
export function planWork(n: number): void {
  if (n < PLAN_SLICE_MIN_N) return;
  if (budget <= 0) throw new PlanPending();
  budget--;
}

/** Runs `f` allowing at most `pieces` pieces of heavy work. */
export function withPlanBudget<T>(pieces: number, f: () => T): T {
  const old = budget;
  budget = pieces;
  try {
    return f();
  } finally {
    budget = old;
  }
}

/**
 * Runs `f` piece by piece, yielding a task between pieces (and waiting for what the plan worker is
 * measuring), until it returns; stops when `alive()` turns false.
 */
export async function planSliced<T>(f: () => T, alive: () => boolean): Promise<T | null> {
  for (;;) {
    let wait: Promise<unknown> | null = null;
    try {
      return withPlanBudget(1, f);
    } catch (e) {
      if (!(e instanceof PlanPending)) throw e;
      wait = e.wait;
    }
    // a failed answer is remembered by whoever asked; the next attempt sees it
    if (wait) await wait.catch(() => undefined);
    else await new Promise((r) => setTimeout(r, 0));
    if (!alive()) return null;
  }
}
