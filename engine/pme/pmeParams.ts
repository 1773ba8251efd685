/**
 * Particle-mesh Ewald parameters (α, real-space cutoff r_c, mesh, B-spline order p) from a requested
 * rms relative acceleration error. Predicted mean square relative error (meshError.ts, errorModel.ts):
 *   ε² = Z·(Q_mesh + Q_real + Q_soft),
 *   Q_mesh: the Deserno–Holm error functional of our mesh scheme (meshError.ts),
 *   Q_real = 4e^{−2α²r_c²}/r_c (Kolafa & Perram 1992, Mol. Simul. 9, 351; see ewald/params.ts),
 *   Q_soft: the Plummer correction left out between its radius and the half box (0 otherwise),
 *   Z: mean over sampled particles of G²ρ₂/|a|² (errorModel.ts: coherent local ρ₂, modelled |a|; for
 *   uniform equal masses ⟨β⁻²⟩/(2.6031² n^{1/3})).
 * The choice minimises a measured cost model (real-space cell visits, candidates and pairs; assignment
 * and interpolation per particle·p³; FFT per mesh point·log₂; first touch of fresh memory) under
 * ε ≤ tol/SAFETY; any of α, r_c, mesh, order can be fixed.
 */
import { type Box, boxSides, boxVolume } from '../box';
import { cellStencil } from '../ewald/cellList';
import { type Softening, NO_SOFTENING, softeningSupport, softeningValidate } from '../softening';
import { BSPLINE_ORDER_MAX, BSPLINE_ORDER_MIN } from './bspline';
import { type DensityStats, densityPairEstimate } from './density';
import { fftSizeNext, fftSizeOk } from './fftRows';
import { type InfluenceKind } from './influence';
import { meshErrorFunctional, plummerErrorFunctional, realErrorFunctional } from './meshError';

export interface PmeOptions {
  /** Gravitational constant (default 1). */
  readonly G?: number;
  /** Requested rms relative acceleration error over the particles, in (0, 1) (default 1e-4). */
  readonly tol?: number;
  /** Override: splitting parameter α (1/length). */
  readonly alpha?: number;
  /** Override: real-space cutoff (length). */
  readonly rCut?: number;
  /** Override: mesh points per side (one number: the same for every side). Side 0 must be even. */
  readonly mesh?: number | readonly [number, number, number];
  /** Override: B-spline order, 2 … 12 (the automatic choice tries 4 … 8). */
  readonly order?: number;
  /** Influence function (default 'optimal'). */
  readonly influence?: InfluenceKind;
  /** Softening kernel (default none). */
  readonly softening?: Softening;
  /** Largest mesh (points) the automatic choice may use (default 2^26: 0.5 GB of mesh; the CLI allows 10^8). */
  readonly maxMeshPoints?: number;
  /**
   * Keep the wrapped positions and the cell list in SharedArrayBuffers (default false), so that a threaded
   * run posts them to its workers without copying (fresh memory costs ~3 ms per MB to touch here).
   */
  readonly sharedMemory?: boolean;
}

export interface PmeParams {
  readonly G: number;
  readonly tol: number;
  readonly alpha: number;
  readonly rCut: number;
  readonly mesh: [number, number, number];
  readonly order: number;
  readonly influence: InfluenceKind;
  readonly softening: Softening;
  /** Radius inside which the softened kernel is applied (spline: h; Plummer: chosen from tol; none: 0). */
  readonly rSoft: number;
  /** Cell-list cells per side and stencil size of the real-space part. */
  readonly cells: [number, number, number];
  readonly stencilCells: number;
  /** Error functionals (1/length): ΔA² = G²ρ₂·Q for local Σm²/volume ρ₂. */
  readonly meshFunctional: number;
  readonly realFunctional: number;
  readonly softeningFunctional: number;
  /** Predicted rms acceleration errors at the mean ρ₂ = Σm²/V (acceleration units): mesh, real, total. */
  readonly meshError: number;
  readonly realError: number;
  readonly predictedRmsError: number;
  /** Local-density factor Z (length) and the a-priori rms relative error √(Z·ΣQ). */
  readonly errorFactor: number;
  readonly predictedRelativeError: number;
  /** Model cost (seconds, one thread) and estimated real-space pairs. */
  readonly modelSeconds: number;
  readonly pairEstimate: number;
}

