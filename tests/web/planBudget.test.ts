import { describe, expect, test } from 'vitest';
import { PLAN_SLICE_MIN_N, PlanPending, planSliced, planWork, withPlanBudget } from '../../app/web/state/planBudget';
import { appReset, appStore } from '../../app/web/state/store';
import { runPlanMake } from '../../app/web/state/runPlan';
import { DEFAULT_DRAFT } from '../../app/web/state/settings';

describe('withPlanBudget(pieces, f) / planSliced(f, alive)', () => {
  test('a function needing three pieces throws PlanPending under a budget of one, and completes in three slices', async () => {
    const done = new Set<number>();
    const f = () => {
      for (const k of [1, 2, 3]) {
        if (!done.has(k)) {
          planWork(PLAN_SLICE_MIN_N);
          done.add(k);
        }
      }
      return 'planned';
    };
    expect(() => withPlanBudget(1, f)).toThrow(PlanPending);
    expect(done.size).toBe(1);
    let calls = 0;
    const g = () => {
      calls++;
      return f();
    };
    await expect(planSliced(g, () => true)).resolves.toBe('planned');
    expect(calls).toBe(2); // pieces 2 and 3, one per slice
    // small snapshots are planned in one go; outside a budget nothing is limited
    expect(() => withPlanBudget(0, () => planWork(PLAN_SLICE_MIN_N - 1))).not.toThrow();
    expect(() => planWork(10 ** 7)).not.toThrow();
  });

  test('planSliced stops (null) when the caller is no longer interested', async () => {
    const f = () => {
      planWork(PLAN_SLICE_MIN_N);
      planWork(PLAN_SLICE_MIN_N);
      return 1;
    };
    await expect(planSliced(f, () => false)).resolves.toBeNull();
  });

  test('a sliced plan of a 30 000-particle demo equals the plan made in one go', async () => {
    appReset({ ...DEFAULT_DRAFT, n: '30000', targets: '3000', seed: '7' });
    const sliced = await planSliced(() => runPlanMake(appStore.getState()), () => true);
    const whole = runPlanMake(appStore.getState());
    expect(sliced!.targets.indices).toEqual(whole.targets.indices);
    expect(sliced!.b.plan).toEqual(whole.b.plan);
    expect(sliced!.expectedMs).toBe(whole.expectedMs);
  });
});
