/**
 * Direct Ewald summation for gravity in a periodic rectangular box (Ewald 1921; Hernquist, Bouchet &
 * Suto 1991, ApJS 75, 231), conventions of PHYSICS.md: mean density removed, zero-mean potential,
 * zero self-force, potential φ = −G[Σ_{j≠i} m_j ψ(r_i − r_j) + m_i ξ], acceleration a = −∇φ.
 *
 * Computing is split into synchronous pieces that a scheduler (worker, CLI threads) can distribute:
 * ewaldSetup → ewaldStructureFactor (ranges of sources, summed) → ewaldTargetsChunk or
 * ewaldAllRealChunk + ewaldFourierChunk → ewaldFinalize. ewaldForces runs them all on one thread.
 */
import { float64s } from '../util/arrays';
import { targetsAll, targetsAreAll } from '../targets';
import { type Box, boxMake, boxVolume, positionsWrap } from '../box';
import { type CellList, cellListBuild, cellListCoordinates, cellListNeighbour, cellStencil } from './cellList';
import { type KernelTable, kernelTableBuild } from './kernelTable';
import { type KSpace, kSpaceBuild, kSpaceStructureFactor, kSpaceTargets, kSpaceWeigh } from './kSpace';
import { type EwaldOptions, type EwaldParams, type MassSums, clusteringFromSumSq, clusteringGrid, ewaldParamsChoose } from './params';
import { type RealSpaceKernel, realSpaceAllSorted, realSpaceTargets } from './realSpace';
import { type KSpaceWasm, kSpaceWasmCreate } from '../wasm/kSpaceWasm';
import { type RealSpaceWasm, realSpaceWasmCreate } from '../wasm/realSpaceWasm';
import { type PrepareWasm, prepareWasmCreate } from '../wasm/prepareWasm';

/** What the Fourier part needs: the first half of a setup (ewaldChoose), before the cell list exists. */
export interface EwaldChosen {
  readonly box: Box;
  /** Positions wrapped into the home cell (a copy), flat xyz. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  /** How many input particles lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  readonly params: EwaldParams;
  readonly kspace: KSpace;
  readonly totalMass: number;
  /** WebAssembly context of the Fourier kernels (created on first use; null where unavailable). */
  kWasm?: KSpaceWasm | null;
  /** WebAssembly context that prepared the particles (holds the wrapped copy for the cell list), if any. */
  prep?: PrepareWasm | null;
}

export interface EwaldSetup extends EwaldChosen {
  readonly cells: CellList;
  readonly kernel: RealSpaceKernel;
  /** WebAssembly context of the real-space kernels (created on first use; null where unavailable). */
  rWasm?: RealSpaceWasm | null;
  /** JavaScript-path accumulators of the symmetric all-particle real-space sums (sorted order). */
  allSorted?: { acc: Float64Array; phi: Float64Array };
}

function realWasm(setup: EwaldSetup): RealSpaceWasm | null {
  if (setup.rWasm === undefined) setup.rWasm = realSpaceWasmCreate(setup.cells, setup.box, setup.kernel);
  return setup.rWasm;
}

function fourierWasm(setup: EwaldChosen): KSpaceWasm | null {
  if (setup.kWasm === undefined) setup.kWasm = kSpaceWasmCreate(setup.kspace, setup.box, setup.positions, setup.masses);
  return setup.kWasm;
}

/** Error for input the engine cannot use; `index` is the 0-based particle, when one is to blame. */
export class EngineInputError extends Error {
  constructor(message: string, readonly index?: number, readonly other?: number) {
    super(message);
    this.name = 'EngineInputError';
  }
}

/** Checks flat positions (3N) against masses (N) and that every value is finite; throws EngineInputError. */
export function particlesValidate(positions: Float64Array, masses: Float64Array): void {
  if (positions.length !== 3 * masses.length) {
    throw new EngineInputError(`positions hold ${positions.length} numbers but ${masses.length} masses need ${3 * masses.length}`);
  }
  for (let i = 0; i < masses.length; i++) {
    if (!Number.isFinite(masses[i])) throw new EngineInputError(`mass of particle ${i} is not finite (${masses[i]})`, i);
    for (let d = 0; d < 3; d++) {
      const v = positions[3 * i + d];
      if (!Number.isFinite(v)) throw new EngineInputError(`coordinate ${'xyz'[d]} of particle ${i} is not finite (${v})`, i);
    }
  }
}

