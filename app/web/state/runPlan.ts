/**
 * What Compute would do with the current form: the target set (choosing "auto" from the expected
 * time), each slot's checked options, parameters and predicted error, and the expected time of the
 * parts not already computed. Pure over the store's state; memoised per snapshot and settings.
 */
import { type MethodOptions, methodOptionsKey, methodOptionsParse } from '../methods/methodOptions';
import { type MethodPlan, methodPlan } from '../methods/methodPlan';
import { moreOptionsLabel } from '../methods/moreOptions';
import type { MethodId } from '../methods/registry';
import { AUTO_SAMPLE, boxParse, draftParse } from './settings';
import { DEMO_ON_PAGE_MAX, demoSnapshotLoad, snapshotWithBox } from './snapshotLoad';
import type { AppState } from './store';
import { planWork } from './planBudget';
import { referenceForAll } from './referenceChoice';
import { PLAN_OFF_THREAD_MIN_N, methodPlanOffThread, planOffThread, sampleOffThread } from './planOffThread';
import { targetSetMake } from './targets';
import type { Snapshot, TargetSet } from './types';

/** Above this expected time (ms) "auto" targets switch from all particles to a sample. */
export const AUTO_BUDGET_MS = 8000;

/** Smaller samples "auto" tries when 10 000 targets would still exceed the budget. */
const AUTO_SMALLER = [3000, 1000];

/**
 * Modelled ns per target for the neighbour search (plus per particle for its tree) and the statistics,
 * measured on the project machine (refined by calibration).
 */
export const NEIGHBOUR_NS = 6000;
export const NEIGHBOUR_TREE_NS = 1500;
export const COMPARE_NS = 1000;

/** Modelled neighbour-search time (ns) for k targets among n particles. */
export function neighbourCostNs(k: number, n: number): number {
  return k * NEIGHBOUR_NS + n * NEIGHBOUR_TREE_NS;
}

export interface SlotPlan {
  readonly method: MethodId;
  readonly options: MethodOptions;
  readonly key: string;
  readonly label: string;
  readonly plan: MethodPlan;
  /** Expected time (ms) after calibration; 0 when already computed. */
  readonly expectedMs: number;
  readonly cached: boolean;
}

export interface RunPlan {
  readonly snapshot: Snapshot;
  readonly targets: TargetSet;
  readonly a: SlotPlan;
  readonly b: SlotPlan;
  readonly neighboursKey: string;
  /** Expected time (ms) of everything Compute still has to do. */
  readonly expectedMs: number;
  /** "auto" chose a sample because all particles would take about this long (ms); else null. */
  readonly autoSampledFromMs: number | null;
}

/** A tolerance as short text: 1e-6 rather than 0.000001. */
export function tolText(v: number): string {
  return v < 1e-3 ? v.toExponential().replace(/\.?0*e/, 'e') : String(v);
}

/** Words for a method run ("Ewald tol 1e-6", "mesh 32³", "file (ax, ay, az)"). */
export function methodLabel(m: MethodOptions, snapshot: Snapshot): string {
  switch (m.method) {
    case 'ewald': {
      const s = m.options.softening;
      const soft = s?.kind === 'plummer' ? `, Plummer ε ${s.eps}` : s?.kind === 'spline' ? `, spline h ${s.h}` : '';
      return `Ewald tol ${tolText(m.options.tol ?? 1e-6)}${soft}`;
    }
    case 'mesh':
      return `mesh ${m.options.mesh}³`;
    case 'file':
      return `file (${snapshot.accelerationColumns?.join(', ') ?? 'accelerations'})`;
    default:
      return moreOptionsLabel(m, tolText);
  }
}

const planMemo = new Map<string, MethodPlan>();

function planCached(snapshot: Snapshot, m: MethodOptions, key: string, targets: number): MethodPlan {
  const k = `${snapshot.id}|${key}|${targets}`;
  let p = planMemo.get(k);
  if (!p) {
    // large snapshots are measured in the plan worker (PlanPending until it answers); else, or when it
    // failed, on the page in budgeted pieces
    // (PME's plan runs the engine's whole setup, hundreds of ms even for small snapshots: always off the page)
    const offThread = planOffThread(m.method === 'pme' ? Math.max(snapshot.n, PLAN_OFF_THREAD_MIN_N) : snapshot.n);
    const remote = m.method !== 'file' && offThread ? methodPlanOffThread(k, snapshot, snapshot.box, m, targets) : null;
    if (remote) p = remote;
    else {
      if (m.method !== 'file' && m.method !== 'mesh') planWork(snapshot.n);
      p = methodPlan(m, snapshot.positions, snapshot.masses, snapshot.box, targets);
    }
    if (planMemo.size > 64) planMemo.clear();
    planMemo.set(k, p);
  }
  return p;
}

const sampleSets = new WeakMap<Int32Array, TargetSet>();
let allSet: TargetSet | null = null;

/**
 * targetSetMake, with large samples drawn in the plan worker (PlanPending until it answers); with the
 * plan worker, "all" of a large snapshot is a plain count (a few ms for 10⁶) and needs no budget.
 */
function targetsFor(n: number, count: number | null, seed: number): TargetSet {
  if ((count === null || count >= n) && planOffThread(n)) {
    if (allSet?.indices.length !== n) {
      const indices = new Int32Array(n);
      for (let i = 0; i < n; i++) indices[i] = i;
      allSet = { key: 'all', all: true, indices };
    }
    return allSet;
  }
  if (count !== null && count < n && planOffThread(n)) {
    const indices = sampleOffThread(n, count, seed);
    if (indices) {
      let set = sampleSets.get(indices);
      if (!set) {
        set = { key: `sample:${count}:${seed}`, all: false, indices };
        sampleSets.set(indices, set);
      }
      return set;
    }
  }
  return targetSetMake(n, count, seed);
}

