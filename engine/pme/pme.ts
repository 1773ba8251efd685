/**
 * Particle-mesh Ewald for gravity in a periodic rectangular box, conventions of PHYSICS.md (mean density
 * removed, zero-mean potential, φ = −G[Σ_{j≠i} m_j ψ(r_i − r_j) + m_i ξ], a = −∇φ): the real-space part of
 * the Ewald split is summed over the cell list exactly as direct Ewald does (ewald/realSpace.ts, or its
 * WebAssembly twin); the Fourier part is solved on a mesh — B-spline assignment, real-to-complex FFT,
 * influence function, inverse FFT, interpolation with analytic differentiation (Essmann et al. 1995,
 * J. Chem. Phys. 103, 8577; with the optimal influence function by default, see influence.ts).
 *
 * Computing is split into synchronous pieces a scheduler can distribute (each names its work units):
 *   pmeSetup → pmeSpreadChunk (sorted particles; separate meshes per thread, summed, or disjoint planes)
 *   → pmeForwardChunk (column blocks) → pmeSolveChunk (slabs) → pmeInverseChunk (column blocks)
 *   → pmeInterpolateChunk (sorted particles) and pmeRealChunk (cells) → pmeFinalize.
 * pmeForces runs them all on one thread.
 */
import { float64s } from '../util/arrays';
import { type Box, boxVolume, positionsWrap } from '../box';
import { type CellList, cellListBuild } from '../ewald/cellList';
import { EngineInputError, type Progress, particlesValidate } from '../ewald/ewald';
import { kernelTableBuild } from '../ewald/kernelTable';
import { type RealSpaceKernel, realSpaceAllSorted } from '../ewald/realSpace';
import { type RealSpaceWasm, realSpaceWasmCreate } from '../wasm/realSpaceWasm';
import { type CoherentDensity, type DensityStats, densityCellOf, densityFindCoincident, densityStats } from './density';
import { errorModelFactor, errorModelFieldSample, errorModelLevels, errorModelSamples } from './errorModel';
import {
  type FftScratch,
  type MeshFft,
  meshColumnBlocks,
  meshFftCreate,
  meshFftLength,
  meshFftScratch,
  meshForwardColumns,
  meshInverseColumns,
  meshSlabCount,
  meshSlabsSolve,
} from './fft3d';
import { type InfluenceTables, influenceApplySlab, influenceTables } from './influence';
import { type PmeOptions, type PmeParams, meshSpacing, pmeOptionsResolve, pmeParamsChoose } from './pmeParams';
import { type SelfForceTables, selfForceRemove, selfForceTables } from './selfForce';
import { type MeshGeometry, meshInterpolate, meshSpread } from './spread';

export interface PmeSetup {
  readonly box: Box;
  /** Positions wrapped into the home cell (a copy), flat xyz. */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  /** How many input particles lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  readonly params: PmeParams;
  readonly cells: CellList;
  readonly kernel: RealSpaceKernel;
  readonly geometry: MeshGeometry;
  readonly fft: MeshFft;
  readonly influence: InfluenceTables;
  /** Tabulated mesh self-field, removed from every particle's mesh acceleration (selfForce.ts). */
  readonly selfForce: SelfForceTables;
  /** Clustering statistics and the coherent local ρ₂ map of the error prediction (absent in pinned setups). */
  readonly errors: { readonly density: DensityStats; readonly map: CoherentDensity } | null;
  readonly totalMass: number;
  /** WebAssembly context of the real-space kernels (created on first use; null where unavailable). */
  rWasm?: RealSpaceWasm | null;
  /** JavaScript-path accumulators of the real-space sums (sorted order). */
  allSorted?: { acc: Float64Array; phi: Float64Array };
}

/** The parameter choice of a run (pmeChoose), before its tables and cell list are built (pmeSetupBuild). */
export interface PmeChoice {
  /** Positions wrapped into the home cell (in shared memory with options.sharedMemory), and how many moved. */
  readonly wrappedPositions: Float64Array;
  readonly wrapped: number;
  readonly params: PmeParams;
  readonly errors: NonNullable<PmeSetup['errors']>;
  readonly shared: boolean;
}

/**
 * Prepares a run: wraps positions (length units) into the box, measures clustering, chooses α, r_c, mesh
 * and order for the requested tolerance, builds the cell list, kernel table, FFT plans and influence
 * tables. Masses may be signed. Same as pmeSetupBuild(pmeChoose(…)).
 */