/**
 * Finds two particles at exactly the same (wrapped) position; returns their input rows (smaller first) or
 * null. Per cell, the x coordinates are sorted (native typed-array sort); only a cell with a repeated x
 * has its particles sorted by (x, y, z) and compared with their neighbours: O(N log N) overall.
 */
export function cellListFindCoincident(cells: CellList): [number, number] | null {
  const { start, xyzm, order } = cells;
  let xs = new Float64Array(64);
  for (let c = 0; c + 1 < start.length; c++) {
    const a = start[c], b = start[c + 1];
    if (b - a < 2) continue;
    if (xs.length < b - a) xs = new Float64Array(2 * (b - a));
    const v = xs.subarray(0, b - a);
    for (let i = a; i < b; i++) v[i - a] = xyzm[4 * i];
    v.sort();
    let repeated = false;
    for (let k = 1; k < v.length && !repeated; k++) repeated = v[k] === v[k - 1];
    if (!repeated) continue;
    // Sorted by (x, y, z), stable: equal positions end up adjacent, in input order.
    const idx: number[] = [];
    for (let i = a; i < b; i++) idx.push(i);
    idx.sort((p, q) => xyzm[4 * p] - xyzm[4 * q] || xyzm[4 * p + 1] - xyzm[4 * q + 1] || xyzm[4 * p + 2] - xyzm[4 * q + 2]);
    for (let k = 1; k < idx.length; k++) {
      const p = idx[k - 1], q = idx[k];
      if (xyzm[4 * p] === xyzm[4 * q] && xyzm[4 * p + 1] === xyzm[4 * q + 1] && xyzm[4 * p + 2] === xyzm[4 * q + 2]) {
        const u = order[p], w = order[q];
        return u < w ? [u, w] : [w, u];
      }
    }
  }
  return null;
}

/** What an earlier setup of the same positions, masses and box established (validated, no coincident pair). */
export interface EwaldChecked {
  /** Its clustering factor (params.clustering). */
  readonly clustering: number;
}

/**
 * Prepares a run: wraps positions (length units) into the box, chooses parameters for `targetCount`
 * targets, builds the cell list, kernel table and k-vectors. Masses may be signed (lattice-sum checks).
 * `checked` (from an earlier setup of the same particles) skips the validation, the coincidence search
 * and the clustering measurement. Same as ewaldSetupBuild(ewaldChoose(…)).
 */
export function ewaldSetup(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: EwaldOptions = {},
  targetCount: number = masses.length,
  checked?: EwaldChecked,
): EwaldSetup {
  return ewaldSetupBuild(ewaldChoose(positions, masses, box, options, targetCount, checked), options, checked);
}

/**
 * The first half of ewaldSetup: validates, wraps positions into the box (one WebAssembly pass where
 * available, engine/wasm/prepareWasm.ts; a copy, in shared memory with
 * options.sharedMemory), chooses the parameters and enumerates the k-vectors. Enough for
 * ewaldStructureFactor, so that threads can start on it while ewaldSetupBuild makes the cell list.
 */
export function ewaldChoose(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: EwaldOptions = {},
  targetCount: number = masses.length,
  checked?: EwaldChecked,
): EwaldChosen {
  boxMake(box.lx, box.ly, box.lz); // throws a RangeError naming a side that is not > 0
  const shared = options.sharedMemory === true;
  const wrappedPositions = float64s(positions.length, shared);
  // WebAssembly: validation, wrapping, clustering counts and mass sums in one pass, the same bits as the
  // JavaScript passes below.
  const prep = positions.length === 3 * masses.length ? prepareWasmCreate() : null;
  let wrapped: number, clustering: number | undefined, sums: MassSums | undefined, totalMass: number;
  if (prep) {
    const grid = clusteringGrid(masses.length, box);
    const r = prep.particles(positions, masses, box, grid, wrappedPositions);
    if (!r) {
      particlesValidate(positions, masses); // names the particle
      throw new EngineInputError('a mass or coordinate is not finite');
    }
    wrapped = r.moved;
    clustering = checked?.clustering ?? clusteringFromSumSq(r.clusterSumSq, grid[0] * grid[1] * grid[2], masses.length);
    sums = { q: r.q, m32: r.m32, mAbs: r.mAbs };
    totalMass = r.total;
  } else {
    if (!checked) particlesValidate(positions, masses);
    wrappedPositions.set(positions);
    wrapped = positionsWrap(wrappedPositions, box);
    clustering = checked?.clustering;
    totalMass = 0;
    for (let i = 0; i < masses.length; i++) totalMass += masses[i];
  }
  const chosen = ewaldParamsChoose(wrappedPositions, masses, box, options, targetCount, clustering, sums);
  const kspace = kSpaceBuild(box, chosen.alpha, chosen.kCut);
  const params: EwaldParams = { ...chosen, hMax: kspace.hMax, kVectors: kspace.count };
  return { box, positions: wrappedPositions, masses, wrapped, params, kspace, totalMass, prep };
}

