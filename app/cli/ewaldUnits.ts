/**
 * The units of a threaded Ewald run and the loops every thread (main and workers) runs over them,
 * taking units from shared counters (Atomics), so that no thread waits for a message to get work:
 *   phase 1: structure-factor units (source ranges), each thread adding into its own partial sum;
 *   phase 2: real-space cell units (all-particle runs), then Fourier units (or per-target units), which
 *            need the weighted structure factor: the first thread to reach one sums the partials and
 *            weighs them once every thread has left phase 1.
 * Numerics are the engine's (ewald.ts); this file only schedules.
 */
import {
  type EwaldChosen,
  type EwaldSetup,
  ewaldAllRealChunk,
  ewaldFourierChunk,
  ewaldStructureFactorAdd,
  ewaldTargetsChunk,
  ewaldWeighStructureFactor,
} from '../../engine/ewald/ewald';

/** Slots of the control block (Int32Array over a SharedArrayBuffer). */
export const CTL_SF_NEXT = 0;
export const CTL_SF_DONE = 1;
export const CTL_RUN_NEXT = 2;
/** 0: weighted structure factor not made; 1: being made; 2: ready. */
export const CTL_WEIGHTED = 3;
/** Set when the run failed: threads stop taking units. */
export const CTL_STOP = 4;
export const CTL_SIZE = 8;

/** How the work is cut; the same for every thread. */
export interface UnitsPlan {
  readonly threads: number;
  /** Sources per structure-factor unit and the number of such units. */
  readonly sfStep: number;
  readonly sfUnits: number;
  /** All-particle mode: cells per real-space unit and the number of such units (0 in per-target mode). */
  readonly cellStep: number;
  readonly cellUnits: number;
  /** Targets per Fourier (all-particle) or per-target unit, and the number of such units. */
  readonly targetStep: number;
  readonly targetUnits: number;
  /** Whether phase 2 is all-particle (cells + Fourier) rather than per-target. */
  readonly all: boolean;
}

/** Shared buffers of one run. */
export interface UnitsShared {
  readonly ctl: SharedArrayBuffer;
  /** threads × 2K doubles: each thread's partial structure factor. */
  readonly sParts: SharedArrayBuffer;
  /** 2K doubles: the weighted structure factor. */
  readonly weighted: SharedArrayBuffer;
}

/**
 * The plan for n particles, K targets (all-particle mode when `all`), nCells cells and `threads` threads:
 * units small enough to balance the threads' finishing times (about 24 per thread and phase).
 */
export function unitsPlan(n: number, targets: number, nCells: number, threads: number, all: boolean): UnitsPlan {
  const sfStep = Math.max(256, Math.ceil(n / (threads * 8)));
  const cellStep = all ? Math.max(1, Math.ceil(nCells / (threads * 24))) : 1;
  const targetStep = all ? Math.max(64, Math.ceil(targets / (threads * 24))) : Math.max(16, Math.ceil(targets / (threads * 24)));
  return {
    threads,
    sfStep,
    sfUnits: Math.ceil(n / sfStep),
    cellStep,
    cellUnits: all ? Math.ceil(nCells / cellStep) : 0,
    targetStep,
    targetUnits: Math.ceil(targets / targetStep),
    all,
  };
}

/** Fresh shared buffers for a run with k-vector count nk. */
export function unitsShared(threads: number, nk: number): UnitsShared {
  return {
    ctl: new SharedArrayBuffer(4 * CTL_SIZE),
    sParts: new SharedArrayBuffer(8 * threads * 2 * nk),
    weighted: new SharedArrayBuffer(8 * 2 * nk),
  };
}

/**
 * Phase 1 for thread `thread`: takes structure-factor units until none are left, adding into this thread's
 * partial sum, then counts itself out of phase 1. Returns the units it ran.
 */
export function structureUnitsRun(chosen: EwaldChosen, plan: UnitsPlan, shared: UnitsShared, thread: number): number {
  const ctl = new Int32Array(shared.ctl);
  const nk2 = 2 * chosen.kspace.count;
  const part = new Float64Array(shared.sParts, 8 * thread * nk2, nk2);
  const n = chosen.masses.length;
  let ran = 0;
  try {
    for (;;) {
      if (Atomics.load(ctl, CTL_STOP) !== 0) break;
      const u = Atomics.add(ctl, CTL_SF_NEXT, 1);
      if (u >= plan.sfUnits) break;
      const b = u * plan.sfStep;
      ewaldStructureFactorAdd(chosen, b, Math.min(n, b + plan.sfStep), part);
      ran++;
    }
  } finally {
    Atomics.add(ctl, CTL_SF_DONE, 1);
    Atomics.notify(ctl, CTL_SF_DONE);
  }
  return ran;
}