export function pmeSetup(positions: Float64Array, masses: Float64Array, box: Box, options: PmeOptions = {}): PmeSetup {
  return pmeSetupBuild(pmeChoose(positions, masses, box, options), masses, box);
}

/** The tables and cell list of a chosen run (the second half of pmeSetup). */
export function pmeSetupBuild(choice: PmeChoice, masses: Float64Array, box: Box): PmeSetup {
  return setupFromParams(choice.wrappedPositions, masses, box, choice.params, choice.wrapped, choice.errors, null, choice.shared);
}

/** Mesh buffer length (numbers) of a parameter set: (n0 + 2)·n1·n2, as pmeMeshLength of its setup. */
export function pmeMeshLengthOf(params: PmeParams): number {
  const [n0, n1, n2] = params.mesh;
  return (n0 + 2) * n1 * n2;
}

/**
 * The first half of pmeSetup: validation, wrapping, density statistics, the error model and the
 * parameter choice (α, r_c, mesh, order) for the requested tolerance.
 */
export function pmeChoose(positions: Float64Array, masses: Float64Array, box: Box, options: PmeOptions = {}): PmeChoice {
  particlesValidate(positions, masses);
  const shared = options.sharedMemory === true;
  const wrappedPositions = float64s(positions.length, shared);
  wrappedPositions.set(positions);
  const wrapped = positionsWrap(wrappedPositions, box);
  const opts = pmeOptionsResolve(options);
  const density = densityStats(wrappedPositions, masses, box);
  if (opts.softening.kind === 'none') {
    const pair = densityFindCoincident(density, wrappedPositions);
    if (pair) {
      throw new EngineInputError(
        `particles ${pair[0]} and ${pair[1]} sit at the same position; without softening their force is infinite (use softening or remove one)`,
        pair[0],
        pair[1],
      );
    }
  }
  // The error factor depends on the mesh spacing and cutoff it is measured for: start from typical values
  // (h ≈ 0.7, r_c ≈ 3 mean spacings) and re-choose until the factor settles (at most three rounds). The
  // factor that chooses is the larger of those for neighbourhoods of r_c and 2r_c (one density level
  // coarser): on clustered data it jumps between levels, and a choice must not rest on the low side
  // of a jump (our rule; the map for the predictions after the run stays that of r_c).
  const samples = errorModelSamples(density, masses, errorModelFieldSample(wrappedPositions, masses, box, opts.G), opts.G);
  const spacing = Math.cbrt(boxVolume(box) / Math.max(1, masses.length));
  const cache = new Map<string, ReturnType<typeof errorModelFactor>>();
  const factorOf = (h: number, rCut: number) => {
    const levels = errorModelLevels(box, h, rCut);
    const key = `${levels.coarse},${levels.fine}`; // the factor depends on h and r_c through these only
    let m = cache.get(key);
    if (!m) cache.set(key, (m = errorModelFactor(density, masses, samples, opts.G, h, rCut)));
    return m;
  };
  const factorAt = (h: number, rCut: number) => {
    const m = factorOf(h, rCut);
    return { map: m.map, factor: Math.max(m.factor, factorOf(h, 2 * rCut).factor) };
  };
  let model = factorAt(0.7 * spacing, 3 * spacing);
  let params = pmeParamsChoose(masses, box, density, opts, model.factor);
  for (let round = 0; ; round++) {
    const next = factorAt(meshSpacing(box, params.mesh), params.rCut);
    const settled = Math.abs(Math.log(Math.max(1e-300, next.factor) / Math.max(1e-300, model.factor))) < 0.05;
    model = next; // now describes `params`
    if (settled || round === 2) break;
    params = pmeParamsChoose(masses, box, density, opts, model.factor);
  }
  return { wrappedPositions, wrapped, params, errors: { density, map: model.map }, shared };
}

/** Pieces of another setup with the same parameters that a pinned setup may reuse instead of rebuilding. */
export interface PmeSetupShared {
  readonly cells: CellList;
  readonly influence: InfluenceTables;
  readonly selfForce: SelfForceTables;
}