/**
 * The second half of ewaldSetup: the cell list (shared memory with options.sharedMemory), the search for
 * coincident particles (unless `checked` or softened) and the kernel table. Keeps `chosen`'s Fourier context.
 */
export function ewaldSetupBuild(chosen: EwaldChosen, options: EwaldOptions = {}, checked?: EwaldChecked): EwaldSetup {
  const p = chosen.params;
  const rLoop = Math.max(p.rCut, p.rSoft);
  const shared = options.sharedMemory === true;
  const cells = chosen.prep ? chosen.prep.cellList(chosen.box, p.cells, rLoop, shared) : cellListBuild(chosen.positions, chosen.masses, chosen.box, p.cells, rLoop, shared);
  if (p.softening.kind === 'none' && !checked) {
    // The WebAssembly hash pass rules a coincident pair out in O(N); the cell search then only runs to
    // name the pair (the same pair on both paths).
    const pair = chosen.prep && !chosen.prep.anyCoincident() ? null : cellListFindCoincident(cells);
    if (pair) {
      throw new EngineInputError(
        `particles ${pair[0]} and ${pair[1]} sit at the same position; without softening their force is infinite (use softening or remove one)`,
        pair[0],
        pair[1],
      );
    }
  }
  const uMax = p.alpha * p.alpha * p.rCut * p.rCut;
  const table: KernelTable = kernelTableBuild(uMax);
  return {
    ...chosen,
    prep: null, // its memory (a copy of the particles) is not needed any more
    params: { ...p, stencilCells: cells.stencil.length / 3 },
    cells,
    kernel: { alpha: p.alpha, rCut: p.rCut, rSoft: p.rSoft, softening: p.softening, table },
  };
}

/**
 * A setup for `targetCount` targets of the same particles as `base` under other options (the weak-field
 * refinement's tighter tolerance): new α, r_c, k_c, k-vectors and kernel table, but `base`'s validated,
 * wrapped positions and sorted particles; the cell grid stays and only its stencil is remade for the new
 * cutoff (the stencil is valid for any cutoff). No pass over the particles but the parameter choice's
 * sums over the masses, and no copy of them: the base's WebAssembly contexts, where it has made them,
 * make the new ones inside their own instances.
 */
export function ewaldSetupRefine(base: EwaldSetup, options: EwaldOptions, targetCount: number): EwaldSetup {
  const chosen = ewaldParamsChoose(base.positions, base.masses, base.box, options, targetCount, base.params.clustering);
  const kspace = kSpaceBuild(base.box, chosen.alpha, chosen.kCut);
  const rLoop = Math.max(chosen.rCut, chosen.rSoft);
  const { offsets, halfCount } = cellStencil(base.cells.w, rLoop);
  const cells: CellList = { ...base.cells, stencil: offsets, halfCount };
  const params: EwaldParams = { ...chosen, hMax: kspace.hMax, kVectors: kspace.count, cells: base.params.cells, stencilCells: offsets.length / 3 };
  const table = kernelTableBuild(params.alpha * params.alpha * params.rCut * params.rCut);
  const kernel: RealSpaceKernel = { alpha: params.alpha, rCut: params.rCut, rSoft: params.rSoft, softening: params.softening, table };
  return {
    box: base.box,
    positions: base.positions,
    masses: base.masses,
    wrapped: base.wrapped,
    params,
    kspace,
    totalMass: base.totalMass,
    cells,
    kernel,
    // The base's WebAssembly contexts, where it made them, lend their instances (particles already inside).
    ...(base.rWasm ? { rWasm: base.rWasm.derive(cells, kernel) } : {}),
    ...(base.kWasm ? { kWasm: base.kWasm.derive(kspace) } : {}),
  };
}