// Cost model (ns, one thread; CPU time measured on the project machine with scripts/bench/pmeBench.ts
// and the phase timings there). Real space, symmetric WebAssembly loop over the cell list with
// per-particle pruning of neighbour cells: per visit of a particle to a half-stencil cell, per cell, and
// per pair inside the cutoff times (1 + w/2r)³ (the candidates left after pruning: the sphere dilated by
// about half a cell; w the largest cell side). Least-squares fit to the real-space CPU time of uniform
// and clumped snapshots (N = 2^15 … 2^18, 1 … 3 cells per cutoff; 10^6 clumped checked: 2 cells per
// cutoff 13.1 s against 17.6 s for 1).
const COST_VISIT = 32;
const COST_CANDIDATE_PAIR = 7;
const COST_CELL = 145;
const COST_SPREAD = 4.0; // per particle · p³ (assignment)
const COST_INTERP = 5.0; // per particle · p³ (interpolation with gradient)
const COST_MESH_PARTICLE = 150; // per particle: B-spline weights and indices, both passes
const COST_FFT = 2.5; // per mesh point · log₂(points), forward + inverse
const COST_MESH_POINT = 30; // per mesh point: first touch of fresh memory, zeroing
const COST_PARTICLE = 400; // per particle: wrap, statistics, cell list, sort, unsort, fresh arrays
// ε_predicted ≤ tol / SAFETY (margin for the sampling noise of an rms over heavy-tailed 1/|a|²).
const SAFETY = 1.5;
const ORDERS_AUTO = [4, 5, 6, 7, 8];
const FINAL_SAMPLES = 16;
/** θ samples per half axis of the mesh functional inside the α refinement (the final value uses FINAL_SAMPLES). */
const SEARCH_SAMPLES = 8;
// Table of the mesh functional for cubic cells of unit side, Q₁(x) at x = αh on a log grid; a mesh of
// spacing h has Q = Q₁(αh)/h (dimensional scaling). Rectangular cells use the largest side (an upper
// bound, since refining any axis lowers the error); the chosen mesh is then evaluated exactly.
const TABLE_X0 = 0.05;
const TABLE_STEPS_PER_OCTAVE = 8;
const TABLE_SIZE = 56; // up to x ≈ 6.4
const TABLE_SAMPLES = 6;
const tables = new Map<string, Float64Array>();

/** ln Q₁ at table entry k (computed on first use; the search rarely needs the coarse-mesh end). */
function meshTableEntry(p: number, kind: InfluenceKind, k: number): number {
  const key = `${kind}:${p}`;
  let t = tables.get(key);
  if (!t) {
    t = new Float64Array(TABLE_SIZE).fill(NaN);
    tables.set(key, t);
  }
  if (Number.isNaN(t[k])) {
    const big = 1 << 20; // midpoint sampling in θ: the continuum limit of the Brillouin-zone sum
    const x = TABLE_X0 * Math.pow(2, k / TABLE_STEPS_PER_OCTAVE);
    t[k] = Math.log(Math.max(1e-300, meshErrorFunctional([big, big, big], { lx: big, ly: big, lz: big }, x, p, kind, TABLE_SAMPLES)));
  }
  return t[k];
}

/** Q_mesh estimate from the table (log-linear interpolation in x = αh, h the largest mesh spacing). */
function meshFunctionalEstimate(p: number, kind: InfluenceKind, alpha: number, h: number): number {
  const pos = Math.log2((alpha * h) / TABLE_X0) * TABLE_STEPS_PER_OCTAVE;
  if (pos <= 0) return Math.exp(meshTableEntry(p, kind, 0)) / h;
  if (pos >= TABLE_SIZE - 1) return Infinity;
  const k = Math.floor(pos);
  const f = pos - k;
  return Math.exp(meshTableEntry(p, kind, k) * (1 - f) + meshTableEntry(p, kind, k + 1) * f) / h;
}

