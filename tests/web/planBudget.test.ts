import { afterEach, describe, expect, test, vi } from 'vitest';
import { targetsResolve } from '../../engine/targets';
import { methodPlan } from '../../app/web/methods/methodPlan';
import { PLAN_SLICE_MIN_N, PlanPending, planSliced, planWork, withPlanBudget } from '../../app/web/state/planBudget';
import { PLAN_OFF_THREAD_MIN_N, planClientSet, planOffThread } from '../../app/web/state/planOffThread';
import type { PlanClient } from '../../app/web/worker/planClient';
import { type PlanHolder, planHandle } from '../../app/web/worker/planHandle';
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

describe('planning large snapshots in the plan worker (planOffThread)', () => {
  /** A plan client that answers on a later task, as the worker would, counting its requests. */
  function clientOver(fail: boolean) {
    const holder: PlanHolder = { data: null };
    let dataId = 0;
    const asked: string[] = [];
    const later = <T>(f: () => T) => new Promise<T>((resolve, reject) => setTimeout(() => (fail ? reject(new Error('the planning worker stopped: test')) : resolve(f())), 1));
    const client: PlanClient = {
      methodPlan(data, box, m, targets) {
        asked.push(`method ${m.method} ${targets}`);
        return later(() => {
          planHandle(holder, { type: 'data', id: 0, dataId: ++dataId, n: data.masses.length });
          planHandle(holder, { type: 'dataPart', id: 0, dataId, array: 'positions', offset: 0, values: data.positions });
          planHandle(holder, { type: 'dataPart', id: 0, dataId, array: 'masses', offset: 0, values: data.masses });
          const out = planHandle(holder, { type: 'method', id: 1, dataId, box, method: m, targets })!;
          if (out.reply.type !== 'method') throw new Error(out.reply.type);
          return out.reply.plan;
        });
      },
      sample(n, count, seed) {
        asked.push(`sample ${count}`);
        return later(() => targetsResolve({ kind: 'sample', count, seed }, n));
      },
      dispose() {},
    };
    return { client, asked };
  }

  afterEach(() => planClientSet(null));

  /** What the plan must hold, measured directly on the page (methodPlan, targetsResolve). */
  function expectPagePlan(p: ReturnType<typeof runPlanMake>, n: number, seed: number) {
    const s = p.snapshot;
    expect(s.n).toBe(n);
    const k = p.targets.indices.length;
    expect(Array.from(p.targets.indices)).toEqual(Array.from(targetsResolve(p.targets.all ? { kind: 'all' } : { kind: 'sample', count: k, seed }, n)));
    expect(p.a.plan).toEqual(methodPlan(p.a.options, s.positions, s.masses, s.box, k));
    expect(p.b.plan).toEqual(methodPlan(p.b.options, s.positions, s.masses, s.box, k));
  }

  test('a 30 000-particle plan made through the plan worker equals what the page measures', async () => {
    appReset({ ...DEFAULT_DRAFT, n: '30011', targets: 'auto', seed: '3' });
    const { client, asked } = clientOver(false);
    planClientSet(client);
    expect(planOffThread(30_011)).toBe(true);
    expect(planOffThread(PLAN_OFF_THREAD_MIN_N - 1)).toBe(false);
    // under a budget of no page work at all: every measurement must come from the worker
    const viaWorker = await planSlicedNoPageWork(() => runPlanMake(appStore.getState()));
    expect(asked.some((a) => a.startsWith('method ewald'))).toBe(true);
    expect(asked).toContain('sample 10000');
    expect(viaWorker.targets.all).toBe(true); // 30 011 targets fit the "auto" budget
    expectPagePlan(viaWorker, 30_011, 3);
  });

  test('when the plan worker fails, the page plans itself (same plan)', async () => {
    appReset({ ...DEFAULT_DRAFT, n: '30013', targets: '2000', seed: '5' });
    const { client, asked } = clientOver(true);
    planClientSet(client);
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => undefined);
    const p = await planSliced(() => runPlanMake(appStore.getState()), () => true);
    expect(asked.length).toBeGreaterThan(0);
    expect(warn).toHaveBeenCalled();
    warn.mockRestore();
    expectPagePlan(p!, 30_013, 5);
  });
});

/** planSliced with a budget of zero page pieces: fails if the plan needs any measurement on the page. */
async function planSlicedNoPageWork<T>(f: () => T): Promise<T> {
  for (let i = 0; i < 50; i++) {
    try {
      return withPlanBudget(0, f);
    } catch (e) {
      if (!(e instanceof PlanPending) || !e.wait) throw e;
      await e.wait;
    }
  }
  throw new Error('the plan did not finish in 50 rounds');
}