function setupFromParams(
  wrappedPositions: Float64Array,
  masses: Float64Array,
  box: Box,
  params: PmeParams,
  wrapped: number,
  errors: PmeSetup['errors'],
  reuse: PmeSetupShared | null = null,
  shared = false,
): PmeSetup {
  const cells = reuse?.cells ?? cellListBuild(wrappedPositions, masses, box, params.cells, Math.max(params.rCut, params.rSoft), shared);
  const table = kernelTableBuild(params.alpha * params.alpha * params.rCut * params.rCut);
  const n = params.mesh;
  const influence = reuse?.influence ?? influenceTables(n, box, params.alpha, params.order, params.influence);
  let totalMass = 0;
  for (let i = 0; i < masses.length; i++) totalMass += masses[i];
  return {
    box,
    positions: wrappedPositions,
    masses,
    wrapped,
    params,
    cells,
    kernel: { alpha: params.alpha, rCut: params.rCut, rSoft: params.rSoft, softening: params.softening, table },
    geometry: { n, inv: [n[0] / box.lx, n[1] / box.ly, n[2] / box.lz], p: params.order },
    fft: meshFftCreate(n),
    influence,
    selfForce: reuse?.selfForce ?? selfForceTables(n, box, params.order, influence),
    errors,
    totalMass,
  };
}

/**
 * A setup with parameters chosen elsewhere (another thread's pmeSetup): positions must be that setup's
 * wrapped positions, so the cell list — and with it the sorted order of every chunk's sums — is the same.
 * Builds the cell list, kernel table, FFT plans, influence and self-force tables — or takes the cell list
 * and tables from `reuse` (that setup's own, e.g. copied into shared memory); no error model
 * (pmePredictedErrors needs the original setup).
 */
export function pmeSetupPinned(wrappedPositions: Float64Array, masses: Float64Array, box: Box, params: PmeParams, reuse: PmeSetupShared | null = null): PmeSetup {
  particlesValidate(wrappedPositions, masses);
  if (reuse && reuse.cells.order.length !== masses.length) throw new RangeError(`pmeSetupPinned: the shared cell list holds ${reuse.cells.order.length} particles, not ${masses.length}`);
  return setupFromParams(wrappedPositions, masses, box, params, 0, null, reuse);
}

/** Numbers in a mesh buffer: (n0 + 2)·n1·n2 (the real mesh, then room for the half spectrum). */
export function pmeMeshLength(setup: PmeSetup): number {
  return meshFftLength(setup.fft);
}

/** A zeroed mesh buffer for this setup (a scheduler may instead wrap a SharedArrayBuffer of the same length). */
export function pmeMeshAlloc(setup: PmeSetup): Float64Array {
  return new Float64Array(meshFftLength(setup.fft));
}

/**
 * Splits the sorted particles into `blocks` (even) ranges of whole cell-list x-slabs such that blocks of
 * the same parity write to disjoint mesh planes (every block spans at least p + 1 planes), so all even
 * blocks, then all odd blocks, can be assigned concurrently into one shared mesh. Boundaries balance
 * particle counts. Returns blocks + 1 sorted-particle offsets, or null when the mesh is too thin for it.
 */
export function pmeSpreadBlocks(setup: PmeSetup, blocks: number): Int32Array | null {
  if (!(Number.isInteger(blocks) && blocks >= 2 && blocks % 2 === 0)) throw new RangeError(`spread blocks must be an even integer ≥ 2, got ${blocks}`);
  const [ncx, ncy, ncz] = setup.cells.n;
  const perSlab = setup.params.mesh[0] / ncx; // mesh planes per cell-list x-slab
  const minSlabs = Math.ceil((setup.params.order + 1) / perSlab);
  if (ncx < blocks * minSlabs) return null;
  const start = setup.cells.start;
  const slabCount = (x: number) => start[(x + 1) * ncy * ncz] - start[x * ncy * ncz];
  const n = setup.masses.length;
  const cuts = new Int32Array(blocks + 1);
  let x = 0;
  for (let b = 0; b < blocks - 1; b++) {
    const target = ((b + 1) * n) / blocks;
    const first = x;
    let end = start[x * ncy * ncz];
    // at least minSlabs, then until the running count reaches the target, leaving room for the rest
    while (x < ncx && (x - first < minSlabs || (end < target && ncx - (x + 1) >= (blocks - b - 1) * minSlabs))) {
      end += slabCount(x);
      x++;
    }
    cuts[b + 1] = start[x * ncy * ncz];
  }
  cuts[blocks] = n;
  return cuts;
}

/** Scratch for the FFT pieces (one per thread). */
export function pmeScratch(setup: PmeSetup): FftScratch {
  return meshFftScratch(setup.fft);
}