/** Partial structure factor over source particles [begin, end): interleaved re, im per k-vector. */
export function ewaldStructureFactor(setup: EwaldChosen, begin = 0, end = setup.masses.length): Float64Array {
  return ewaldStructureFactorAdd(setup, begin, end, new Float64Array(2 * setup.kspace.count));
}

/** Adds the structure factor of source particles [begin, end) into s (interleaved re, im); returns s. */
export function ewaldStructureFactorAdd(setup: EwaldChosen, begin: number, end: number, s: Float64Array): Float64Array {
  const w = fourierWasm(setup);
  if (w) w.structureFactor(begin, end, s);
  else kSpaceStructureFactor(setup.kspace, setup.box, setup.positions, setup.masses, begin, end, s);
  return s;
}

/** Turns the summed structure factor into the weighted one the evaluation needs (in place). */
export function ewaldWeighStructureFactor(setup: EwaldChosen, s: Float64Array): Float64Array {
  return kSpaceWeigh(setup.kspace, s);
}

/**
 * Raw sums for targets[begin..end): real space (full stencil) + Fourier; adds into acc[3t..] and phi[t]
 * (t indexes `targets`). Finish with ewaldFinalize.
 */
export function ewaldTargetsChunk(
  setup: EwaldSetup,
  weighted: Float64Array,
  targets: Int32Array,
  begin: number,
  end: number,
  acc: Float64Array,
  phi: Float64Array,
): void {
  const w = realWasm(setup);
  if (w) w.targets(targets, begin, end, acc, phi);
  else realSpaceTargets(setup.cells, setup.box, setup.kernel, targets, begin, end, acc, phi);
  ewaldFourierChunk(setup, weighted, targets, begin, end, acc, phi);
}

/** Fourier raw sums only, for targets[begin..end) (used with the symmetric all-particle real space). */
export function ewaldFourierChunk(
  setup: EwaldSetup,
  weighted: Float64Array,
  targets: Int32Array,
  begin: number,
  end: number,
  acc: Float64Array,
  phi: Float64Array,
): void {
  const w = fourierWasm(setup);
  if (w) w.targets(weighted, targets, begin, end, acc, phi);
  else kSpaceTargets(setup.kspace, setup.box, weighted, setup.positions, targets, begin, end, acc, phi);
}

/** Number of cells of the real-space cell list (the unit of work for ewaldAllRealChunk). */
export function ewaldCellCount(setup: EwaldSetup): number {
  return setup.cells.start.length - 1;
}

/**
 * Symmetric real-space raw sums for all particles over cells [cellBegin, cellEnd), accumulated inside
 * the setup (each pair once, Newton's third law); fetch them with ewaldAllRealCollect.
 */
export function ewaldAllRealChunk(setup: EwaldSetup, cellBegin: number, cellEnd: number): void {
  const w = realWasm(setup);
  if (w) {
    w.allChunk(cellBegin, cellEnd);
    return;
  }
  const n = setup.masses.length;
  setup.allSorted ??= { acc: new Float64Array(3 * n), phi: new Float64Array(n) };
  realSpaceAllSorted(setup.cells, setup.box, setup.kernel, cellBegin, cellEnd, setup.allSorted.acc, setup.allSorted.phi);
}

/** Returns the accumulated all-particle real-space sums (sorted order: acc 3N, phi N) and clears them. */
export function ewaldAllRealCollect(setup: EwaldSetup): { accSorted: Float64Array; phiSorted: Float64Array } {
  const n = setup.masses.length;
  const accSorted = new Float64Array(3 * n);
  const phiSorted = new Float64Array(n);
  const w = realWasm(setup);
  if (w) w.allCollect(accSorted, phiSorted);
  else if (setup.allSorted) {
    accSorted.set(setup.allSorted.acc);
    phiSorted.set(setup.allSorted.phi);
    setup.allSorted = undefined;
  }
  return { accSorted, phiSorted };
}

/**
 * Adds the accumulated all-particle real-space sums into input-order acc (3N) and phi (N) and clears them:
 * ewaldAllRealCollect then ewaldUnsort, in one WebAssembly pass where the kernels run there.
 */
