/**
 * Plain periodic image sums of Newton's law in a chosen summation order, with partial sums at every shell
 * (or every screening λ) and the limit each order is predicted to reach (predictedLimit.ts).
 *
 * Conventions (PHYSICS.md): a = −∇φ, φ = −Gm/r; positions wrapped into [0, L) (the count is reported);
 * images are added as whole cells — a cell's particles plus, with `background`, its uniform density −ρ̄.
 * Forces only: no potential is returned (the plain sums' potentials carry order-dependent constants).
 *
 * Computing is split for schedulers: imageSumSetup (validates, precomputes everything target-independent)
 * → imageSumTargetsChunk over ranges of targets (fills caller-owned partial sums) → imageSumFinalize (needs
 * the Ewald accelerations of the same targets, for the predicted limit). imageSumOrder runs them all on one
 * thread, with the Ewald reference from ewaldForces.
 */
import { targetsAll } from '../targets';
import { type Box, positionsWrap } from '../box';
import { EngineInputError, type Progress, ewaldForces } from '../ewald/ewald';
import { extrapolateToZero } from './extrapolation';
import { type ShellSetup, shellSetup, shellTargets } from './imageShells';
import {
  type ImageSumOptions,
  type ImageSumOrderName,
  type ImageSumResolved,
  imageSumCheckCost,
  imageSumOptionsResolve,
  imageSumRows,
  IMAGE_SUM_WORK_RATE,
} from './imageSumOptions';
import { nearestImageTargets } from './nearestImage';
import { boxDipole, orderDepolarisation, predictedLimit } from './predictedLimit';
import { type ScreenedSetup, screenedSetup, screenedTargets } from './screened';
import { type SlabSetup, slabSetup, slabTargets } from './slab';

type Kernel =
  | { readonly kind: 'shells'; readonly setup: ShellSetup }
  | { readonly kind: 'slab'; readonly setup: SlabSetup }
  | { readonly kind: 'screened'; readonly setup: ScreenedSetup }
  | { readonly kind: 'nearest' };

export interface ImageSumParams {
  readonly order: ImageSumOrderName;
  readonly background: boolean;
  readonly G: number;
  readonly tol: number;
  /** Largest shell (sphere, cube, slabs), else null. */
  readonly shells: number | null;
  /** Screening values λ (screened), else null. */
  readonly lambdas: Float64Array | null;
  /** Estimated work (pair-term equivalents) and the corresponding one-core seconds. */
  readonly work: number;
  readonly estimatedSeconds: number;
  /** Shells: radius (length) inside which cells are summed exactly, highest multipole order, cell counts. */
  readonly nearRadius?: number;
  readonly maxOrder?: number;
  readonly nearCells?: number;
  readonly farCells?: number;
  /** Slab and screened: Ewald-type splitting parameter (1/length) and real-space cutoff (length). */
  readonly alpha?: number;
  readonly rCut?: number;
}

export interface ImageSumSetup {
  readonly options: ImageSumResolved;
  readonly box: Box;
  /** Positions wrapped into the home cell (a copy), flat xyz; masses. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  /** How many particles lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  /** Rows of the partial-sum table and the shell radius (or λ) of each row. */
  readonly rows: number;
  readonly shell: Float64Array;
  readonly params: ImageSumParams;
  readonly kernel: Kernel;
}

export interface ImageSumResult {
  /** Targets (input rows) in output order. */
  readonly targets: Int32Array;
  /**
   * Accelerations, 3 per target (G·mass/length²): the partial sum of the largest shell (sphere, cube,
   * slabs), the minimum-image sum (nearest), or the λ → 0 extrapolation of the screened sums (polynomial in
   * λ² through all values).
   */
  readonly acc: Float64Array;
  /**
   * Partial sums for plotting the convergence: shell[s] is the shell radius R (cell units; slab layers) or
   * λ (screened; 1/length) or 0 (nearest); acc[(s·K + t)·3 + d] the acceleration of target t.
   */
  readonly partial: { readonly shell: Float64Array; readonly acc: Float64Array };
  /**
   * Cube order only (R ≥ 4): the R → ∞ estimate from the partial sums at R and ⌊R/2⌋, assuming an error
   * c/R² (the leading shell term of a cubic shell, degree-4 lattice sums ∝ R⁻³ per shell); else null.
   */
  readonly extrapolated: Float64Array | null;
  /** Ewald (tin-foil) accelerations of the same targets. */
  readonly ewald: Float64Array;
  /** Predicted limit of the order (Ewald + G N·D/V, or the homologous term without background); null for nearest. */
  readonly limit: Float64Array | null;
  /** Depolarisation tensor N of the order's shape (row-major 3×3; trace 4π; zero for screened); null for nearest. */
  readonly depolarisation: Float64Array | null;
  /** Mass dipole of the box D = Σ m_j (r_j − c), wrapped positions (mass·length). */
  readonly dipole: Float64Array;
  readonly params: ImageSumParams;
  readonly wrapped: number;
}