/** Solves 4e^{−2α²r²}/r = q for r (the real-space functional is decreasing in r). */
export function realCutoffFor(alpha: number, q: number): number {
  // f(x) = ln4 + ln α − 2x² − ln x − ln q with x = αr
  const f = (x: number) => Math.log(4 * alpha) - 2 * x * x - Math.log(x) - Math.log(q);
  let lo = 1e-3, hi = 1;
  if (f(lo) <= 0) return lo / alpha;
  while (f(hi) > 0) hi *= 2;
  for (let it = 0; it < 80; it++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return hi / alpha;
}

function meshFromOption(mesh: number | readonly [number, number, number]): [number, number, number] {
  const m = typeof mesh === 'number' ? [mesh, mesh, mesh] : [...mesh];
  if (m.length !== 3) throw new RangeError(`mesh must be one number or three, got ${m.length}`);
  m.forEach((v, d) => {
    if (!fftSizeOk(v)) throw new RangeError(`mesh side ${d} must be a positive integer with prime factors 2, 3, 5 only, got ${v}`);
  });
  if (m[0] % 2 !== 0) throw new RangeError(`mesh side 0 must be even, got ${m[0]}`);
  return m as [number, number, number];
}

function meshCost(n: number, p: number, mesh: [number, number, number]): number {
  const pts = mesh[0] * mesh[1] * mesh[2];
  return n * (p * p * p * (COST_SPREAD + COST_INTERP) + COST_MESH_PARTICLE) + pts * (COST_FFT * Math.log2(Math.max(2, pts)) + COST_MESH_POINT);
}

/**
 * Real-space cost (ns) and cell grid for loop radius r: 1 … 4 cells per radius per side, each priced by
 * visits N·H, candidates H·Σ_c n_c² and pairs inside r (H = half-stencil cells; Σn_c² from the density
 * statistics, so clustered data get finer cells).
 */
const stencilSizes = new Map<string, number>();

/** Stencil cells for cell widths w and radius r (cached: the search asks for the same shapes often). */
function stencilSize(w: [number, number, number], r: number): number {
  // The size depends on the ratios r/w_d only; rounded to 1/8 for the cost model.
  const ratios = w.map((v) => Math.max(8, Math.round((8 * r) / v)));
  const key = ratios.join(',');
  let size = stencilSizes.get(key);
  if (size === undefined) {
    size = cellStencil(ratios.map((q) => 8 / q) as [number, number, number], 1).offsets.length / 3;
    if (stencilSizes.size > 4096) stencilSizes.clear();
    stencilSizes.set(key, size);
  }
  return size;
}

export function realSpaceCost(stats: DensityStats, r: number): { cost: number; cells: [number, number, number]; stencil: number } {
  const box = stats.box;
  const sides = boxSides(box);
  const pairs = densityPairEstimate(stats, r);
  let best: { cost: number; cells: [number, number, number]; stencil: number } | null = null;
  for (let perCut = 1; perCut <= 4; perCut++) {
    const cells = sides.map((l) => Math.max(1, Math.min(1024, Math.floor((l * perCut) / r)))) as [number, number, number];
    const nCells = cells[0] * cells[1] * cells[2];
    if (nCells > Math.max(64, 8 * stats.n) && perCut > 1) continue;
    const w = sides.map((l, d) => l / cells[d]) as [number, number, number];
    const stencil = stencilSize(w, r);
    const half = (stencil + 1) / 2;
    const dilation = (1 + Math.max(...w) / (2 * r)) ** 3;
    const cost = stats.n * half * COST_VISIT + pairs * dilation * COST_CANDIDATE_PAIR + nCells * COST_CELL;
    if (!best || cost < best.cost) best = { cost, cells, stencil };
  }
  return best!;
}

/**
 * The α between the grid values next to `alpha` (a factor 2^{±1/8}) with the smallest real-space cutoff
 * for this mesh: r_c(α) solved against the rest of the budget after the mesh functional (evaluated, not
 * tabulated), which falls with α while the mesh error is small and rises steeply once it takes most of
 * the budget; golden-section search (the cost only grows with r_c on a fixed mesh).
 */
function alphaRefine(mesh: [number, number, number], box: Box, alpha: number, p: number, kind: InfluenceKind, budget: number): number {
  const cut = (a: number) => {
    const q = meshErrorFunctional(mesh, box, a, p, kind, SEARCH_SAMPLES);
    return q < 0.98 * budget ? realCutoffFor(a, budget - q) : Infinity;
  };
  const step = Math.pow(2, 1 / TABLE_STEPS_PER_OCTAVE);
  const g = (Math.sqrt(5) - 1) / 2;
  let lo = alpha / step, hi = alpha * step;
  let x1 = hi - g * (hi - lo), x2 = lo + g * (hi - lo);
  let f1 = cut(x1), f2 = cut(x2);
  for (let it = 0; it < 10; it++) { // bracket 0.618^10 ≈ 1/120 of 2^{1/4}: α to 0.2 %
    if (f1 <= f2) {
      hi = x2; x2 = x1; f2 = f1;
      x1 = hi - g * (hi - lo); f1 = cut(x1);
    } else {
      lo = x1; x1 = x2; f1 = f2;
      x2 = lo + g * (hi - lo); f2 = cut(x2);
    }
  }
  const best = f1 <= f2 ? x1 : x2;
  return Math.min(f1, f2) <= cut(alpha) ? best : alpha;
}

/** Default largest automatic mesh (points). */
export const PME_MAX_MESH_DEFAULT = 2 ** 26;

interface Candidate {
  alpha: number;
  rCut: number;
  mesh: [number, number, number];
  order: number;
  qMesh: number;
  cost: number;
  eps2: number;
}

/** Options checked and completed with their defaults. */
export interface PmeResolvedOptions {
  readonly G: number;
  readonly tol: number;
  readonly influence: InfluenceKind;
  readonly order?: number;
  readonly alpha?: number;
  readonly rCut?: number;
  readonly maxMesh: number;
  readonly fixedMesh: [number, number, number] | null;
  readonly softening: Softening;
}

/** Validates the options (RangeError naming the option and the value) and fills in defaults. */
export function pmeOptionsResolve(options: PmeOptions = {}): PmeResolvedOptions {
  const G = options.G ?? 1;
  const tol = options.tol ?? 1e-4;
  const influence = options.influence ?? 'optimal';
  if (!(G > 0) || !Number.isFinite(G)) throw new RangeError(`G must be a positive finite number, got ${G}`);
  if (!(tol > 0 && tol < 1)) throw new RangeError(`tolerance must lie in (0, 1), got ${tol}`);
  for (const [name, v] of [['alpha', options.alpha], ['rCut', options.rCut]] as const) {
    if (v !== undefined && !(v > 0 && Number.isFinite(v))) throw new RangeError(`${name} must be a positive finite number, got ${v}`);
  }
  if (influence !== 'optimal' && influence !== 'spme') throw new RangeError(`influence must be 'optimal' or 'spme', got ${String(influence)}`);
  const order = options.order;
  if (order !== undefined && !(Number.isInteger(order) && order >= BSPLINE_ORDER_MIN && order <= BSPLINE_ORDER_MAX)) {
    throw new RangeError(`order must be an integer from ${BSPLINE_ORDER_MIN} to ${BSPLINE_ORDER_MAX}, got ${order}`);
  }
  const maxMesh = options.maxMeshPoints ?? PME_MAX_MESH_DEFAULT;
  if (!(maxMesh >= 8) || !Number.isFinite(maxMesh)) throw new RangeError(`maxMeshPoints must be a finite number ≥ 8, got ${maxMesh}`);
  const fixedMesh = options.mesh !== undefined ? meshFromOption(options.mesh) : null;
  if (fixedMesh && order !== undefined && fixedMesh.some((v) => v < order)) {
    throw new RangeError(`mesh ${fixedMesh.join('×')} has fewer points per side than the order ${order}`);
  }
  const softening = softeningValidate(options.softening ?? NO_SOFTENING);
  return { G, tol, influence, order, alpha: options.alpha, rCut: options.rCut, maxMesh, fixedMesh, softening };
}

/** Largest mesh spacing of a mesh in the box. */
export function meshSpacing(box: Box, mesh: readonly [number, number, number]): number {
  return Math.max(box.lx / mesh[0], box.ly / mesh[1], box.lz / mesh[2]);
}

/**
 * Chooses the parameters for positions wrapped into the box, given their density statistics and the
 * error factor Z (length; errorModel.ts): minimum model cost with Z·ΣQ ≤ (tol/SAFETY)².
 */
export function pmeParamsChoose(masses: Float64Array, box: Box, stats: DensityStats, opts: PmeResolvedOptions, errorFactor: number): PmeParams {
  const { G, tol, influence, order, maxMesh, fixedMesh, softening } = opts;
  const options = opts;
  const n = masses.length;
  const V = boxVolume(box);
  const sides = boxSides(box);
  const minSide = Math.min(...sides);
  let Q = 0;
  for (let i = 0; i < n; i++) Q += masses[i] * masses[i];
  const rho2 = Q / V;
  const Z = errorFactor > 0 && Number.isFinite(errorFactor) ? errorFactor : minSide;
  const target2 = (tol / SAFETY) ** 2 / Z; // budget for ΣQ

  // Plummer: the correction is applied out to R, with the left-out part between R and the half box (where
  // direct Ewald stops by convention) given 10 % of the budget.
  let rSoft = softeningSupport(softening);
  let qSoft = 0;
  if (softening.kind === 'plummer') {
    const half = minSide / 2;
    const share = 0.1 * target2 + plummerErrorFunctional(softening.eps, half);
    rSoft = Math.min(half, Math.pow((9 * Math.PI * softening.eps ** 4) / (5 * share), 0.2));
    qSoft = Math.max(0, plummerErrorFunctional(softening.eps, rSoft) - plummerErrorFunctional(softening.eps, half));
  }
  const budget = target2 - qSoft;
  // Real-space cost on a 1 % grid of radii (the search asks for nearby radii many times).
  const realCosts = new Map<number, number>();
  const pairCost = (r: number) => {
    const key = Math.round(100 * Math.log(r));
    let c = realCosts.get(key);
    if (c === undefined) {
      c = realSpaceCost(stats, Math.exp(key / 100)).cost;
      realCosts.set(key, c);
    }
    return c;
  };

  const orders = order !== undefined ? [order] : ORDERS_AUTO;
  // Best candidate within the error budget, and the most accurate one in case none is.
  const pick: { best: Candidate | null; fallback: Candidate | null } = { best: null, fallback: null };
  const consider = (c: Candidate) => {
    if (c.eps2 <= target2 * (1 + 1e-9)) {
      if (!pick.best || c.cost < pick.best.cost) pick.best = c;
    } else if (!pick.fallback || c.eps2 < pick.fallback.eps2) pick.fallback = c;
  };

  const tryMesh = (p: number, mesh: [number, number, number]) => {
    if (mesh.some((v) => v < p)) return;
    const mc = meshCost(n, p, mesh);
    if (pick.best && mc > pick.best.cost) return;
    const h = Math.max(...sides.map((l, d) => l / mesh[d]));
    const alphas: number[] = [];
    if (options.alpha) alphas.push(options.alpha);
    else for (let k = 0; k < TABLE_SIZE - 1; k++) alphas.push((TABLE_X0 * Math.pow(2, k / TABLE_STEPS_PER_OCTAVE)) / h);
    for (const alpha of alphas) {
      const qMesh = meshFunctionalEstimate(p, influence, alpha, h);
      let rCut: number;
      if (options.rCut) rCut = options.rCut;
      else {
        if (qMesh >= 0.95 * budget) {
          if (!options.alpha) break; // larger α only makes the mesh error worse
          rCut = realCutoffFor(alpha, 0.05 * budget);
        } else rCut = realCutoffFor(alpha, budget - qMesh);
      }
      const qReal = realErrorFunctional(alpha, rCut);
      const cost = mc + pairCost(Math.max(rCut, rSoft));
      consider({ alpha, rCut, mesh, order: p, qMesh, cost, eps2: qMesh + qReal + qSoft });
    }
  };

  for (const p of orders) {
    if (fixedMesh) {
      tryMesh(p, fixedMesh);
      continue;
    }
    const seen = new Set<string>();
    for (let s = 4 / minSide; ; s *= 1.04) {
      const mesh = sides.map((l, d) => fftSizeNext(Math.max(p, Math.ceil(l * s)), d === 0)) as [number, number, number];
      const pts = mesh[0] * mesh[1] * mesh[2];
      if (pts > maxMesh) break;
      const key = mesh.join('x');
      if (seen.has(key)) continue;
      seen.add(key);
      tryMesh(p, mesh);
      if (pick.best && meshCost(n, p, mesh) > pick.best.cost) break;
    }
  }
  let chosen = pick.best ?? pick.fallback;
  if (!chosen) throw new RangeError('no usable mesh: maxMeshPoints is too small for the B-spline order');
  if (pick.best && !options.alpha && !options.rCut) {
    const alpha = alphaRefine(chosen.mesh, box, chosen.alpha, chosen.order, influence, budget);
    // Kept only where it saves real-space work (with few pairs every α costs the same: keep the grid value).
    const q = meshErrorFunctional(chosen.mesh, box, alpha, chosen.order, influence, FINAL_SAMPLES);
    if (q < 0.98 * budget && pairCost(Math.max(realCutoffFor(alpha, budget - q), rSoft)) < 0.99 * pairCost(Math.max(chosen.rCut, rSoft))) {
      chosen = { ...chosen, alpha };
    }
  }
  // Final, finer evaluation of the mesh functional; the cutoff is re-solved against it.
  const qMesh = meshErrorFunctional(chosen.mesh, box, chosen.alpha, chosen.order, influence, FINAL_SAMPLES);
  let rCut = chosen.rCut;
  if (!options.rCut && budget - qMesh > 0) rCut = realCutoffFor(chosen.alpha, budget - qMesh);
  const qReal = realErrorFunctional(chosen.alpha, rCut);
  if (softening.kind === 'plummer') {
    // Pairs inside r_c are visited anyway: apply the correction to all of them.
    rSoft = Math.max(rSoft, Math.min(rCut, minSide / 2));
    qSoft = Math.max(0, plummerErrorFunctional(softening.eps, rSoft) - plummerErrorFunctional(softening.eps, minSide / 2));
  }
  const rLoop = Math.max(rCut, rSoft);
  const grid = realSpaceCost(stats, rLoop);
  const total = qMesh + qReal + qSoft;
  return {
    G,
    tol,
    alpha: chosen.alpha,
    rCut,
    mesh: chosen.mesh,
    order: chosen.order,
    influence,
    softening,
    rSoft,
    cells: grid.cells,
    stencilCells: grid.stencil,
    meshFunctional: qMesh,
    realFunctional: qReal,
    softeningFunctional: qSoft,
    meshError: G * Math.sqrt(rho2 * qMesh),
    realError: G * Math.sqrt(rho2 * qReal),
    predictedRmsError: G * Math.sqrt(rho2 * total),
    errorFactor: Z,
    predictedRelativeError: Math.sqrt(Z * total),
    modelSeconds: (meshCost(n, chosen.order, chosen.mesh) + pairCost(rLoop) + n * COST_PARTICLE) * 1e-9,
    pairEstimate: densityPairEstimate(stats, rLoop),
  };
}
