/**
 * Compute: runs what the comparison needs, in the worker, one request at a time — each slot's method
 * (unless already computed for these targets), the targets' neighbours, then the statistics — with
 * one progress bar over all of it. Also cancelling and the convergence measurement (loading a file: loadActions.ts).
 */
import { CancelledError, type ComputeClient, type Outcome, WorkerCrashError } from '../worker/client';
import type { ComparePayload, DemoPayload, ForcesPayload, NeighboursPayload, RequestBody, SweepPayload } from '../worker/protocol';
import { planSliced } from './planBudget';
import { draftParse } from './settings';
import { demoSnapshotFrom } from './snapshotLoad';
import { type AppState, appStore } from './store';
import { COMPARE_NS, DemoPendingError, type RunPlan, type SlotPlan, calibrationKind, neighbourCostNs, runPlanMake } from './runPlan';
import { rowsPick } from './targets';
import { copyChunked } from '../worker/chunkedCopy';
import type { MethodForcesPayload } from '../worker/methodRequests';
import { methodRequestMore, methodRunFrom, orderTracesRun } from './orderRuns';
import type { Comparison, ConvergenceRun, ConvergenceSeries, MethodRun, NeighbourRun } from './types';

let client: ComputeClient | null = null;

/** Connects the store to the worker client (the page passes a real one, tests a fake). */
export function computeClientSet(next: ComputeClient | null): void {
  client = next;
}

/** The worker client in use (null before the page connects one). */
export function computeClient(): ComputeClient | null {
  return client;
}

/** Most method results kept for re-use, and most bytes of accelerations they hold; the oldest go first. */
export const RUNS_KEPT = 12;
export const RUNS_BYTES_KEPT = 256 * 1024 * 1024;

/** Neighbours searched for the local density. */
export const NEIGHBOUR_K = 16;

const get = () => appStore.getState();
const set = (patch: Partial<AppState>) => appStore.setState(patch);

function errorText(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return error instanceof WorkerCrashError ? `the computing worker stopped: ${text}; restarted — the snapshot and finished results are kept` : text;
}

function fail(message: string): void {
  set({ status: 'error', message, progress: 0, phase: '' });
}

/** Refines measured ÷ modelled time of one kind of work (geometric mean with what was known). */
function calibrate(kind: string, modelMs: number, measuredMs: number): void {
  if (!(modelMs > 0) || measuredMs < 30) return;
  const ratio = measuredMs / modelMs;
  const old = get().calibration[kind];
  const next = old === undefined ? ratio : Math.sqrt(old * ratio);
  set({ calibration: { ...get().calibration, [kind]: Math.min(100, Math.max(0.01, next)) } });
}

/** Adds a finished run, dropping the oldest ones beyond the limits (never those in `keep`). */
function runsAdd(run: MethodRun, keep: readonly string[]): void {
  const runs: Record<string, MethodRun> = { ...get().runs, [run.key]: run };
  let bytes = 0;
  for (const r of Object.values(runs)) bytes += r.acc.byteLength;
  for (const key of Object.keys(runs)) {
    if (Object.keys(runs).length <= RUNS_KEPT && bytes <= RUNS_BYTES_KEPT) break;
    if (key === run.key || keep.includes(key)) continue;
    bytes -= runs[key].acc.byteLength;
    delete runs[key];
  }
  set({ runs });
}

/** Lets the page handle what is queued (render, input) before the next piece of main-thread work. */
function yieldTask(): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, 0));
}

interface Step {
  readonly weight: number;
  readonly phase: string;
  readonly go: (progress: (f: number) => void) => Promise<void>;
}

/**
 * Checks the form, (re)makes the demo snapshot if its size or seed changed, and computes the comparison
 * of slot A against slot B, re-using finished results. A computation already running is cancelled.
 * Resolves when this computation has ended (done, failed or superseded).
 */
