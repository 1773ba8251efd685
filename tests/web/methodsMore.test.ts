/**
 * The image-sum orders and particle-mesh Ewald as methods of the inspector: registry entries, parsers
 * (one-line errors naming the parameter), plans (parameters, predicted shape term, expected time), the
 * worker requests (same numbers as the engine's own one-thread drivers), the PME reference for all
 * particles, and the compute path through the store with re-use of finished runs.
 */
import { beforeEach, describe, expect, test } from 'vitest';
import { boxMake, boxVolume } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { imageSumOptionsResolve, imageSumOrder, imageSumWork } from '../../engine/orders';
import { pmeForces } from '../../engine/pme';
import { methodOptionsKey, methodOptionsParse } from '../../app/web/methods/methodOptions';
import { methodPlan } from '../../app/web/methods/methodPlan';
import { ORDER_NS_PER_WORK } from '../../app/web/methods/orderPlan';
import { pmeParamsPlan } from '../../app/web/methods/pmePlan';
import { METHODS, paramDefaults, paramsVisible } from '../../app/web/methods/registry';
import { CancelledError, type ComputeClient, type Outcome } from '../../app/web/worker/client';
import { requestRun } from '../../app/web/worker/handleRequest';
import type { MethodForcesPayload, OrderTracePayload } from '../../app/web/worker/methodRequests';
import type { RequestBody } from '../../app/web/worker/protocol';
import { computeClientSet, computeStart, convergenceStart } from '../../app/web/state/pipeline';
import { runPlanMake } from '../../app/web/state/runPlan';
import { DEFAULT_DRAFT } from '../../app/web/state/settings';
import { appReset, appStore, draftSet, slotMethodSet, slotParamSet } from '../../app/web/state/store';

const p = paramDefaults();
const box = boxMake(1);

describe('the registry', () => {
  test('lists every order and PME as ready, each parameter with a default', () => {
    expect(METHODS.filter((m) => !m.ready)).toEqual([]);
    expect(paramsVisible('sphere', p).map((s) => s.key)).toEqual(['sphere.shells', 'order.background', 'order.tol']);
    expect(paramsVisible('slab', p).map((s) => s.key)).toEqual(['slab.axis', 'slab.shells', 'order.background', 'order.tol']);
    expect(paramsVisible('screened', p).map((s) => s.key)).toEqual(['screened.lambdas', 'order.tol']);
    expect(paramsVisible('nearest', p)).toEqual([]);
    expect(paramsVisible('pme', { ...p, 'ewald.softening': 'plummer' }).map((s) => s.key)).toEqual(['pme.tol', 'pme.mesh', 'pme.order', 'pme.influence', 'pme.threads', 'ewald.softening', 'ewald.eps']);
  });
});

