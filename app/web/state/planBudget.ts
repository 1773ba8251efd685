/**
 * Planning in slices: measuring a large snapshot (Ewald's parameter choice, drawing a target sample)
 * takes tens of milliseconds each, and a plan may need several. Inside `withPlanBudget(1, …)` the plan
 * does at most one such piece and throws PlanPending if it needs more; the caller yields to the page and
 * calls again (finished pieces are memoised), so no single task holds the page for long.
 */

/** The plan needs another piece of work; call again after yielding. */
export class PlanPending extends Error {
  constructor() {
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

/** Runs `f` piece by piece, yielding a task between pieces, until it returns; stops when `alive()` turns false. */
export async function planSliced<T>(f: () => T, alive: () => boolean): Promise<T | null> {
  for (;;) {
    try {
      return withPlanBudget(1, f);
    } catch (e) {
      if (!(e instanceof PlanPending)) throw e;
    }
    await new Promise((r) => setTimeout(r, 0));
    if (!alive()) return null;
  }
}