export function ewaldAllRealAddUnsorted(setup: EwaldSetup, acc: Float64Array, phi: Float64Array): void {
  const w = realWasm(setup);
  if (w) {
    w.allAddUnsorted(acc, phi);
    return;
  }
  const { accSorted, phiSorted } = ewaldAllRealCollect(setup);
  ewaldUnsort(setup, accSorted, phiSorted, acc, phi);
}

/** Adds sorted-order raw sums into input-order arrays (acc 3N, phi N). */
export function ewaldUnsort(setup: EwaldSetup, accSorted: Float64Array, phiSorted: Float64Array, acc: Float64Array, phi: Float64Array): void {
  const order = setup.cells.order;
  for (let s = 0; s < order.length; s++) {
    const i = order[s];
    acc[3 * i] += accSorted[3 * s];
    acc[3 * i + 1] += accSorted[3 * s + 1];
    acc[3 * i + 2] += accSorted[3 * s + 2];
    phi[i] += phiSorted[s];
  }
}

/**
 * Turns raw sums into physical results in place: acc ← G·acc; phi ← −G(phi + m_i(−2α/√π) − πM/(α²V)),
 * i.e. adds the self term and the neutralising-background constant of the zero-mean potential. `parts`:
 * further raw sums of the same targets (e.g. other threads' real-space sums), added first, in order —
 * the same additions as adding them into acc/phi beforehand, in one pass.
 */
export function ewaldFinalize(
  setup: EwaldChosen,
  targets: Int32Array,
  acc: Float64Array,
  phi: Float64Array,
  parts: readonly { readonly acc: Float64Array; readonly phi: Float64Array }[] = [],
): void {
  const { G, alpha } = setup.params;
  const background = (Math.PI * setup.totalMass) / (alpha * alpha * boxVolume(setup.box));
  const selfCoef = (2 * alpha) / Math.sqrt(Math.PI);
  const masses = setup.masses;
  for (let t = 0; t < targets.length; t++) {
    let ax = acc[3 * t], ay = acc[3 * t + 1], az = acc[3 * t + 2], p = phi[t];
    for (let k = 0; k < parts.length; k++) {
      const q = parts[k];
      ax += q.acc[3 * t];
      ay += q.acc[3 * t + 1];
      az += q.acc[3 * t + 2];
      p += q.phi[t];
    }
    acc[3 * t] = G * ax;
    acc[3 * t + 1] = G * ay;
    acc[3 * t + 2] = G * az;
    phi[t] = -G * (p - masses[targets[t]] * selfCoef - background);
  }
}

/**
 * ewaldFinalize for an all-particle run (targets = every particle in input order) on acc/phi, which hold
 * the Fourier sums, with this setup's kept symmetric real-space sums (as ewaldAllRealAddUnsorted) and
 * `parts` (other threads' real-space sums, input order) added first, in that order: the same operations
 * as ewaldAllRealAddUnsorted into zeroed arrays followed by ewaldFinalize(setup, all, acc, phi, [those,
 * ...parts]), in WebAssembly inside the real-space context where the kernels run there.
 */
export function ewaldFinalizeAll(
  setup: EwaldSetup,
  acc: Float64Array,
  phi: Float64Array,
  parts: readonly { readonly acc: Float64Array; readonly phi: Float64Array }[] = [],
): void {
  const n = setup.masses.length;
  const w = realWasm(setup);
  if (w) {
    const { G, alpha } = setup.params;
    const background = (Math.PI * setup.totalMass) / (alpha * alpha * boxVolume(setup.box));
    w.allFinalize(acc, phi, parts, G, (2 * alpha) / Math.sqrt(Math.PI), background);
    return;
  }
  const own = { acc: new Float64Array(3 * n), phi: new Float64Array(n) };
  ewaldAllRealAddUnsorted(setup, own.acc, own.phi);
  ewaldFinalize(setup, targetsAll(n), acc, phi, [own, ...parts]);
}

export interface EwaldResult {
  /** Targets (input rows) in output order. */
  readonly targets: Int32Array;
  /** Accelerations, 3 per target (G·mass/length²). */
  readonly acc: Float64Array;
  /** Potentials per target (G·mass/length), zero-mean convention. */
  readonly phi: Float64Array;
  readonly params: EwaldParams;
  /** Particles that lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  /** Weak-field particles recomputed at a tighter tolerance (see ewaldRefineWeak). */
  readonly refined?: number;
}

