import { beforeEach, describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { errorReport } from '../../engine/stats/errorReport';
import { targetsResolve } from '../../engine/targets';
import { CancelledError, type ComputeClient, type Outcome, WorkerCrashError } from '../../app/web/worker/client';
import { requestRun } from '../../app/web/worker/handleRequest';
import type { RequestBody } from '../../app/web/worker/protocol';
import { DEFAULT_DRAFT } from '../../app/web/state/settings';
import { appReset, appStore, draftSet, slotMethodSet, slotParamSet } from '../../app/web/state/store';
import { computeCancel, computeClientSet, computeStart, convergenceStart, SWEEP_MESHES, SWEEP_TOLERANCES } from '../../app/web/state/pipeline';
import { fileLoad } from '../../app/web/state/loadActions';
import { runPlanMake } from '../../app/web/state/runPlan';

/**
 * A client that runs the worker's own request handler in this thread. Requests whose type is listed in
 * `hold` wait until the test calls release() or fail(); every request is recorded.
 */
function inlineClient(hold: string[] = []) {
  const log: RequestBody[] = [];
  const waiting: { resolve: () => void; reject: (e: Error) => void }[] = [];
  let current: { reject: (e: Error) => void } | null = null;
  const client: ComputeClient = {
    run(body, onProgress) {
      current?.reject(new CancelledError());
      log.push(body);
      return new Promise<Outcome>((resolve, reject) => {
        current = { reject };
        const go = () =>
          requestRun(body, (f) => onProgress?.(f)).then(
            (payload) => {
              current = null;
              resolve({ payload, workerMs: 1 });
            },
            (e) => {
              current = null;
              reject(e);
            },
          );
        if (hold.includes(body.type)) waiting.push({ resolve: () => void go(), reject });
        else void go();
      });
    },
    cancel() {
      const c = current;
      current = null;
      c?.reject(new CancelledError());
      return c !== null;
    },
    busy: () => current !== null,
    dispose: () => {},
  };
  return { client, log, waiting, types: () => log.map((r) => r.type) };
}

const N = 300;

beforeEach(() => {
  appReset({ ...DEFAULT_DRAFT, n: String(N) });
  computeClientSet(null);
});

describe('computeStart() on the demo', () => {
  test('compares the coarse mesh (A) with the Ewald reference (B) on all particles, in the worker', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    const p = computeStart();
    expect(appStore.getState().status).toBe('computing');
    await p;
    const s = appStore.getState();
    expect(s.status).toBe('done');
    expect(s.progress).toBe(1);
    expect(c.types()).toEqual(['mesh', 'ewald', 'neighbours', 'compare']);
    const d = demoSnapshot(N, 1);
    const box = boxMake(1);
    const mesh = meshForces(d.positions, d.masses, box, null, { mesh: 32, G: 1 });
    const ewald = ewaldForces(d.positions, d.masses, box, null, { tol: 1e-6, G: 1, softening: { kind: 'none' } });
    const ref = errorReport(mesh.acc, ewald.acc, 50);
    const cmp = s.comparison!;
    expect(cmp.runA.label).toBe('mesh 32³');
    expect(cmp.runB.label).toBe('Ewald tol 1e-6');
    expect(cmp.targets.all).toBe(true);
    expect(Array.from(cmp.relative)).toEqual(Array.from(ref.relative));
    expect(cmp.summary.percentiles).toEqual(ref.summary.percentiles);
    expect(cmp.neighbours!.nearest).toHaveLength(N);
  });

  test('toggling methods re-uses what was computed: only the new method and the statistics run', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    slotMethodSet('a', 'ewald');
    slotParamSet('a', 'ewald.tol', '1e-3');
    await computeStart();
    expect(c.types().slice(4)).toEqual(['ewald', 'compare']);
    expect(appStore.getState().comparison!.runA.label).toBe('Ewald tol 0.001');
    slotMethodSet('a', 'mesh');
    const before = appStore.getState().comparison!.runB;
    await computeStart();
    expect(c.types().slice(6)).toEqual(['compare']);
    const s = appStore.getState();
    expect(s.comparison!.runA.label).toBe('mesh 32³');
    expect(s.comparison!.runB).toBe(before);
  });

  test('a target count draws a seeded sample, sent to every method and to the neighbour search', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    draftSet({ targets: '25', seed: '4' });
    await computeStart();
    const want = Array.from(targetsResolve({ kind: 'sample', count: 25, seed: 4 }, N));
    for (const r of c.log.slice(0, 3)) expect(Array.from((r as { targets: Int32Array }).targets)).toEqual(want);
    expect(appStore.getState().comparison!.targets.key).toBe('sample:25:4');
  });

  test('"auto" takes all particles when affordable, else the largest of 10 000, 3000, 1000 that fits 8 s', () => {
    appReset({ ...DEFAULT_DRAFT, n: '20000' });
    // the calibration scales the modelled Ewald time: 1 → all fit; 10 → only 3000; 100 → none fits, 1000
    const plan = (ewald: number) => {
      appStore.setState({ calibration: { ewald, 'ewald:sample': ewald } });
      return runPlanMake(appStore.getState());
    };
    expect(plan(1).targets.all).toBe(true);
    expect(plan(1).autoSampledFromMs).toBeNull();
    const p10 = plan(10);
    expect(p10.targets.indices).toHaveLength(3000);
    expect(p10.autoSampledFromMs).toBeGreaterThan(8000);
    expect(p10.expectedMs).toBeLessThanOrEqual(8000);
    expect(plan(100).targets.indices).toHaveLength(1000);
    draftSet({ targets: 'all' });
    expect(plan(100).targets.all).toBe(true);
  });

  test('a bad field sets "error" with a message naming the field, and starts nothing', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    slotParamSet('b', 'ewald.tol', '0');
    await computeStart();
    expect(appStore.getState().status).toBe('error');
    expect(appStore.getState().message).toBe('Ewald tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "0"');
    expect(c.log).toHaveLength(0);
  });

  test('"from file" on a snapshot without accelerations is refused naming the slot', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    slotMethodSet('a', 'file');
    await computeStart();
    expect(appStore.getState().message).toMatch(/^method A: this snapshot carries no accelerations/);
  });
});

