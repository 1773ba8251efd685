/**
 * The phases of a particle-mesh Ewald run as work units that any thread may take from a shared counter
 * (Atomics.add), so the coordinating thread and its workers run the same loop over the same shared mesh and
 * result arrays: in the CLI (app/cli/parallelPme.ts, worker_threads) and in the browser
 * (app/web/worker/pmeParallel.ts, web workers). Scheduling only, no node: modules: each unit is one
 * engine call (engine/pme/pme.ts).
 *   spreadEven / spreadOdd: blocks of whole cell-list x-slabs (pmeSpreadBlocks); blocks of one parity
 *     write disjoint mesh planes, so they run concurrently into the one mesh (colouring, no halos);
 *   spreadAll: the whole assignment as one unit (mesh too thin to split);
 *   forward / solve / inverse: FFT column blocks and spectrum slabs;
 *   interpolate: ranges of sorted particles (read-only on the mesh, disjoint writes);
 *   real: chunks of cell-list cells, summed inside each thread's setup until collected.
 */
import {
  type PmeSetup,
  pmeForwardChunk,
  pmeInterpolateChunk,
  pmeInverseChunk,
  pmeRealChunk,
  pmeScratch,
  pmeSolveChunk,
  pmeSpreadChunk,
  pmeWorkUnits,
} from '../../engine/pme/index';

export const PME_PHASES = ['spreadEven', 'spreadOdd', 'spreadAll', 'forward', 'solve', 'inverse', 'interpolate', 'real'] as const;
export type PmePhase = (typeof PME_PHASES)[number];

/** One thread's view of a run: its setup (own or pinned) over the shared buffers. */
export interface PmeShared {
  readonly setup: PmeSetup;
  /** The shared mesh ((n0 + 2)·n1·n2 numbers). */
  readonly mesh: Float64Array;
  /** Raw sums in sorted order, shared: 3N and N. */
  readonly accSorted: Float64Array;
  readonly phiSorted: Float64Array;
  /** One counter per phase (index in PME_PHASES), all starting at 0. */
  readonly counters: Int32Array;
  /** Sorted-particle offsets of the spreading blocks (even count), or null for spreadAll. */
  readonly cuts: Int32Array | null;
  readonly scratch: ReturnType<typeof pmeScratch>;
  /** Stop flag (shared): once stop[0] ≠ 0 no thread takes another unit (set by whoever cancels the run). */
  readonly stop?: Int32Array;
}

/** Work units of a phase and the call that runs unit k. */
function phaseWork(s: PmeShared, phase: PmePhase): { units: number; run: (k: number) => void } {
  const { setup, mesh, scratch } = s;
  const u = pmeWorkUnits(setup);
  const ranged = (total: number, parts: number, call: (b: number, e: number) => void) => {
    const step = Math.max(1, Math.ceil(total / parts));
    return { units: Math.ceil(total / step), run: (k: number) => call(k * step, Math.min(total, (k + 1) * step)) };
  };
  switch (phase) {
    case 'spreadEven':
    case 'spreadOdd': {
      const cuts = s.cuts;
      if (!cuts) return { units: 0, run: () => undefined };
      const odd = phase === 'spreadOdd' ? 1 : 0;
      return { units: (cuts.length - 1) / 2, run: (k) => pmeSpreadChunk(setup, mesh, cuts[2 * k + odd], cuts[2 * k + odd + 1]) };
    }
    case 'spreadAll':
      return { units: s.cuts ? 0 : 1, run: () => pmeSpreadChunk(setup, mesh, 0, u.particles) };
    case 'forward':
      return ranged(u.columnBlocks, 64, (b, e) => pmeForwardChunk(setup, mesh, b, e, scratch));
    case 'solve':
      return ranged(u.slabs, 64, (b, e) => pmeSolveChunk(setup, mesh, b, e, scratch));
    case 'inverse':
      return ranged(u.columnBlocks, 64, (b, e) => pmeInverseChunk(setup, mesh, b, e, scratch));
    case 'interpolate':
      return ranged(u.particles, 256, (b, e) => pmeInterpolateChunk(setup, mesh, b, e, s.accSorted, s.phiSorted));
    case 'real':
      // Fine chunks: a few cells inside a dense clump can cost as much as thousands elsewhere.
      return ranged(u.cells, 2048, (b, e) => pmeRealChunk(setup, b, e));
  }
}

/**
 * Takes units of `phase` from its shared counter until none are left (or the stop flag is set: the run is
 * then abandoned, its results incomplete); onUnit(done, total) after each
 * unit this thread ran (done = units handed out so far, over all threads). Returns the units this thread ran.
 */
export function pmePhaseRun(s: PmeShared, phase: PmePhase, onUnit?: (done: number, total: number) => void): number {
  const { units, run } = phaseWork(s, phase);
  const c = PME_PHASES.indexOf(phase);
  for (let ran = 0; ; ran++) {
    if (s.stop && Atomics.load(s.stop, 0) !== 0) return ran;
    const k = Atomics.add(s.counters, c, 1);
    if (k >= units) return ran;
    run(k);
    onUnit?.(Math.min(units, k + 1), units);
  }
}