/** Progress callback: fraction done in [0, 1]. */
export type Progress = (fraction: number) => void;

/** Throws an EngineInputError when a target row lies outside 0..n−1. */
export function ewaldTargetsValidate(targets: Int32Array, n: number): void {
  for (let t = 0; t < targets.length; t++) {
    if (!(targets[t] >= 0 && targets[t] < n)) throw new EngineInputError(`target ${t} is row ${targets[t]}, outside 0..${n - 1}`, targets[t]);
  }
}


/**
 * Ewald accelerations and potentials on one thread for `targets` (input rows; null = all), then the
 * weak-field refinement (ewaldRefineWeak) unless `refine` is false; `checked`: see ewaldSetup.
 * Positions: flat xyz in length units; masses in mass units; results in units with the given G.
 */
export function ewaldForces(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: EwaldOptions = {},
  onProgress?: Progress,
  refine = true,
  checked?: EwaldChecked,
): EwaldResult {
  const n = masses.length;
  const tg = targets ?? targetsAll(n);
  if (targets) ewaldTargetsValidate(tg, n);
  const all = !targets || targetsAreAll(tg, n);
  const setup = ewaldSetup(positions, masses, box, options, all ? n : tg.length, checked);
  const sf = new Float64Array(2 * setup.kspace.count);
  const sourceStep = Math.max(1024, Math.ceil(n / 8));
  for (let b = 0; b < n; b += sourceStep) {
    const part = ewaldStructureFactor(setup, b, Math.min(n, b + sourceStep));
    for (let k = 0; k < sf.length; k++) sf[k] += part[k];
    onProgress?.((0.25 * Math.min(n, b + sourceStep)) / n);
  }
  const weighted = ewaldWeighStructureFactor(setup, sf);
  const acc = new Float64Array(3 * tg.length);
  const phi = new Float64Array(tg.length);
  const chunk = 256;
  if (all) {
    const nc = ewaldCellCount(setup);
    const step = Math.max(1, Math.ceil(nc / 16));
    for (let c = 0; c < nc; c += step) {
      ewaldAllRealChunk(setup, c, Math.min(nc, c + step));
      onProgress?.(0.25 + (0.4 * Math.min(nc, c + step)) / nc);
    }
    ewaldAllRealAddUnsorted(setup, acc, phi);
    for (let b = 0; b < n; b += chunk) {
      ewaldFourierChunk(setup, weighted, tg, b, Math.min(n, b + chunk), acc, phi);
      onProgress?.(0.65 + (0.35 * Math.min(n, b + chunk)) / n);
    }
  } else {
    for (let b = 0; b < tg.length; b += chunk) {
      ewaldTargetsChunk(setup, weighted, tg, b, Math.min(tg.length, b + chunk), acc, phi);
      onProgress?.(0.25 + (0.75 * Math.min(tg.length, b + chunk)) / tg.length);
    }
  }
  ewaldFinalize(setup, tg, acc, phi);
  const refined = refine ? ewaldRefineWeak(setup, tg, acc, phi, options) : 0;
  return { targets: tg, acc, phi, params: setup.params, wrapped: setup.wrapped, refined };
}

/** Targets to refine (positions in `targets`, their input rows) and the tolerance to refine them at. */
export interface EwaldWeak {
  readonly at: Int32Array;
  readonly rows: Int32Array;
  readonly tol: number;
}

/**
 * The weak-field targets of a finished run: those whose |a| came out below params.accelerationScale (the
 * parameters assume none), with the tolerance tol·min|a|/scale (at least 1e-13) that keeps their relative
 * error below tol; null when there are none, or when α, r_c or k_c were overridden.
 */
