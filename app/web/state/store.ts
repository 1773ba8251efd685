/**
 * The page's one store (no React here; state/useApp.ts binds it). Actions are plain functions: the
 * small ones below, the computation in pipeline.ts. All numerical work runs in the worker.
 */
import { createStore } from 'zustand/vanilla';
import type { MethodId } from '../methods/registry';
import { type ArrowMode, DEFAULT_DRAFT, type Draft, type ViewDraft } from './settings';
import type { Comparison, ConvergenceRun, MethodRun, NeighbourRun, Snapshot } from './types';

export type Status = 'idle' | 'loading' | 'computing' | 'done' | 'cancelled' | 'error';

export interface AppState {
  readonly draft: Draft;
  readonly snapshot: Snapshot | null;
  readonly status: Status;
  /** What is being done now ("Ewald reference", "reading file"…), shown beside the progress bar. */
  readonly phase: string;
  /** One line about the status (an error, how long a run took, what cancelling kept). */
  readonly message: string;
  /** Fraction done of the running computation, in [0, 1]. */
  readonly progress: number;
  /** Finished method runs by key (re-used when methods are toggled back). */
  readonly runs: Readonly<Record<string, MethodRun>>;
  readonly neighbours: Readonly<Record<string, NeighbourRun>>;
  readonly comparison: Comparison | null;
  readonly convergence: ConvergenceRun | null;
  readonly convergenceStatus: 'idle' | 'computing' | 'done' | 'cancelled' | 'error';
  readonly convergenceMessage: string;
  /** Picked target (index into comparison.targets), and a request to fly the 3D view to one. */
  readonly selected: number | null;
  readonly flyTo: { readonly target: number; readonly nonce: number } | null;
  /** A shared link named a file the page does not hold: its name, size and the link's settings. */
  readonly wantedFile: { readonly name: string; readonly n: number | null; readonly draft: Draft } | null;
  /** Measured ÷ modelled time per method kind (refined after every run). */
  readonly calibration: Readonly<Record<string, number>>;
  /** Id of the latest computation started; replies for older ones are dropped. */
  readonly computeId: number;
  readonly startedAt: number;
}

export function appStateInitial(draft: Draft = DEFAULT_DRAFT): AppState {
  return {
    draft,
    snapshot: null,
    status: 'idle',
    phase: '',
    message: '',
    progress: 0,
    runs: {},
    neighbours: {},
    comparison: null,
    convergence: null,
    convergenceStatus: 'idle',
    convergenceMessage: '',
    selected: null,
    flyTo: null,
    wantedFile: null,
    calibration: {},
    computeId: 0,
    startedAt: 0,
  };
}

export const appStore = createStore<AppState>()(() => appStateInitial());

/** Replaces the store's state (page start, tests). */
export function appReset(draft: Draft = DEFAULT_DRAFT): void {
  appStore.setState(appStateInitial(draft), true);
}

/** Changes run fields of the form; nothing is checked until Compute. */
export function draftSet(patch: Partial<Omit<Draft, 'a' | 'b' | 'view'>>): void {
  appStore.setState((s) => ({ draft: { ...s.draft, ...patch } }));
}

/** Chooses the method of slot A or B. */
export function slotMethodSet(slot: 'a' | 'b', method: MethodId): void {
  appStore.setState((s) => ({ draft: { ...s.draft, [slot]: { ...s.draft[slot], method } } }));
}

/** Changes one parameter of slot A or B. */
export function slotParamSet(slot: 'a' | 'b', key: string, value: string): void {
  appStore.setState((s) => ({ draft: { ...s.draft, [slot]: { ...s.draft[slot], params: { ...s.draft[slot].params, [key]: value } } } }));
}

/** Swaps slots A and B. */
export function slotsSwap(): void {
  appStore.setState((s) => ({ draft: { ...s.draft, a: s.draft.b, b: s.draft.a } }));
}

/** Changes how the comparison is shown (no recomputation). */
export function viewSet(patch: Partial<ViewDraft>): void {
  appStore.setState((s) => ({ draft: { ...s.draft, view: { ...s.draft.view, ...patch } } }));
}

export function arrowsSet(arrows: ArrowMode): void {
  viewSet({ arrows });
}

/** Picks a target of the comparison (null: none). */
export function select(target: number | null): void {
  appStore.setState({ selected: target });
}

/** Picks a target and asks the 3D view to fly to it. */
export function flyToTarget(target: number): void {
  appStore.setState((s) => ({ selected: target, flyTo: { target, nonce: (s.flyTo?.nonce ?? 0) + 1 } }));
}