export async function computeStart(): Promise<void> {
  const state0 = get();
  if (!client) return fail('the compute worker is not available');
  const id = state0.computeId + 1;
  const startedAt = performance.now();
  // show "computing" at once; planning (which measures the snapshot) runs in the next task
  set({
    status: 'computing',
    phase: 'planning',
    message: '',
    progress: 0,
    computeId: id,
    startedAt,
    ...(state0.convergenceStatus === 'computing' ? { convergenceStatus: 'cancelled' as const } : {}),
  });
  if (state0.status === 'computing' || state0.status === 'loading') client.cancel();
  await yieldTask();
  if (get().computeId !== id) return;
  let plan: RunPlan;
  const planned = () => get().computeId === id;
  try {
    const p = await planSliced(() => runPlanMake(get()), planned);
    if (!p) return;
    plan = p;
  } catch (e) {
    if (!(e instanceof DemoPendingError)) return fail(errorText(e));
    // a large demo: made in the worker, then planned
    set({ phase: `making the demo (${e.n} particles)` });
    try {
      const { n, seed } = draftParse(get().draft);
      const out = (await client.run({ type: 'demo', n, seed })) as Outcome<DemoPayload>;
      if (get().computeId !== id) return;
      set({ snapshot: demoSnapshotFrom(n, seed, out.payload.positions, out.payload.masses), comparison: null, selected: null, convergence: null, convergenceStatus: 'idle' });
      await yieldTask();
      if (get().computeId !== id) return;
      const p = await planSliced(() => runPlanMake(get()), planned);
      if (!p) return;
      plan = p;
    } catch (e2) {
      if (get().computeId !== id || e2 instanceof CancelledError) return;
      return fail(errorText(e2));
    }
  }
  const state = get();
  const { snapshot, targets } = plan;
  const c = client;
  const snapshotChanged = state.snapshot?.id !== snapshot.id;
  set({
    snapshot,
    phase: 'preparing',
    ...(snapshotChanged ? { comparison: null, selected: null, convergence: null, convergenceStatus: 'idle' as const } : {}),
  });
  const current = () => get().computeId === id;
  const K = targets.indices.length;
  const rows = () => (targets.all ? null : targets.indices.slice());
  let workerMs = 0;

  const keep = [plan.a.key, plan.b.key];
  const methodStep = (sp: SlotPlan): Step | null => {
    if (sp.cached || (sp === plan.b && plan.a.key === plan.b.key)) return null;
    const opts = sp.options;
    if (opts.method === 'file') {
      return {
        weight: 1,
        phase: 'accelerations from the file',
        go: async () => {
          const acc = targets.all ? await copyChunked(snapshot.accelerations!) : rowsPick(snapshot.accelerations!, targets.indices, 3);
          runsAdd({ key: sp.key, method: 'file', label: sp.label, targetsKey: targets.key, acc, ewald: null, mesh: null, wrapped: 0, workerMs: 0 }, keep);
        },
      };
    }
    return {
      weight: Math.max(1, sp.expectedMs),
      phase: sp.label,
      go: async (progress) => {
        // copies (made in slices): the snapshot's own arrays stay with the page while these move to the worker
        const base = { positions: await copyChunked(snapshot.positions), masses: await copyChunked(snapshot.masses), box: snapshot.box, targets: rows() };
        if (!current()) throw new CancelledError();
        const request: RequestBody =
          opts.method === 'ewald' ? { type: 'ewald', ...base, options: opts.options } : opts.method === 'mesh' ? { type: 'mesh', ...base, options: opts.options } : methodRequestMore(opts, base);
        const out = (await c.run(request, progress)) as Outcome<ForcesPayload | MethodForcesPayload>;
        workerMs += out.workerMs;
        calibrate(calibrationKind(sp.method, targets.all), sp.plan.costNs / 1e6, out.workerMs);
        const p = out.payload;
        if (p.kind === 'methodForces') return runsAdd(methodRunFrom(sp, targets.key, p, out.workerMs), keep);
        runsAdd({ key: sp.key, method: sp.method, label: sp.label, targetsKey: targets.key, acc: p.acc, ewald: p.ewald, mesh: p.mesh, wrapped: p.wrapped, workerMs: out.workerMs }, keep);
      },
    };
  };

  const steps: Step[] = [];
  for (const sp of [plan.a, plan.b]) {
    const st = methodStep(sp);
    if (st) steps.push(st);
  }
  if (!(plan.neighboursKey in state.neighbours) || snapshotChanged) {
    steps.push({
      weight: Math.max(1, neighbourCostNs(K, snapshot.n) / 1e6),
      phase: 'nearest neighbours',
      go: async (progress) => {
        const positions = await copyChunked(snapshot.positions);
        if (!current()) throw new CancelledError();
        const out = (await c.run({ type: 'neighbours', positions, box: snapshot.box, targets: rows(), k: NEIGHBOUR_K }, progress)) as Outcome<NeighboursPayload>;
        workerMs += out.workerMs;
        calibrate('neighbours', neighbourCostNs(K, snapshot.n) / 1e6, out.workerMs);
        const p = out.payload;
        const run: NeighbourRun = { key: plan.neighboursKey, nearest: p.nearest, density: p.density, kUsed: p.kUsed, meanDensity: p.meanDensity };
        set({ neighbours: { [run.key]: run } });
      },
    });
  }
  let compared: ComparePayload | null = null;
  steps.push({
    weight: Math.max(1, (K * COMPARE_NS) / 1e6),
    phase: 'statistics',
    go: async (progress) => {
      const runs = get().runs;
      const accA = await copyChunked(runs[plan.a.key].acc), accB = await copyChunked(runs[plan.b.key].acc);
      if (!current()) throw new CancelledError();
      const out = (await c.run({ type: 'compare', accA, accB, worst: 50 }, progress)) as Outcome<ComparePayload>;
      workerMs += out.workerMs;
      calibrate('compare', (K * COMPARE_NS) / 1e6, out.workerMs);
      compared = out.payload;
    },
  });

  const total = steps.reduce((s, st) => s + st.weight, 0);
  let done = 0;
  try {
    for (const st of steps) {
      if (!current()) return;
      set({ phase: st.phase });
      await st.go((f) => {
        if (current()) set({ progress: (done + st.weight * f) / total });
      });
      done += st.weight;
      if (current()) set({ progress: done / total });
    }
  } catch (e) {
    if (!current() || e instanceof CancelledError) return;
    return fail(errorText(e));
  }
  if (!current() || !compared) return;
  const s = get();
  const cmp = compared as ComparePayload;
  const comparison: Comparison = {
    snapshotId: snapshot.id,
    runA: s.runs[plan.a.key],
    runB: s.runs[plan.b.key],
    targets,
    relative: cmp.relative,
    summary: cmp.summary,
    histogram: cmp.histogram,
    cdf: cmp.cdf,
    neighbours: s.neighbours[plan.neighboursKey] ?? null,
    wallMs: performance.now() - startedAt,
    workerMs,
  };
  const keepSelection = s.comparison?.targets.key === targets.key && s.comparison.snapshotId === snapshot.id;
  set({ status: 'done', phase: '', progress: 1, comparison, message: '', selected: keepSelection ? s.selected : null });
}