export function ewaldWeakFind(targets: Int32Array, acc: Float64Array, params: EwaldParams, options: EwaldOptions): EwaldWeak | null {
  if (options.alpha !== undefined || options.rCut !== undefined || options.kCut !== undefined) return null;
  const scale = params.accelerationScale;
  // |a|/scale compared squared (the components scaled first, so no square over- or underflows); this loop
  // runs cold over every target, where Math.hypot costs ≈ 4 ms at N = 16 384.
  const inv = 1 / scale;
  const weak: number[] = [];
  let q2Min = Infinity;
  for (let t = 0; t < targets.length; t++) {
    const x = acc[3 * t] * inv, y = acc[3 * t + 1] * inv, z = acc[3 * t + 2] * inv;
    const q2 = x * x + y * y + z * z;
    if (q2 < 1) {
      weak.push(t);
      if (q2 < q2Min) q2Min = q2;
    }
  }
  if (weak.length === 0) return null;
  const tol = Math.max(1e-13, params.tol * Math.sqrt(q2Min));
  if (tol >= params.tol) return null;
  return { at: Int32Array.from(weak), rows: Int32Array.from(weak, (t) => targets[t]), tol };
}

/** Puts a refinement's results (acc 3·weak.rows.length, phi) in place of the weak targets' in acc/phi. */
export function ewaldWeakReplace(weak: EwaldWeak, refined: { acc: Float64Array; phi: Float64Array }, acc: Float64Array, phi: Float64Array): void {
  weak.at.forEach((t, k) => {
    acc[3 * t] = refined.acc[3 * k];
    acc[3 * t + 1] = refined.acc[3 * k + 1];
    acc[3 * t + 2] = refined.acc[3 * k + 2];
    phi[t] = refined.phi[k];
  });
}

/**
 * A posteriori refinement (ewaldWeakFind): the weak-field targets are recomputed (per-target mode) at
 * their tighter tolerance on `setup`'s particles (ewaldSetupRefine) and replaced in acc/phi, so their
 * relative error also stays below tol. Returns the number of particles refined.
 */
export function ewaldRefineWeak(setup: EwaldSetup, targets: Int32Array, acc: Float64Array, phi: Float64Array, options: EwaldOptions): number {
  const weak = ewaldWeakFind(targets, acc, setup.params, options);
  if (!weak) return 0;
  const r = ewaldTargetsRun(ewaldSetupRefine(setup, { ...options, tol: weak.tol }, weak.rows.length), weak.rows);
  ewaldWeakReplace(weak, r, acc, phi);
  return weak.rows.length;
}

/**
 * Accelerations and potentials (finalized) for a few targets (input rows) of a setup, on this thread in
 * one go: the structure factor over all sources, then the targets' real-space and Fourier sums.
 */
export function ewaldTargetsRun(setup: EwaldSetup, targets: Int32Array): { acc: Float64Array; phi: Float64Array } {
  const weighted = ewaldWeighStructureFactor(setup, ewaldStructureFactor(setup));
  const acc = new Float64Array(3 * targets.length);
  const phi = new Float64Array(targets.length);
  ewaldTargetsChunk(setup, weighted, targets, 0, targets.length, acc, phi);
  ewaldFinalize(setup, targets, acc, phi);
  return { acc, phi };
}

/**
 * Number of real-space pair terms inside the loop radius (diagnostic for benchmarks): with
 * `symmetric`, each unordered pair (or particle–own-image pair) once, as the all-particle loop visits them.
 */
export function ewaldPairCount(setup: EwaldSetup, symmetric = true): number {
  const cells = setup.cells;
  const { xyzm, start, halfCount } = cells;
  const r = Math.max(setup.params.rCut, setup.params.rSoft);
  const r2max = r * r;
  const nq = symmetric ? halfCount : cells.stencil.length / 3;
  const shift = new Float64Array(3);
  let count = 0;
  for (let cell0 = 0; cell0 + 1 < start.length; cell0++) {
    const [cx, cy, cz] = cellListCoordinates(cells, cell0);
    for (let q = 0; q < nq; q++) {
      const cell = cellListNeighbour(cells, setup.box, cx, cy, cz, q, shift);
      for (let i = start[cell0]; i < start[cell0 + 1]; i++) {
        const px = xyzm[4 * i] - shift[0], py = xyzm[4 * i + 1] - shift[1], pz = xyzm[4 * i + 2] - shift[2];
        const jStart = q === 0 && symmetric ? i + 1 : start[cell];
        for (let j = jStart; j < start[cell + 1]; j++) {
          if (q === 0 && j === i) continue;
          const dx = px - xyzm[4 * j], dy = py - xyzm[4 * j + 1], dz = pz - xyzm[4 * j + 2];
          if (dx * dx + dy * dy + dz * dz < r2max) count++;
        }
      }
    }
  }
  return count;
}