/** Work units: sorted particles N, FFT column blocks, spectrum slabs, real-space cells. */
export function pmeWorkUnits(setup: PmeSetup): { particles: number; columnBlocks: number; slabs: number; cells: number } {
  return {
    particles: setup.masses.length,
    columnBlocks: meshColumnBlocks(setup.fft),
    slabs: meshSlabCount(setup.fft),
    cells: setup.cells.start.length - 1,
  };
}

/** Assigns the masses of sorted particles [begin, end) to the real mesh (adds). */
export function pmeSpreadChunk(setup: PmeSetup, mesh: Float64Array, begin: number, end: number): void {
  meshSpread(setup.geometry, setup.cells.xyzm, begin, end, mesh);
}

/** FFT pass A (real → half spectrum along axis 0) for column blocks [begin, end). */
export function pmeForwardChunk(setup: PmeSetup, mesh: Float64Array, begin: number, end: number, scratch: FftScratch): void {
  meshForwardColumns(setup.fft, mesh, begin, end, scratch);
}

/** FFT pass B with the influence function for slabs [begin, end): forward y, z, ×Ĝ/V, inverse z, y. */
export function pmeSolveChunk(setup: PmeSetup, mesh: Float64Array, begin: number, end: number, scratch: FftScratch): void {
  const { fft, influence } = setup;
  meshSlabsSolve(fft, mesh, begin, end, scratch, (k0, s) => influenceApplySlab(fft, influence, k0, s));
}

/** FFT pass C (half spectrum → real potential mesh) for column blocks [begin, end). */
export function pmeInverseChunk(setup: PmeSetup, mesh: Float64Array, begin: number, end: number, scratch: FftScratch): void {
  meshInverseColumns(setup.fft, mesh, begin, end, scratch);
}

/**
 * Interpolates the potential mesh for sorted particles [begin, end): adds the raw Fourier potential to
 * phiSorted and its gradient, less the particle's own mesh self-field, to accSorted (raw sums: finish
 * with pmeFinalize). Read-only on the mesh.
 */
export function pmeInterpolateChunk(setup: PmeSetup, mesh: Float64Array, begin: number, end: number, accSorted: Float64Array, phiSorted: Float64Array): void {
  meshInterpolate(setup.geometry, setup.cells.xyzm, begin, end, mesh, accSorted, phiSorted);
  selfForceRemove(setup.selfForce, setup.geometry, setup.cells.xyzm, begin, end, accSorted);
}

function realWasm(setup: PmeSetup): RealSpaceWasm | null {
  if (setup.rWasm === undefined) setup.rWasm = realSpaceWasmCreate(setup.cells, setup.box, setup.kernel);
  return setup.rWasm;
}

/** Symmetric real-space sums over cells [cellBegin, cellEnd), kept inside the setup until collected. */
export function pmeRealChunk(setup: PmeSetup, cellBegin: number, cellEnd: number): void {
  const w = realWasm(setup);
  if (w) {
    w.allChunk(cellBegin, cellEnd);
    return;
  }
  const n = setup.masses.length;
  setup.allSorted ??= { acc: new Float64Array(3 * n), phi: new Float64Array(n) };
  realSpaceAllSorted(setup.cells, setup.box, setup.kernel, cellBegin, cellEnd, setup.allSorted.acc, setup.allSorted.phi);
}

/** Adds the kept real-space sums into accSorted (3N) and phiSorted (N), sorted order, and clears them. */
export function pmeRealCollect(setup: PmeSetup, accSorted: Float64Array, phiSorted: Float64Array): void {
  const w = realWasm(setup);
  if (w) {
    w.allCollect(accSorted, phiSorted);
    return;
  }
  if (!setup.allSorted) return;
  const { acc, phi } = setup.allSorted;
  for (let i = 0; i < acc.length; i++) accSorted[i] += acc[i];
  for (let i = 0; i < phi.length; i++) phiSorted[i] += phi[i];
  setup.allSorted = undefined;
}

/**
 * Physical results in input order from the raw sorted sums: acc = G·acc_raw (G·mass/length²);
 * φ = −G(φ_raw − m_i·2α/√π − πM/(α²V)) (self term and neutralising-background constant, as ewaldFinalize).
 */