/** Cancels the running computation: its worker is terminated and replaced; data and results stay. */
export function computeCancel(): void {
  const s = get();
  if (s.status !== 'computing' && s.status !== 'loading') return;
  client?.cancel();
  set({
    status: 'cancelled',
    phase: '',
    progress: 0,
    computeId: s.computeId + 1,
    message: `stopped after ${((performance.now() - s.startedAt) / 1000).toFixed(1)} s; the snapshot and earlier results are kept`,
  });
}

/** Switches back to the built-in demo snapshot and computes. */
export function demoReturn(): Promise<void> {
  const s = get();
  const draft = { ...s.draft, a: s.draft.a.method === 'file' ? { ...s.draft.a, method: 'mesh' as const } : s.draft.a, b: s.draft.b.method === 'file' ? { ...s.draft.b, method: 'ewald' as const } : s.draft.b };
  set({ draft, snapshot: null, comparison: null, selected: null, convergence: null, convergenceStatus: 'idle', wantedFile: null });
  return computeStart();
}

// loading a file (describe, mapping step, load) lives in loadActions.ts

/** Tolerances and mesh sizes swept by the convergence measurement, and the reference tolerance. */
export const SWEEP_TOLERANCES = [1e-2, 1e-3, 1e-4, 1e-5, 1e-6, 1e-7, 1e-8];
export const SWEEP_MESHES = [8, 16, 32, 64, 128];
export const SWEEP_REFERENCE_TOL = 1e-11;
/** Targets followed: the worst few of the comparison and a seeded handful of others. */
export const SWEEP_WORST = 4;
export const SWEEP_OTHERS = 12;

/** Input rows followed by the convergence measurement (sorted, unique). */
export function convergenceTargets(cmp: Comparison, seed: number): Int32Array {
  const chosen = new Set<number>();
  for (let i = 0; i < Math.min(SWEEP_WORST, cmp.summary.worst.length); i++) chosen.add(cmp.targets.indices[cmp.summary.worst[i]]);
  const k = cmp.targets.indices.length;
  let state = (seed >>> 0) ^ 0x5bd1e995;
  for (let tries = 0; chosen.size < Math.min(k, SWEEP_WORST + SWEEP_OTHERS) && tries < 1000; tries++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    chosen.add(cmp.targets.indices[state % k]);
  }
  return Int32Array.from([...chosen].sort((x, y) => x - y));
}