describe('cancelling, crashes and a second computation', () => {
  test('cancel stops the run, says "cancelled", and keeps the snapshot and the earlier comparison', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    const earlier = appStore.getState().comparison;
    const held = inlineClient(['ewald']);
    computeClientSet(held.client);
    slotParamSet('b', 'ewald.tol', '1e-8');
    const p = computeStart();
    await new Promise((r) => setTimeout(r, 0));
    expect(held.types()).toEqual(['ewald']);
    computeCancel();
    await p;
    const s = appStore.getState();
    expect(s.status).toBe('cancelled');
    expect(s.message).toMatch(/^stopped after \d+\.\d s; the snapshot and earlier results are kept$/);
    expect(s.comparison).toBe(earlier);
    expect(s.snapshot?.n).toBe(N);
  });

  test('a crashed worker is reported (a fresh one started) and the page keeps its data', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    const earlier = appStore.getState().comparison;
    const crashing: ComputeClient = { ...c.client, run: () => Promise.reject(new WorkerCrashError('compute worker failed: out of memory')) };
    computeClientSet(crashing);
    slotParamSet('b', 'ewald.tol', '1e-7');
    await computeStart();
    const s = appStore.getState();
    expect(s.status).toBe('error');
    expect(s.message).toBe('the computing worker stopped: compute worker failed: out of memory; restarted — the snapshot and finished results are kept');
    expect(s.comparison).toBe(earlier);
  });

  test('a second start while one runs wins; the first one’s late result is dropped', async () => {
    const held = inlineClient(['mesh']);
    computeClientSet(held.client);
    const first = computeStart();
    await new Promise((r) => setTimeout(r, 0));
    const c = inlineClient();
    computeClientSet(c.client);
    draftSet({ targets: '10' });
    const second = computeStart();
    held.waiting[0].resolve();
    await Promise.all([first, second]);
    const s = appStore.getState();
    expect(s.status).toBe('done');
    expect(s.comparison!.targets.indices).toHaveLength(10);
  });
});

