/**
 * The page's one store (no React here; state/useApp.ts binds it). Actions are the plain functions
 * below. The Ewald computation itself always runs in the worker behind `ComputeClient`.
 */
import { createStore } from 'zustand/vanilla';
import { type Box, boxMake } from '../../../engine/box';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';
import type { EwaldParams } from '../../../engine/ewald/params';
import { targetsResolve } from '../../../engine/targets';
import { CancelledError, type ComputeClient, WorkerCrashError } from '../worker/client';
import { type Draft, DEFAULT_DRAFT, draftParse } from './settings';
import { type AccelerationSummary, accelerationSummary } from './summary';

export type Status = 'idle' | 'computing' | 'done' | 'cancelled' | 'error';

export interface Snapshot {
  /** Where the particles came from, in words. */
  readonly source: string;
  readonly seed: number;
  readonly n: number;
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
  readonly totalMass: number;
}

/** A finished computation. */
export interface RunRecord {
  readonly targets: Int32Array;
  readonly acc: Float64Array;
  readonly phi: Float64Array;
  readonly params: EwaldParams;
  readonly wrapped: number;
  /** Request to result, as seen by the page (ms), and the part spent in the worker. */
  readonly wallMs: number;
  readonly workerMs: number;
  readonly summary: AccelerationSummary;
}

export interface AppState {
  readonly draft: Draft;
  readonly snapshot: Snapshot | null;
  readonly status: Status;
  /** One line about the status (an error, how long a run took, what cancelling kept). */
  readonly message: string;
  /** Fraction done of the running computation, in [0, 1]. */
  readonly progress: number;
  readonly run: RunRecord | null;
  /** Id of the latest computation started; replies for older ones are dropped. */
  readonly computeId: number;
  readonly startedAt: number;
}

export function appStateInitial(draft: Draft = DEFAULT_DRAFT): AppState {
  return { draft, snapshot: null, status: 'idle', message: '', progress: 0, run: null, computeId: 0, startedAt: 0 };
}

export const appStore = createStore<AppState>()(() => appStateInitial());

let client: ComputeClient | null = null;

/** Connects the store to the worker client (the page passes a real one, tests a fake). */
export function computeClientSet(next: ComputeClient | null): void {
  client = next;
}

/** Replaces the store's state (used at page start with the URL's draft, and by tests). */
export function appReset(draft: Draft = DEFAULT_DRAFT): void {
  appStore.setState(appStateInitial(draft), true);
}

/** Changes form fields; nothing is checked until Compute. */
export function draftSet(patch: Partial<Draft>): void {
  appStore.setState((s) => ({ draft: { ...s.draft, ...patch } }));
}

function demoLoad(n: number, seed: number): Snapshot {
  const d = demoSnapshot(n, seed);
  let totalMass = 0;
  for (let i = 0; i < d.masses.length; i++) totalMass += d.masses[i];
  return {
    source: `built-in demo “three knots and a thread”`,
    seed,
    n,
    positions: d.positions,
    masses: d.masses,
    box: boxMake(d.box),
    totalMass,
  };
}

function fail(message: string): void {
  appStore.setState({ status: 'error', message, progress: 0 });
}

/**
 * Checks the form, (re)makes the demo snapshot when its size or seed changed, and starts the Ewald
 * computation in the worker, cancelling one that runs. Resolves when this computation has ended.
 */
export function computeStart(): Promise<void> {
  const state = appStore.getState();
  if (!client) {
    fail('the compute worker is not available');
    return Promise.resolve();
  }
  let snapshot = state.snapshot;
  let targets: Int32Array | null = null;
  let tol: number;
  try {
    const settings = draftParse(state.draft);
    tol = settings.tol;
    if (!snapshot || snapshot.n !== settings.n || snapshot.seed !== settings.seed) snapshot = demoLoad(settings.n, settings.seed);
    if (settings.targets !== null) targets = targetsResolve({ kind: 'sample', count: settings.targets, seed: settings.seed }, snapshot.n);
  } catch (e) {
    fail(e instanceof Error ? e.message : String(e));
    return Promise.resolve();
  }
  const id = state.computeId + 1;
  const startedAt = performance.now();
  appStore.setState({ snapshot, status: 'computing', message: '', progress: 0, run: null, computeId: id, startedAt });
  const current = () => appStore.getState().computeId === id;
  const job = {
    // copies: the originals stay with the page while these buffers move to the worker
    positions: snapshot.positions.slice(),
    masses: snapshot.masses.slice(),
    box: snapshot.box,
    targets,
    options: { tol },
  };
  return client
    .run(job, (fraction) => {
      if (current()) appStore.setState({ progress: fraction });
    })
    .then(
      (outcome) => {
        if (!current()) return;
        const wallMs = performance.now() - startedAt;
        const run: RunRecord = { ...outcome, wallMs, summary: accelerationSummary(outcome.acc) };
        appStore.setState({ status: 'done', progress: 1, run, message: '' });
      },
      (error: unknown) => {
        if (!current() || error instanceof CancelledError) return;
        const text = error instanceof Error ? error.message : String(error);
        fail(error instanceof WorkerCrashError ? `${text} (a fresh worker has been started)` : text);
      },
    );
}

/** Cancels the running computation: its worker is terminated and replaced; the snapshot stays. */
export function computeCancel(): void {
  const s = appStore.getState();
  if (s.status !== 'computing' || !client) return;
  client.cancel();
  appStore.setState({
    status: 'cancelled',
    progress: 0,
    computeId: s.computeId + 1,
    message: `stopped after ${((performance.now() - s.startedAt) / 1000).toFixed(1)} s; the snapshot is kept`,
  });
}