/**
 * Makes the weighted structure factor when it can: true when it is ready. False means wait: on
 * CTL_SF_DONE (a thread is still in phase 1) or on CTL_WEIGHTED (another thread is making it); see
 * weightedWaitSlot.
 */
function weightedTry(chosen: EwaldChosen, plan: UnitsPlan, shared: UnitsShared, ctl: Int32Array): boolean {
  if (Atomics.load(ctl, CTL_WEIGHTED) === 2) return true;
  if (Atomics.load(ctl, CTL_SF_DONE) < plan.threads) return false;
  if (Atomics.compareExchange(ctl, CTL_WEIGHTED, 0, 1) !== 0) return false;
  const nk2 = 2 * chosen.kspace.count;
  const w = new Float64Array(shared.weighted);
  const parts = new Float64Array(shared.sParts);
  // Partials summed in thread order.
  w.set(parts.subarray(0, nk2));
  for (let t = 1; t < plan.threads; t++) {
    const o = t * nk2;
    for (let k = 0; k < nk2; k++) w[k] += parts[o + k];
  }
  ewaldWeighStructureFactor(chosen, w);
  Atomics.store(ctl, CTL_WEIGHTED, 2);
  Atomics.notify(ctl, CTL_WEIGHTED);
  return true;
}

/**
 * The control slot to wait on while weightedTry says no, and the value it holds now; null when there is
 * nothing to wait for any more (every thread has left phase 1 and nobody is making the sums: try again).
 */
export function weightedWaitSlot(plan: UnitsPlan, ctl: Int32Array): [slot: number, value: number] | null {
  const done = Atomics.load(ctl, CTL_SF_DONE);
  if (done < plan.threads) return [CTL_SF_DONE, done];
  const state = Atomics.load(ctl, CTL_WEIGHTED);
  return state === 1 ? [CTL_WEIGHTED, 1] : null;
}

/** One thread's place in phase 2: a unit taken but not yet run (it waits for the weighted sums). */
export interface RunCursor {
  held: number;
  ran: number;
}

/**
 * Phase 2: takes units until none are left (returns true) or until a unit needs the weighted structure
 * factor that is not ready yet (returns false with the unit held in `cursor`: wait, then call again).
 * acc/phi: the shared per-target sums; targets: input rows.
 */
export function runUnits(
  setup: EwaldSetup,
  plan: UnitsPlan,
  shared: UnitsShared,
  targets: Int32Array,
  acc: Float64Array,
  phi: Float64Array,
  cursor: RunCursor,
  onUnit?: (taken: number, total: number) => void,
): boolean {
  const ctl = new Int32Array(shared.ctl);
  const total = plan.cellUnits + plan.targetUnits;
  const K = targets.length;
  let weighted: Float64Array | null = Atomics.load(ctl, CTL_WEIGHTED) === 2 ? new Float64Array(shared.weighted) : null;
  for (;;) {
    if (Atomics.load(ctl, CTL_STOP) !== 0) return true;
    const u = cursor.held >= 0 ? cursor.held : Atomics.add(ctl, CTL_RUN_NEXT, 1);
    cursor.held = -1;
    if (u >= total) return true;
    if (u < plan.cellUnits) {
      const nc = setup.cells.start.length - 1;
      const b = u * plan.cellStep;
      ewaldAllRealChunk(setup, b, Math.min(nc, b + plan.cellStep));
    } else {
      if (!weighted) {
        if (!weightedTry(setup, plan, shared, ctl)) {
          cursor.held = u;
          return false;
        }
        weighted = new Float64Array(shared.weighted);
      }
      const b = (u - plan.cellUnits) * plan.targetStep;
      const e = Math.min(K, b + plan.targetStep);
      if (plan.all) ewaldFourierChunk(setup, weighted, targets, b, e, acc, phi);
      else ewaldTargetsChunk(setup, weighted, targets, b, e, acc, phi);
    }
    cursor.ran++;
    onUnit?.(Math.min(total, Atomics.load(ctl, CTL_RUN_NEXT)), total);
  }
}

/** Phase 2 in a worker: runUnits, blocking on the control block while the weighted sums are made. */
export function runUnitsBlocking(
  setup: EwaldSetup,
  plan: UnitsPlan,
  shared: UnitsShared,
  targets: Int32Array,
  acc: Float64Array,
  phi: Float64Array,
): number {
  const ctl = new Int32Array(shared.ctl);
  const cursor: RunCursor = { held: -1, ran: 0 };
  while (!runUnits(setup, plan, shared, targets, acc, phi, cursor)) {
    if (Atomics.load(ctl, CTL_STOP) !== 0) break;
    const wait = weightedWaitSlot(plan, ctl);
    if (wait) Atomics.wait(ctl, wait[0], wait[1], 100);
  }
  return cursor.ran;
}