/** Calibration key of a method's runs: all-particle and per-target loops are timed apart. */
export function calibrationKind(method: string, all: boolean): string {
  return all ? method : `${method}:sample`;
}

function calibrated(state: AppState, kind: string, ns: number): number {
  return (ns * (state.calibration[kind] ?? 1)) / 1e6;
}

/** A demo too large to make on the page's thread is made by Compute in the worker first. */
export class DemoPendingError extends RangeError {
  constructor(readonly n: number) {
    super(`the demo with ${n} particles is made in the background when you press Compute`);
    this.name = 'DemoPendingError';
  }
}

/** The snapshot Compute would use: the file's with the box of the form (checked), or the demo of the form's size and seed. */
export function snapshotForRun(state: AppState): Snapshot {
  const s = state.snapshot;
  if (!s || s.kind === 'demo') {
    const { n, seed } = draftParse(state.draft);
    if (s && s.n === n && s.seed === seed) return s;
    if (n > DEMO_ON_PAGE_MAX) throw new DemoPendingError(n);
    return demoSnapshotLoad(n, seed);
  }
  const box = boxParse(state.draft.box);
  return box.lx === s.box.lx && box.ly === s.box.ly && box.lz === s.box.lz ? s : snapshotWithBox(s, box);
}

/** Plans a run; throws a RangeError naming the field when the form is wrong. */
export function runPlanMake(state: AppState, snapshotIn?: Snapshot): RunPlan {
  const snapshot = snapshotIn ?? snapshotForRun(state);
  const settings = draftParse(state.draft);
  const slotFor = (method: MethodId, options: MethodOptions, targets: TargetSet): SlotPlan => {
    const key = `${snapshot.id}|${targets.key}|${methodOptionsKey(options)}`;
    const plan = planCached(snapshot, options, methodOptionsKey(options), targets.indices.length);
    const cached = key in state.runs;
    return {
      method,
      options,
      key,
      label: methodLabel(options, snapshot),
      plan,
      cached,
      expectedMs: cached ? 0 : calibrated(state, calibrationKind(method, targets.all), plan.costNs),
    };
  };
  const slot = (name: 'a' | 'b', targets: TargetSet): SlotPlan => {
    const d = state.draft[name];
    const options = methodOptionsParse(d.method, d.params, settings.G);
    if (options.method === 'file' && !snapshot.accelerations) {
      throw new RangeError(`method ${name.toUpperCase()}: this snapshot carries no accelerations (a header naming ax, ay, az is needed for “from file”)`);
    }
    const sp = slotFor(d.method, options, targets);
    // asked for all particles: B's reference may be particle-mesh Ewald when direct Ewald is too slow
    return name === 'b' && settings.targets.kind !== 'auto' ? referenceForAll(sp, d.params, snapshot.n, targets, AUTO_BUDGET_MS, (o) => slotFor('pme', o, targets)) : sp;
  };
  const n = snapshot.n;
  const choice = settings.targets;
  let count: number | null = choice.kind === 'sample' ? choice.count : null;
  let autoSampledFromMs: number | null = null;
  // (also below 10 000 particles: all targets of an image-sum order can take minutes)
  if (choice.kind === 'auto' && n > AUTO_SMALLER[AUTO_SMALLER.length - 1]) {
    // Plan the sample first; only when all particles might fit the budget (judged from the sample's cost
    // per target, halved for the cheaper all-particle loop) is the all-particle plan worked out as well:
    // each plan measures the whole snapshot once, which takes a while for 10⁶ particles.
    const sample = targetsFor(n, AUTO_SAMPLE, settings.seed);
    const sampleMs = slot('a', sample).expectedMs + slot('b', sample).expectedMs;
    const guessAll = (0.5 * sampleMs * n) / AUTO_SAMPLE + calibrated(state, 'neighbours', neighbourCostNs(n, n));
    let msAll = guessAll;
    if (guessAll <= 4 * AUTO_BUDGET_MS) {
      const all = targetsFor(n, null, settings.seed);
      msAll = slot('a', all).expectedMs + slot('b', all).expectedMs + calibrated(state, 'neighbours', neighbourCostNs(n, n));
    }
    if (msAll > AUTO_BUDGET_MS) {
      autoSampledFromMs = msAll;
      // the largest of 10 000, 3000, 1000 targets that fits the budget (1000 when none does)
      count = AUTO_SAMPLE;
      for (const c of AUTO_SMALLER) {
        if (sampleMs <= AUTO_BUDGET_MS) break;
        const smaller = targetsFor(n, c, settings.seed);
        count = c;
        if (slot('a', smaller).expectedMs + slot('b', smaller).expectedMs <= AUTO_BUDGET_MS) break;
      }
    }
  }
  const targets = targetsFor(n, count, settings.seed);
  const a = slot('a', targets);
  const b = slot('b', targets);
  const neighboursKey = `${snapshot.id}|${targets.key}`;
  const k = targets.indices.length;
  const expectedMs =
    (a.key === b.key ? a.expectedMs : a.expectedMs + b.expectedMs) +
    (neighboursKey in state.neighbours ? 0 : calibrated(state, 'neighbours', neighbourCostNs(k, n))) +
    calibrated(state, 'compare', k * COMPARE_NS);
  return { snapshot, targets, a, b, neighboursKey, expectedMs, autoSampledFromMs };
}