describe('methodOptionsParse for orders and PME', () => {
  test('reads shells, background, slab normal, λ values and PME overrides into the engine’s options', () => {
    expect(methodOptionsParse('sphere', p, 2)).toEqual({ method: 'sphere', options: { order: 'sphere', shells: 32, background: true, G: 2, tol: 1e-10 } });
    expect(methodOptionsParse('slab', { ...p, 'slab.axis': 'x', 'slab.shells': '5', 'order.background': 'kept' }, 1)).toEqual({
      method: 'slab',
      options: { order: 'slab-x', shells: 5, background: false, G: 1, tol: 1e-10 },
    });
    expect(methodOptionsParse('screened', p, 1)).toEqual({ method: 'screened', options: { order: 'screened', G: 1, tol: 1e-10 } });
    const s = methodOptionsParse('screened', { ...p, 'screened.lambdas': '1, 0.5 0.25' }, 1);
    expect(s.method === 'screened' && Array.from(s.options.lambdas!)).toEqual([1, 0.5, 0.25]);
    expect(methodOptionsParse('nearest', p, 1)).toEqual({ method: 'nearest', options: { order: 'nearest', G: 1 } });
    expect(methodOptionsParse('pme', { ...p, 'pme.mesh': '48', 'pme.order': '6', 'ewald.softening': 'spline', 'ewald.eps': '0.01' }, 1)).toEqual({
      method: 'pme',
      options: { tol: 1e-6, G: 1, influence: 'optimal', softening: { kind: 'spline', h: 0.01 }, mesh: 48, order: 6 },
    });
  });

  test('keys differ whenever the computation differs, and not otherwise', () => {
    const key = (m: Parameters<typeof methodOptionsParse>[0], patch: Record<string, string>) => methodOptionsKey(methodOptionsParse(m, { ...p, ...patch }, 1));
    const keys = [
      key('sphere', {}),
      key('sphere', { 'sphere.shells': '8' }),
      key('sphere', { 'order.background': 'kept' }),
      key('cube', {}),
      key('slab', {}),
      key('slab', { 'slab.axis': 'y' }),
      key('screened', {}),
      key('screened', { 'screened.lambdas': '1,2' }),
      key('nearest', {}),
      key('pme', {}),
      key('pme', { 'pme.mesh': '32' }),
      key('pme', { 'pme.influence': 'spme' }),
    ];
    expect(new Set(keys).size).toBe(keys.length);
    expect(key('sphere', { 'cube.shells': '3' })).toBe(key('sphere', {}));
  });

  test.each([
    ['sphere', { 'sphere.shells': '0' }, 'shells R: expected a whole number from 1 to 4096, got "0"'],
    ['cube', { 'cube.shells': '2.5' }, 'shells R: expected a whole number from 1 to 4096, got "2.5"'],
    ['slab', { 'slab.axis': 'w' }, 'slab normal: expected x, y or z, got "w"'],
    ['sphere', { 'order.tol': '1' }, 'exact-part tolerance: expected a number from 1e-14 to 1e-2, got "1"'],
    ['sphere', { 'order.background': 'maybe' }, 'mean density: expected removed or kept, got "maybe"'],
    ['screened', { 'screened.lambdas': '0.5' }, 'λ values: expected "auto" or at least two values to extrapolate to λ → 0, got "0.5"'],
    ['screened', { 'screened.lambdas': '1,-1' }, 'λ values: value 2 ("-1") is not a positive number (1/length)'],
    ['screened', { 'screened.lambdas': '1,1' }, 'λ values: value 2 repeats value 1 (1); the values must be distinct'],
    ['pme', { 'pme.tol': '0' }, 'PME tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "0"'],
    ['pme', { 'pme.mesh': '34' }, 'mesh points per side: expected an even number with prime factors 2, 3, 5 only (such as 32, 48, 64, 96), got "34"'],
    ['pme', { 'pme.order': '13' }, 'B-spline order p: expected a whole number from 2 to 12, got "13"'],
    ['pme', { 'ewald.softening': 'plummer', 'ewald.eps': '0' }, 'Plummer ε: expected a positive length, got "0"'],
  ] as const)('%s %o is refused with one line naming the parameter', (method, patch, message) => {
    expect(() => methodOptionsParse(method, { ...p, ...patch }, 1)).toThrow(message);
  });
});