describe('fileLoad(name, bytes)', () => {
  function csvWithAcc(n: number): { text: string; acc: Float64Array } {
    const d = demoSnapshot(n, 8);
    const e = ewaldForces(d.positions, d.masses, boxMake(1), null, { tol: 1e-3 });
    let text = 'x,y,z,m,ax,ay,az\n';
    for (let i = 0; i < n; i++) text += `${d.positions[3 * i]},${d.positions[3 * i + 1]},${d.positions[3 * i + 2]},${d.masses[i]},${e.acc[3 * i]},${e.acc[3 * i + 1]},${e.acc[3 * i + 2]}\n`;
    return { text, acc: e.acc };
  }

  test('a CSV with ax, ay, az is compared against Ewald by default, with the box guessed from the coordinates', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    const { text } = csvWithAcc(200);
    await fileLoad('mine.csv', new TextEncoder().encode(text));
    const s = appStore.getState();
    expect(s.snapshot!.kind).toBe('file');
    expect(s.snapshot!.boxGuessed).toBe(true);
    expect(s.draft.box).toBe('1');
    expect(s.draft.a.method).toBe('file');
    expect(s.draft.b.method).toBe('ewald');
    expect(c.types()).toEqual(['describe', 'load', 'ewald', 'neighbours', 'compare']);
    const cmp = s.comparison!;
    expect(cmp.runA.label).toBe('file (ax, ay, az)');
    // the file holds Ewald at tolerance 1e-3 (written with full digits): errors are small but not zero
    expect(cmp.summary.max).toBeLessThan(1e-2);
    expect(cmp.summary.median).toBeGreaterThan(1e-9);
  });

  test('an unreadable file leaves an error naming the line and column, and the demo in place', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    await fileLoad('bad.csv', new TextEncoder().encode('x,y,z\n1,2\n'));
    const s = appStore.getState();
    expect(s.status).toBe('error');
    expect(s.message).toMatch(/^bad\.csv: line 2 \(particle 0\)/);
    expect(s.snapshot!.kind).toBe('demo');
  });
});

describe('convergenceStart()', () => {
  test('measures Ewald against its tolerance and the mesh against its size on 16 targets', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    await convergenceStart();
    const s = appStore.getState();
    expect(s.convergenceStatus).toBe('done');
    const run = s.convergence!;
    expect(run.targets).toHaveLength(16);
    const worst = appStore.getState().comparison!.summary.worst;
    expect(run.targets).toContain(appStore.getState().comparison!.targets.indices[worst[0]]);
    const [ew, mesh] = run.series;
    expect(ew.x).toEqual(SWEEP_TOLERANCES);
    expect(mesh.x).toEqual(SWEEP_MESHES);
    // Ewald meets each asked tolerance on these targets (its promise), and tighter asks give smaller errors
    ew.errors.forEach((e, i) => expect(Math.max(...e)).toBeLessThan(ew.x[i]));
    expect(Math.max(...ew.errors[6])).toBeLessThan(Math.max(...ew.errors[0]));
  });
});

describe('the results kept for re-use', () => {
  test('at most 12 are kept, the oldest dropped first but never the two being compared', async () => {
    const c = inlineClient();
    computeClientSet(c.client);
    await computeStart();
    const firstMesh = appStore.getState().comparison!.runA.key;
    slotMethodSet('a', 'ewald');
    for (let k = 1; k <= 12; k++) {
      slotParamSet('a', 'ewald.tol', `${k}e-4`);
      await computeStart();
      expect(appStore.getState().status).toBe('done');
    }
    const runs = appStore.getState().runs;
    expect(Object.keys(runs)).toHaveLength(12);
    expect(firstMesh in runs).toBe(false);
    const cmp = appStore.getState().comparison!;
    expect(cmp.runA.key in runs && cmp.runB.key in runs).toBe(true);
  });
});