function validateData(positions: Float64Array, masses: Float64Array, box: Box): void {
  for (const [name, v] of [['Lx', box?.lx], ['Ly', box?.ly], ['Lz', box?.lz]] as const) {
    if (typeof v !== 'number' || !(v > 0) || !Number.isFinite(v)) throw new RangeError(`box side ${name} must be a positive finite number, got ${String(v)}`);
  }
  if (masses.length === 0) throw new EngineInputError('no particles: the image sums need at least one');
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

function findCoincident(positions: Float64Array): [number, number] | null {
  const n = positions.length / 3;
  const idx = Int32Array.from({ length: n }, (_, i) => i).sort(
    (a, b) => positions[3 * a] - positions[3 * b] || positions[3 * a + 1] - positions[3 * b + 1] || positions[3 * a + 2] - positions[3 * b + 2],
  );
  for (let s = 0; s + 1 < n; s++) {
    const a = idx[s], b = idx[s + 1];
    if (positions[3 * a] === positions[3 * b] && positions[3 * a + 1] === positions[3 * b + 1] && positions[3 * a + 2] === positions[3 * b + 2]) {
      return a < b ? [a, b] : [b, a];
    }
  }
  return null;
}

function validateTargets(targets: Int32Array, n: number): void {
  for (let t = 0; t < targets.length; t++) {
    const i = targets[t];
    if (!(i >= 0 && i < n)) throw new EngineInputError(`target ${t} is row ${i}, outside the ${n} particles`);
  }
}

/**
 * Prepares an image sum: validates options (errors name the option) and data, wraps positions (flat xyz,
 * length units) into the box, refuses runs above options.maxWork for `targetCount` targets (message says
 * roughly how long it would take), then precomputes everything target-independent.
 */
export function imageSumSetup(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: ImageSumOptions,
  targetCount: number = masses.length,
): ImageSumSetup {
  validateData(positions, masses, box);
  const o = imageSumOptionsResolve(options, box);
  const work = imageSumCheckCost(o, box, masses.length, targetCount);
  const wrappedPositions = Float64Array.from(positions);
  const wrapped = positionsWrap(wrappedPositions, box);
  const pair = findCoincident(wrappedPositions);
  if (pair) {
    throw new EngineInputError(`particles ${pair[0]} and ${pair[1]} sit at the same position; the unsoftened image sums are infinite there (remove one)`, pair[0], pair[1]);
  }
  const base = {
    order: o.order,
    background: o.background,
    G: o.G,
    tol: o.tol,
    shells: o.order === 'screened' || o.order === 'nearest' ? null : o.shells,
    lambdas: o.order === 'screened' ? o.lambdas : null,
    work,
    estimatedSeconds: work / IMAGE_SUM_WORK_RATE,
  };
  const rows = imageSumRows(o);
  const shell = o.order === 'screened' ? Float64Array.from(o.lambdas) : Float64Array.from({ length: rows }, (_, s) => s);
  let kernel: Kernel;
  let params: ImageSumParams;
  if (o.order === 'sphere' || o.order === 'cube') {
    const s = shellSetup(wrappedPositions, masses, box, o.order, o.shells, o.background, o.G, o.tol);
    kernel = { kind: 'shells', setup: s };
    params = { ...base, nearRadius: s.nearRadius, maxOrder: s.maxOrder, nearCells: s.nearCells, farCells: s.farCells };
  } else if (o.order === 'screened') {
    const s = screenedSetup(wrappedPositions, masses, box, o.lambdas, o.G, o.tol);
    kernel = { kind: 'screened', setup: s };
    params = { ...base, alpha: s.alpha, rCut: s.rCut };
  } else if (o.order === 'nearest') {
    kernel = { kind: 'nearest' };
    params = base;
  } else {
    const axis = o.order === 'slab-x' ? 0 : o.order === 'slab-y' ? 1 : 2;
    const s = slabSetup(wrappedPositions, masses, box, axis, o.shells, o.background, o.G, o.tol);
    kernel = { kind: 'slab', setup: s };
    params = { ...base, alpha: s.alpha, rCut: s.rCut };
  }
  return { options: o, box, positions: wrappedPositions, masses, wrapped, rows, shell, params, kernel };
}

/** Allocates the partial-sum table for K targets: rows × K × 3 numbers. */
export function imageSumPartialAlloc(setup: ImageSumSetup, targetCount: number): Float64Array {
  return new Float64Array(setup.rows * targetCount * 3);
}

/**
 * Fills the partial sums of targets[begin..end) (input rows) into `partial` (imageSumPartialAlloc for
 * targets.length): partial[(s·K + t)·3 + d], G·mass/length². Pure and synchronous; chunks are independent.
 */
export function imageSumTargetsChunk(setup: ImageSumSetup, targets: Int32Array, begin: number, end: number, partial: Float64Array): void {
  validateTargets(targets.subarray(begin, end), setup.masses.length);
  const k = setup.kernel;
  switch (k.kind) {
    case 'shells':
      shellTargets(k.setup, targets, begin, end, partial);
      return;
    case 'slab':
      slabTargets(k.setup, targets, begin, end, partial);
      return;
    case 'screened':
      screenedTargets(k.setup, targets, begin, end, partial);
      return;
    case 'nearest':
      nearestImageTargets(setup.positions, setup.masses, setup.box, setup.options.G, targets, begin, end, partial);
      return;
  }
}

/**
 * Assembles the result from the filled partial sums and the Ewald accelerations (3 per target, same G) of
 * the same targets: final accelerations, the predicted limit, the cube tail estimate, the dipole.
 */
export function imageSumFinalize(setup: ImageSumSetup, targets: Int32Array, partial: Float64Array, ewald: Float64Array): ImageSumResult {
  const o = setup.options;
  const K = targets.length;
  if (ewald.length !== 3 * K) throw new RangeError(`ewald must hold 3 numbers per target (${3 * K}), got ${ewald.length}`);
  if (partial.length !== setup.rows * 3 * K) throw new RangeError(`partial must hold ${setup.rows * 3 * K} numbers, got ${partial.length}`);
  const last = setup.rows - 1;
  const acc =
    o.order === 'screened'
      ? extrapolateToZero(Array.from(o.lambdas, (l) => l * l), partial, 3 * K)
      : partial.slice(last * 3 * K, (last + 1) * 3 * K);
  let extrapolated: Float64Array | null = null;
  if (o.order === 'cube' && o.shells >= 4) {
    const R = o.shells, h = Math.floor(R / 2);
    const rows = new Float64Array(6 * K);
    rows.set(partial.subarray(h * 3 * K, (h + 1) * 3 * K), 0);
    rows.set(partial.subarray(R * 3 * K, (R + 1) * 3 * K), 3 * K);
    extrapolated = extrapolateToZero([1 / (h * h), 1 / (R * R)], rows, 3 * K);
  }
  const depolarisation = o.order === 'nearest' ? null : orderDepolarisation(o.order, setup.box);
  const limit = depolarisation ? predictedLimit(ewald, targets, setup.positions, setup.masses, setup.box, depolarisation, o.background, o.G) : null;
  return {
    targets,
    acc,
    partial: { shell: setup.shell, acc: partial },
    extrapolated,
    ewald,
    limit,
    depolarisation,
    dipole: boxDipole(setup.positions, setup.masses, setup.box),
    params: setup.params,
    wrapped: setup.wrapped,
  };
}

/**
 * Image sum in the given order on one thread for `targets` (input rows; null = all), with the Ewald
 * reference (tol 1e-12) for the predicted limit. Positions flat xyz (length units), masses (mass units);
 * accelerations in G·mass/length². onProgress receives the fraction done.
 */
export function imageSumOrder(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: ImageSumOptions,
  onProgress?: Progress,
): ImageSumResult {
  const tg = targets ?? targetsAll(masses.length);
  const setup = imageSumSetup(positions, masses, box, options, tg.length);
  validateTargets(tg, masses.length);
  onProgress?.(0.1);
  const partial = imageSumPartialAlloc(setup, tg.length);
  const chunk = 8;
  for (let b = 0; b < tg.length; b += chunk) {
    const e = Math.min(tg.length, b + chunk);
    imageSumTargetsChunk(setup, tg, b, e, partial);
    onProgress?.(0.1 + (0.8 * e) / tg.length);
  }
  const ewald = tg.length > 0 ? ewaldForces(setup.positions, masses, box, tg, { G: setup.options.G, tol: 1e-12 }).acc : new Float64Array(0);
  onProgress?.(1);
  return imageSumFinalize(setup, tg, partial, ewald);
}