describe('methodPlan for orders and PME', () => {
  const d = demoSnapshot(1500, 3);

  test('an order shows its shells and the shape term G N·D/V, with D summed here independently', () => {
    const m = methodOptionsParse('sphere', p, 1);
    const plan = methodPlan(m, d.positions, d.masses, box, 100);
    // independent derivation (de Leeuw, Perram & Smith 1980): sphere N = (4π/3) I, D = Σ m_j (r_j − c)
    const D = [0, 0, 0];
    for (let j = 0; j < d.masses.length; j++) for (let k = 0; k < 3; k++) D[k] += d.masses[j] * ((((d.positions[3 * j + k] % 1) + 1) % 1) - 0.5);
    const want = ((4 * Math.PI) / 3) * Math.hypot(D[0], D[1], D[2]);
    const got = plan.lines.find((l) => l.key === 'shapeTerm')!.value as number;
    expect(Math.abs(got - want) / want).toBeLessThan(1e-12);
    expect(plan.lines.find((l) => l.key === 'shells')!.value).toBe('0 … 32');
    expect(plan.predictedRelative).toBeNull();
    // the time is the engine's work estimate at the measured rate of the order
    const work = imageSumWork(imageSumOptionsResolve(m.method === 'sphere' ? m.options : { order: 'sphere' }, box), box, 1500, 100);
    expect(plan.costNs).toBeCloseTo(work * ORDER_NS_PER_WORK.sphere, 0);
    expect(methodPlan(m, d.positions, d.masses, box, 1000).costNs).toBeGreaterThan(plan.costNs);
  });

  test('without the background there is no common shape term; screened and nearest say what they tend to', () => {
    const kept = methodPlan(methodOptionsParse('cube', { ...p, 'order.background': 'kept' }, 1), d.positions, d.masses, box, 10);
    expect(kept.lines.some((l) => l.key === 'shapeTerm')).toBe(false);
    expect(kept.note).toContain('homologous');
    expect(methodPlan(methodOptionsParse('screened', p, 1), d.positions, d.masses, box, 10).note).toContain('tends to Ewald as λ → 0');
    expect(methodPlan(methodOptionsParse('nearest', p, 1), d.positions, d.masses, box, 10).note).toContain('no limit');
  });

  test('PME’s plan chooses the parameters pmeForces then uses, with its predicted error', () => {
    const m = methodOptionsParse('pme', { ...p, 'pme.tol': '1e-4' }, 1);
    const plan = methodPlan(m, d.positions, d.masses, box, 10);
    const run = pmeForces(d.positions, d.masses, box, { tol: 1e-4, G: 1, influence: 'optimal', softening: { kind: 'none' } });
    expect(plan.lines.find((l) => l.key === 'alpha')!.value).toBe(run.params.alpha);
    expect(plan.lines.find((l) => l.key === 'mesh')!.value).toBe(run.params.mesh.join(' × '));
    expect(plan.predictedRelative).toBe(run.params.predictedRelativeError);
    expect(plan.predictedRelative!).toBeLessThan(1e-4);
    expect(pmeParamsPlan(d.positions, d.masses, box, { tol: 1e-4, mesh: 32, order: 5 }).mesh).toEqual([32, 32, 32]);
  });
});