function relativeTo(acc: Float64Array, ref: Float64Array): Float64Array {
  const out = new Float64Array(ref.length / 3);
  for (let t = 0; t < out.length; t++) {
    const d = Math.hypot(acc[3 * t] - ref[3 * t], acc[3 * t + 1] - ref[3 * t + 1], acc[3 * t + 2] - ref[3 * t + 2]);
    out[t] = d / Math.hypot(ref[3 * t], ref[3 * t + 1], ref[3 * t + 2]);
  }
  return out;
}

/**
 * Measures how the comparison's computed methods converge on a few targets: Ewald against its
 * tolerance, the mesh against its size, each against a tight Ewald value. Uses the worker (a running
 * computation is cancelled).
 */
export async function convergenceStart(): Promise<void> {
  const s = get();
  const cmp = s.comparison;
  if (!client || !cmp || !s.snapshot || s.status === 'computing' || s.status === 'loading') return;
  const snapshot = s.snapshot;
  const c = client;
  const id = s.computeId + 1;
  set({ computeId: id, convergenceStatus: 'computing', convergenceMessage: '' });
  const current = () => get().computeId === id;
  const targets = convergenceTargets(cmp, Number(s.draft.seed) || 1);
  const methods = [cmp.runA, cmp.runB].filter((r) => r.method === 'ewald' || r.method === 'mesh');
  const ewaldRun = methods.find((r) => r.method === 'ewald');
  const softening = ewaldRun?.ewald?.softening ?? { kind: 'none' as const };
  const G = ewaldRun?.ewald?.G ?? methods.find((r) => r.mesh)?.mesh?.G ?? cmp.runA.order?.G ?? cmp.runB.order?.G ?? cmp.runB.pme?.G ?? 1;
  const base = async () => {
    const positions = await copyChunked(snapshot.positions), masses = await copyChunked(snapshot.masses);
    if (!current()) throw new CancelledError(); // superseded while copying: do not cancel the newer run
    return { positions, masses, box: snapshot.box, targets: targets.slice() };
  };
  try {
    const ewaldTols = methods.some((r) => r.method === 'ewald') ? SWEEP_TOLERANCES : [];
    const sweepE = (await c.run({ type: 'sweep', method: 'ewald', ...(await base()), options: [...ewaldTols, SWEEP_REFERENCE_TOL].map((tol) => ({ tol, G, softening })) })) as Outcome<SweepPayload>;
    if (!current()) return;
    const ref = sweepE.payload.acc[sweepE.payload.acc.length - 1];
    const series: ConvergenceSeries[] = [];
    if (ewaldTols.length) {
      series.push({
        method: 'ewald',
        label: 'Ewald',
        xLabel: 'tolerance asked',
        x: ewaldTols,
        errors: ewaldTols.map((_, i) => relativeTo(sweepE.payload.acc[i], ref)),
        predicted: ewaldTols.map((_, i) => sweepE.payload.ewald[i]?.predictedRelativeError ?? null),
      });
    }
    if (methods.some((r) => r.method === 'mesh')) {
      const sweepM = (await c.run({ type: 'sweep', method: 'mesh', ...(await base()), options: SWEEP_MESHES.map((mesh) => ({ mesh, G })) })) as Outcome<SweepPayload>;
      if (!current()) return;
      series.push({
        method: 'mesh',
        label: 'coarse mesh',
        xLabel: 'mesh points per side',
        x: SWEEP_MESHES,
        errors: SWEEP_MESHES.map((_, i) => relativeTo(sweepM.payload.acc[i], ref)),
        predicted: SWEEP_MESHES.map(() => null),
      });
    }
    const orders = await orderTracesRun(c, cmp, base, ref, SWEEP_WORST);
    if (!current()) return;
    const run: ConvergenceRun = { snapshotId: snapshot.id, targets, referenceTol: SWEEP_REFERENCE_TOL, series, orders };
    set({ convergence: run, convergenceStatus: 'done', convergenceMessage: '' });
  } catch (e) {
    if (!current()) return;
    if (e instanceof CancelledError) set({ convergenceStatus: 'cancelled' });
    else set({ convergenceStatus: 'error', convergenceMessage: errorText(e) });
  }
}
