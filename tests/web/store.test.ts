import { beforeEach, describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { targetsResolve } from '../../engine/targets';
import { type ComputeClient, type EwaldJob, type EwaldOutcome, WorkerCrashError } from '../../app/web/worker/client';
import { handleRequest } from '../../app/web/worker/handleRequest';
import type { EwaldReply } from '../../app/web/worker/protocol';
import { appReset, appStore, computeCancel, computeClientSet, computeStart, draftSet } from '../../app/web/state/store';
import { accelerationSummary } from '../../app/web/state/summary';
import { DEFAULT_DRAFT } from '../../app/web/state/settings';

/** A client whose runs the test settles by hand; `inline` runs the real handler synchronously instead. */
function manualClient() {
  const runs: { job: EwaldJob; resolve: (o: EwaldOutcome) => void; reject: (e: Error) => void; onProgress?: (f: number) => void }[] = [];
  let cancels = 0;
  const client: ComputeClient = {
    run: (job, onProgress) => new Promise((resolve, reject) => runs.push({ job, resolve, reject, onProgress })),
    cancel: () => {
      cancels++;
      return true;
    },
    busy: () => false,
    dispose: () => {},
  };
  return { client, runs, cancels: () => cancels };
}

const inlineClient: ComputeClient = {
  run: (job, onProgress) =>
    new Promise((resolve, reject) => {
      handleRequest({ type: 'ewald', id: 1, ...job }, (reply) => {
        if (reply.type === 'progress') onProgress?.(reply.fraction);
        else if (reply.type === 'result') resolve(reply);
        else reject(new Error(reply.message));
      });
    }),
  cancel: () => false,
  busy: () => false,
  dispose: () => {},
};

function outcome(n: number): EwaldOutcome {
  return { targets: new Int32Array(n), acc: new Float64Array(3 * n).fill(1), phi: new Float64Array(n), params: {} as EwaldReply['params'], wrapped: 0, workerMs: 1 };
}

beforeEach(() => {
  appReset({ ...DEFAULT_DRAFT, n: '300' });
  computeClientSet(null);
});

describe('computeStart()', () => {
  test('makes the demo snapshot and ends "done" with the Ewald result of that snapshot', async () => {
    computeClientSet(inlineClient);
    const p = computeStart();
    expect(appStore.getState().status).toBe('computing');
    await p;
    const s = appStore.getState();
    expect(s.status).toBe('done');
    expect(s.progress).toBe(1);
    expect(s.snapshot?.n).toBe(300);
    expect(s.snapshot?.totalMass).toBeCloseTo(1, 12); // equal masses 1/N summing to 1 (demoSnapshot.ts)
    const d = demoSnapshot(300, 1);
    const ref = ewaldForces(d.positions, d.masses, boxMake(1), null, { tol: 1e-6 });
    expect(Array.from(s.run!.acc)).toEqual(Array.from(ref.acc));
    expect(s.run!.summary).toEqual(accelerationSummary(ref.acc));
    expect(s.run!.wallMs).toBeGreaterThanOrEqual(0);
  });

  test('sends copies: the snapshot in the store keeps its arrays after the job’s buffers moved', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    void computeStart();
    const { job } = m.runs[0];
    const snap = appStore.getState().snapshot!;
    expect(job.positions).not.toBe(snap.positions);
    expect(job.positions.buffer).not.toBe(snap.positions.buffer);
    expect(Array.from(job.positions)).toEqual(Array.from(snap.positions));
    expect(job.options).toEqual({ tol: 1e-6 });
    expect(job.targets).toBeNull();
  });

  test('uses a seeded sample of targets when fewer than N are asked for', () => {
    const m = manualClient();
    computeClientSet(m.client);
    draftSet({ targets: '25', seed: '4' });
    void computeStart();
    expect(Array.from(m.runs[0].job.targets!)).toEqual(Array.from(targetsResolve({ kind: 'sample', count: 25, seed: 4 }, 300)));
  });

  test('a bad form field sets "error" with a message naming the field, and starts nothing', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    draftSet({ tol: '0' });
    await computeStart();
    expect(appStore.getState().status).toBe('error');
    expect(appStore.getState().message).toBe('tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "0"');
    expect(m.runs).toHaveLength(0);
  });

  test('a crashed worker sets "error" and says a fresh worker was started', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    const p = computeStart();
    m.runs[0].reject(new WorkerCrashError('compute worker failed: out of memory'));
    await p;
    expect(appStore.getState().status).toBe('error');
    expect(appStore.getState().message).toBe('compute worker failed: out of memory (a fresh worker has been started)');
  });

  test('a second start while one runs wins: the first one’s late result and progress are dropped', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    const first = computeStart();
    draftSet({ targets: '10' });
    const second = computeStart();
    m.runs[0].onProgress?.(0.8);
    m.runs[0].resolve(outcome(300));
    await first;
    expect(appStore.getState().status).toBe('computing');
    expect(appStore.getState().progress).toBe(0);
    m.runs[1].onProgress?.(0.5);
    expect(appStore.getState().progress).toBe(0.5);
    m.runs[1].resolve(outcome(10));
    await second;
    expect(appStore.getState().status).toBe('done');
    expect(appStore.getState().run!.targets).toHaveLength(10);
  });

  test('a new N remakes the snapshot; the same N and seed keep it', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    void computeStart();
    const a = appStore.getState().snapshot;
    void computeStart();
    expect(appStore.getState().snapshot).toBe(a);
    draftSet({ n: '50' });
    void computeStart();
    expect(appStore.getState().snapshot?.n).toBe(50);
  });
});

describe('computeCancel()', () => {
  test('cancels through the client, says "cancelled", keeps the snapshot and ignores the late result', async () => {
    const m = manualClient();
    computeClientSet(m.client);
    const p = computeStart();
    const snap = appStore.getState().snapshot;
    computeCancel();
    expect(m.cancels()).toBe(1);
    const s = appStore.getState();
    expect(s.status).toBe('cancelled');
    expect(s.message).toMatch(/^stopped after \d+\.\d s; the snapshot is kept$/);
    expect(s.snapshot).toBe(snap);
    m.runs[0].resolve(outcome(300));
    await p;
    expect(appStore.getState().status).toBe('cancelled');
    expect(appStore.getState().run).toBeNull();
  });

  test('does nothing when no computation runs', () => {
    const m = manualClient();
    computeClientSet(m.client);
    computeCancel();
    expect(m.cancels()).toBe(0);
    expect(appStore.getState().status).toBe('idle');
  });
});