export function pmeFinalize(setup: PmeSetup, accSorted: Float64Array, phiSorted: Float64Array): { acc: Float64Array; phi: Float64Array } {
  const { G, alpha } = setup.params;
  const n = setup.masses.length;
  const acc = new Float64Array(3 * n);
  const phi = new Float64Array(n);
  const background = (Math.PI * setup.totalMass) / (alpha * alpha * boxVolume(setup.box));
  const selfCoef = (2 * alpha) / Math.sqrt(Math.PI);
  const order = setup.cells.order;
  for (let s = 0; s < n; s++) {
    const i = order[s];
    acc[3 * i] = G * accSorted[3 * s];
    acc[3 * i + 1] = G * accSorted[3 * s + 1];
    acc[3 * i + 2] = G * accSorted[3 * s + 2];
    phi[i] = -G * (phiSorted[s] - setup.masses[i] * selfCoef - background);
  }
  return { acc, phi };
}

/**
 * Predicted acceleration errors after the run (acceleration units, per input particle):
 * G·√(ρ₂(i)·ΣQ) with the coherent local ρ₂(i) (density.ts), and the rms over particles of that error
 * divided by |a_i| (particles with a_i = 0 are left out) — the a-posteriori form of the a-priori estimate.
 */
export function pmePredictedErrors(setup: PmeSetup, acc: Float64Array, rows: ArrayLike<number> | null = null): { perParticle: Float64Array; rmsRelative: number } {
  const p = setup.params;
  if (!setup.errors) throw new Error('pmePredictedErrors: this setup has no error model (pinned setups leave it to the setup that chose the parameters)');
  const { density, map } = setup.errors;
  const qTotal = p.meshFunctional + p.realFunctional + p.softeningFunctional;
  const count = rows ? rows.length : setup.masses.length;
  const perParticle = new Float64Array(count);
  let sum = 0, used = 0;
  for (let t = 0; t < count; t++) {
    const i = rows ? rows[t] : t;
    const e = p.G * Math.sqrt(map.rho2[densityCellOf(density, map, i)] * qTotal);
    perParticle[t] = e;
    const a = Math.hypot(acc[3 * i], acc[3 * i + 1], acc[3 * i + 2]);
    if (a > 0) {
      sum += (e / a) ** 2;
      used++;
    }
  }
  return { perParticle, rmsRelative: used > 0 ? Math.sqrt(sum / used) : 0 };
}

export interface PmeResult {
  /** Accelerations, 3 per particle, input order (G·mass/length²). */
  readonly acc: Float64Array;
  /** Potentials per particle (G·mass/length), zero-mean convention. */
  readonly phi: Float64Array;
  readonly params: PmeParams;
  /** Particles that lay outside the home cell and were wrapped. */
  readonly wrapped: number;
  /** A-posteriori predicted rms relative acceleration error (see pmePredictedErrors). */
  readonly predictedRmsRelativeError: number;
}

/**
 * All-particle accelerations and potentials by particle-mesh Ewald on one thread. Positions: flat xyz in
 * length units; masses in mass units; results in units with the given G.
 */
export function pmeForces(positions: Float64Array, masses: Float64Array, box: Box, options: PmeOptions = {}, onProgress?: Progress): PmeResult {
  const setup = pmeSetup(positions, masses, box, options);
  const n = masses.length;
  const units = pmeWorkUnits(setup);
  const mesh = pmeMeshAlloc(setup);
  const scratch = pmeScratch(setup);
  pmeSpreadChunk(setup, mesh, 0, n);
  onProgress?.(0.1);
  pmeForwardChunk(setup, mesh, 0, units.columnBlocks, scratch);
  pmeSolveChunk(setup, mesh, 0, units.slabs, scratch);
  pmeInverseChunk(setup, mesh, 0, units.columnBlocks, scratch);
  onProgress?.(0.25);
  const accSorted = new Float64Array(3 * n);
  const phiSorted = new Float64Array(n);
  pmeInterpolateChunk(setup, mesh, 0, n, accSorted, phiSorted);
  onProgress?.(0.4);
  const nc = units.cells;
  const step = Math.max(1, Math.ceil(nc / 16));
  for (let c = 0; c < nc; c += step) {
    pmeRealChunk(setup, c, Math.min(nc, c + step));
    onProgress?.(0.4 + (0.6 * Math.min(nc, c + step)) / nc);
  }
  pmeRealCollect(setup, accSorted, phiSorted);
  const { acc, phi } = pmeFinalize(setup, accSorted, phiSorted);
  const predicted = pmePredictedErrors(setup, acc);
  return { acc, phi, params: setup.params, wrapped: setup.wrapped, predictedRmsRelativeError: predicted.rmsRelative };
}