describe('worker requests of orders and PME', () => {
  const d = demoSnapshot(200, 7);
  const targets = Int32Array.from([3, 50, 51, 120, 199]);
  const copy = () => ({ positions: d.positions.slice(), masses: d.masses.slice(), box });

  test('"order" gives imageSumOrder’s accelerations for the targets, for every order', async () => {
    for (const options of [
      { order: 'sphere', shells: 4 },
      { order: 'cube', shells: 3, background: false },
      { order: 'slab-y', shells: 3 },
      { order: 'screened' },
      { order: 'nearest' },
    ] as const) {
      const want = imageSumOrder(d.positions, d.masses, box, targets, options);
      const got = (await requestRun({ type: 'order', ...copy(), targets: targets.slice(), options }, () => {})) as MethodForcesPayload;
      expect(got.kind).toBe('methodForces');
      expect(Array.from(got.targets)).toEqual(Array.from(targets));
      for (let i = 0; i < want.acc.length; i++) expect(Math.abs(got.acc[i] - want.acc[i])).toBeLessThanOrEqual(1e-13 * Math.abs(want.acc[i]) + 1e-300);
      expect(got.order!.order).toBe(options.order);
    }
  });

  test('"order" nearest image of two particles is Newton at the minimum-image distance (hand computation)', async () => {
    // masses 2 and 3 at x = 0.1 and 0.8 in a unit box: minimum image 0.3 apart, particle 0 pulled towards −x
    const got = (await requestRun(
      { type: 'order', positions: Float64Array.from([0.1, 0.5, 0.5, 0.8, 0.5, 0.5]), masses: Float64Array.from([2, 3]), box, targets: null, options: { order: 'nearest', G: 1 } },
      () => {},
    )) as MethodForcesPayload;
    expect(got.acc[0]).toBeCloseTo(-3 / 0.09, 12);
    expect(got.acc[3]).toBeCloseTo(2 / 0.09, 12);
  });

  test('"orderTrace" gives the partial sums and the predicted limit of the engine, from the Ewald values sent', async () => {
    const options = { order: 'sphere', shells: 6 } as const;
    const want = imageSumOrder(d.positions, d.masses, box, targets, options);
    const got = (await requestRun({ type: 'orderTrace', ...copy(), targets: targets.slice(), options, ewald: want.ewald.slice() }, () => {})) as OrderTracePayload;
    expect(Array.from(got.shell)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    expect(Array.from(got.partial)).toEqual(Array.from(want.partial.acc));
    expect(Array.from(got.limit!)).toEqual(Array.from(want.limit!));
  });

  test('"pme" gives pmeForces’ rows of the targets, with progress reaching 1', async () => {
    const seen: number[] = [];
    const got = (await requestRun({ type: 'pme', ...copy(), targets: targets.slice(), options: { tol: 1e-5 } }, (f) => seen.push(f))) as MethodForcesPayload;
    const want = pmeForces(d.positions, d.masses, box, { tol: 1e-5 });
    for (let t = 0; t < targets.length; t++) for (let k = 0; k < 3; k++) expect(got.acc[3 * t + k]).toBe(want.acc[3 * targets[t] + k]);
    expect(got.pme!.mesh).toEqual(want.params.mesh);
    expect(seen.at(-1)).toBe(1);
  });

  test('bad input is one error naming the particles (coincident particles)', async () => {
    const pos = d.positions.slice();
    pos.set(pos.subarray(0, 3), 3);
    await expect(requestRun({ type: 'order', positions: pos, masses: d.masses.slice(), box, targets: null, options: { order: 'sphere', shells: 2 } }, () => {})).rejects.toThrow(/particles 0 and 1 sit at the same position/);
  });
});

/** A client that runs the worker's handler in this thread and records the request types. */
function inlineClient() {
  const log: RequestBody[] = [];
  const client: ComputeClient = {
    run(body, onProgress) {
      log.push(body);
      return requestRun(body, (f) => onProgress?.(f)).then((payload): Outcome => ({ payload, workerMs: 50 }));
    },
    cancel: () => false,
    busy: () => false,
    dispose: () => {},
  };
  return { client, types: () => log.map((r) => r.type), log };
}

describe('the compute path', () => {
  beforeEach(() => appReset({ ...DEFAULT_DRAFT, n: '400', targets: '30' }));

  test('an order in A is computed in the worker, kept, and re-used when toggled back; its partial sums go to the convergence run', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    slotMethodSet('a', 'sphere');
    slotParamSet('a', 'sphere.shells', '5');
    await computeStart();
    let s = appStore.getState();
    expect(s.status).toBe('done');
    expect(s.comparison!.runA.label).toBe('sphere R 5');
    expect(s.comparison!.runA.order!.shells).toBe(5);
    expect(c.types()).toEqual(['order', 'ewald', 'neighbours', 'compare']);
    slotMethodSet('a', 'cube');
    await computeStart();
    slotMethodSet('a', 'sphere');
    const before = c.log.length;
    await computeStart();
    expect(c.types().slice(before)).toEqual(['compare']);
    await convergenceStart();
    s = appStore.getState();
    expect(s.convergenceStatus).toBe('done');
    const trace = s.convergence!.orders![0];
    expect(trace.method).toBe('sphere');
    expect(trace.targets.length).toBe(16);
    expect(trace.shell.length).toBe(6);
    expect(trace.tags.filter(Boolean)).toHaveLength(4);
  });

  test('asked for all particles, B’s Ewald becomes PME when direct Ewald would exceed 8 s, and says so', () => {
    draftSet({ targets: 'all' });
    appStore.setState({ calibration: { ewald: 1000 } });
    let plan = runPlanMake(appStore.getState());
    expect(plan.b.method).toBe('pme');
    expect(plan.b.label).toBe('PME tol 1e-6');
    expect(plan.b.plan.note).toMatch(/^reference: particle-mesh Ewald instead of direct Ewald — all 400 particles by direct Ewald would take ≈/);
    slotParamSet('b', 'ewald.all', 'direct');
    expect(runPlanMake(appStore.getState()).b.method).toBe('ewald');
    slotParamSet('b', 'ewald.all', 'auto');
    appStore.setState({ calibration: {} });
    plan = runPlanMake(appStore.getState());
    expect(plan.b.method).toBe('ewald');
    // "auto" targets never switch the reference
    draftSet({ targets: 'auto' });
    appStore.setState({ calibration: { ewald: 1000 } });
    expect(runPlanMake(appStore.getState()).b.method).toBe('ewald');
  });

  test('"auto" targets sample an order whose all-particle run would exceed 8 s, even below 10 000 particles', () => {
    appReset({ ...DEFAULT_DRAFT, n: '4096' });
    slotMethodSet('a', 'sphere');
    const plan = runPlanMake(appStore.getState());
    expect(plan.targets.all).toBe(false);
    expect(plan.autoSampledFromMs!).toBeGreaterThan(8000);
    expect(plan.a.expectedMs).toBeGreaterThan(0);
  });
});
