/**
 * Ewald parameters from a requested relative tolerance, with the uncorrelated-positions rms force-error
 * estimates of Kolafa & Perram (1992, Mol. Simul. 9, 351), for an acceleration (G, mass Σm², volume V):
 *   real space:    ΔF_r = 2 G √(Q/(r_c V)) e^{−α² r_c²}
 *   Fourier space: ΔF_k = 2 α G √(2Q/(V k_c)) e^{−k_c²/4α²}        (Q = Σ_j m_j²)
 * (re-derived in DEVELOPERS.md from ∫|truncated pair force|² d³r). The tolerance is relative to the
 * smallest acceleration expected among N particles of a Poisson sample (the Holtsmark low tail,
 * Chandrasekhar 1943, Rev. Mod. Phys. 15, 1: normal field 2π(4/15)^{2/3} G m n^{2/3}, P(β<b) ≈ 4b³/9π),
 * and the budget is shrunk by a measured clustering factor (our margin for correlated positions).
 */
import { type Box, boxSides, boxVolume } from '../box';
import { type Softening, NO_SOFTENING, softeningSupport, softeningValidate } from '../softening';
import { cellStencilSize } from './cellList';

export interface EwaldOptions {
  /** Gravitational constant (default 1). */
  readonly G?: number;
  /** Requested relative force tolerance in (0, 1) (default 1e-6). */
  readonly tol?: number;
  /** Override: splitting parameter α (1/length). */
  readonly alpha?: number;
  /** Override: real-space cutoff radius (length). */
  readonly rCut?: number;
  /** Override: Fourier cutoff |k| ≤ kCut (1/length, k = 2πh/L). */
  readonly kCut?: number;
  /** Softening kernel (default none). */
  readonly softening?: Softening;
  /** Keep the wrapped positions and the cell list in SharedArrayBuffers (for threads; default false). */
  readonly sharedMemory?: boolean;
}

export interface EwaldParams {
  readonly G: number;
  readonly tol: number;
  readonly alpha: number;
  readonly rCut: number;
  readonly kCut: number;
  /** Largest |h| per axis and the number of half-space k-vectors. */
  readonly hMax: [number, number, number];
  readonly kVectors: number;
  readonly softening: Softening;
  /** Radius inside which the softened kernel is used (spline: h; Plummer: chosen from tol; none: 0). */
  readonly rSoft: number;
  /** Cells per side of the real-space cell list and the number of stencil cells. */
  readonly cells: [number, number, number];
  readonly stencilCells: number;
  /**
   * Predicted rms acceleration errors (acceleration units): real, Fourier, total (with the clustering
   * margin); softeningTailError is the rms size of the Plummer correction beyond rSoft, which the
   * reference leaves out by definition (0 for other kernels).
   */
  readonly realSpaceError: number;
  readonly fourierError: number;
  readonly softeningTailError: number;
  readonly predictedRmsError: number;
  /** The acceleration the tolerance is relative to, and predictedRmsError divided by it. */
  readonly accelerationScale: number;
  readonly predictedRelativeError: number;
  /** Clustering factor: N_cells Σ n_c² / N² on a grid of ~8 particles per cell (≈1.1 for uniform). */
  readonly clustering: number;
}

// Cost model (ns, WebAssembly kernels, measured with the phase timings of scripts/bench on the
// project machine): a real-space pair term in the symmetric all-particle loop (both particles updated,
// candidate overhead included) or in the per-target loop, and one particle × one k-vector per pass.
// Only the ratios matter. The cell-grid choice uses its own candidate/cell costs.
const COST_PAIR_SYM = 14;
const COST_PAIR = 9;
const COST_CANDIDATE = 1.2;
const COST_K = 1.05;
// Divides the error budget. The estimates are rms figures; the tolerance is a promise about the worst
// particle, whose |a| and error both fluctuate. Measured without it (largest error over all particles /
// tol, demo and uniform snapshots, N = 512 … 16384): up to 6.5; with 8·c^{1/4} every case measured had a
// margin of at least 1.8 (tests/engine/tolerance.test.ts keeps checking it).
const SAFETY = 8;

/** Solves 2·A·√(s/x)·e^{−x²} = eps for x ≥ 0.5 (the shape of both Kolafa–Perram estimates). */
export function solveGaussianTail(pref: number, eps: number): number {
  // f(x) = ln(pref) − ½ ln x − x² − ln eps, decreasing for x > 0
  const target = Math.log(eps);
  const lead = Math.log(2 * pref);
  const f = (x: number) => lead - 0.5 * Math.log(x) - x * x - target;
  let lo = 0.5, hi = 1;
  if (f(lo) <= 0) return lo;
  while (f(hi) > 0) hi *= 2;
  // f is concave and decreasing here, so Newton steps from hi stay at or above the root: a few of them,
  // then a bracket of ±2^−40 around the estimate (kept only if it brackets), cut the bisection below from
  // about 52 steps to about 12.
  let x = hi;
  for (let it = 0; it < 8; it++) x -= f(x) / (-0.5 / x - 2 * x);
  const a = x * (1 - 2 ** -40), b = x * (1 + 2 ** -40);
  if (a > lo && b < hi && f(a) > 0 && f(b) <= 0) {
    lo = a;
    hi = b;
  }
  // Bisection down to adjacent doubles (at most 100 steps): once the midpoint rounds onto an end, further
  // steps change nothing.
  for (let it = 0; it < 100; it++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return hi;
}

/** Real-space estimate ΔF_r (acceleration units). */
export function ewaldRealSpaceError(G: number, Q: number, V: number, alpha: number, rCut: number): number {
  return 2 * G * Math.sqrt(Q / (rCut * V)) * Math.exp(-alpha * alpha * rCut * rCut);
}

/** Fourier-space estimate ΔF_k (acceleration units). */
export function ewaldFourierError(G: number, Q: number, V: number, alpha: number, kCut: number): number {
  return 2 * alpha * G * Math.sqrt((2 * Q) / (V * kCut)) * Math.exp(-(kCut * kCut) / (4 * alpha * alpha));
}

/**
 * rms error from cutting the Plummer correction (f_P − 1/r³) at radius R: its tail −(3/2)ε²/r⁴ summed
 * over uncorrelated sources, ΔF² = G² (Q/V) 4π ∫_R^∞ r² (9/4) ε⁴ r⁻⁸ dr = G² (Q/V) (9π/5) ε⁴ R⁻⁵.
 */
export function plummerTailError(G: number, Q: number, V: number, eps: number, R: number): number {
  return G * Math.sqrt(((Q / V) * 9 * Math.PI * eps ** 4) / (5 * R ** 5));
}

/** Cells per side of the clustering grid: about 8 particles per cell, 1 to 64 per side. */
export function clusteringGrid(n: number, box: Box): [number, number, number] {
  const perSide = Math.cbrt(n / 8 / boxVolume(box));
  return boxSides(box).map((l) => Math.max(1, Math.min(64, Math.round(l * perSide)))) as [number, number, number];
}

/** The clustering factor from Σ n_c² over the grid's `cells` cells (1 below 16 particles; at least 1). */
export function clusteringFromSumSq(sumSq: number, cells: number, n: number): number {
  return n < 16 ? 1 : Math.max(1, (sumSq * cells) / (n * n));
}

/** Clustering factor N_cells·Σ n_c²/N² on a grid with about 8 particles per cell. */
export function clusteringFactor(positions: Float64Array, box: Box): number {
  const n = positions.length / 3;
  if (n < 16) return 1;
  const sides = boxSides(box);
  const g = clusteringGrid(n, box);
  const counts = new Float64Array(g[0] * g[1] * g[2]);
  for (let i = 0; i < n; i++) {
    const cx = Math.min(g[0] - 1, Math.floor((positions[3 * i] / sides[0]) * g[0]));
    const cy = Math.min(g[1] - 1, Math.floor((positions[3 * i + 1] / sides[1]) * g[1]));
    const cz = Math.min(g[2] - 1, Math.floor((positions[3 * i + 2] / sides[2]) * g[2]));
    counts[(cx * g[1] + cy) * g[2] + cz]++;
  }
  let s = 0;
  for (const c of counts) s += c * c;
  return clusteringFromSumSq(s, counts.length, n);
}

/** Mass sums in input order: Σ m², Σ |m|^{3/2}, Σ |m|. */
export interface MassSums {
  readonly q: number;
  readonly m32: number;
  readonly mAbs: number;
}

export function massSums(masses: Float64Array): MassSums {
  let q = 0, m32 = 0, mAbs = 0;
  for (let i = 0; i < masses.length; i++) {
    const m = masses[i];
    q += m * m;
    const a = Math.abs(m);
    m32 += a * Math.sqrt(a);
    mAbs += a;
  }
  return { q, m32, mAbs };
}

/**
 * The acceleration scale the tolerance refers to: the Holtsmark normal field 2.6031 G n^{2/3}⟨|m|^{3/2}⟩^{2/3}
 * times the expected smallest Holtsmark β among N particles, (9π/4N)^{1/3} (capped at 1).
 * `sums`: massSums(masses) when the caller has them already.
 */
export function accelerationScale(G: number, masses: Float64Array, V: number, sums: MassSums = massSums(masses)): number {
  const n = masses.length;
  const { m32, mAbs } = sums;
  if (n === 0 || mAbs === 0) return G;
  const holtsmark = 2 * Math.PI * Math.pow(4 / 15, 2 / 3) * G * Math.pow(n / V, 2 / 3) * Math.pow(m32 / n, 2 / 3);
  return holtsmark * Math.min(1, Math.cbrt((9 * Math.PI) / (4 * n)));
}

function kVectorCount(kCut: number, V: number): number {
  return ((2 * Math.PI) / 3) * Math.pow(kCut / (2 * Math.PI), 3) * V;
}

/** Chooses cells per side from a cost model: stencil cells × (candidates per cell + per-cell overhead). */
export function cellGridChoose(box: Box, n: number, rLoop: number): { cells: [number, number, number]; stencil: number } {
  const sides = boxSides(box);
  const density = n / boxVolume(box);
  let best: { cells: [number, number, number]; stencil: number; cost: number } | null = null;
  for (let perCut = 1; perCut <= 4; perCut++) {
    const cells = sides.map((l) => Math.max(1, Math.min(512, Math.floor((l * perCut) / rLoop)))) as [number, number, number];
    if (cells[0] * cells[1] * cells[2] > Math.max(64, 8 * n)) continue;
    const w = sides.map((l, d) => l / cells[d]) as [number, number, number];
    const stencil = cellStencilSize(w, rLoop);
    const cost = stencil * (w[0] * w[1] * w[2] * density * COST_CANDIDATE + 15);
    if (!best || cost < best.cost) best = { cells, stencil, cost };
  }
  if (!best) return { cells: [1, 1, 1], stencil: cellStencilSize(sides as [number, number, number], rLoop) };
  return { cells: best.cells, stencil: best.stencil };
}

/**
 * Chooses α, r_c, k_c (and the Plummer radius) for positions already wrapped into the box, minimising a
 * cost model under the error budget; explicit overrides are kept and their errors reported.
 * targetCount: how many targets will be evaluated (all-particle runs use the symmetric pair loop).
 * clusteringKnown: clusteringFactor(positions, box) when the caller has it already; sums: massSums(masses).
 */
export function ewaldParamsChoose(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  options: EwaldOptions = {},
  targetCount: number = masses.length,
  clusteringKnown?: number,
  sums: MassSums = massSums(masses),
): EwaldParams {
  const G = options.G ?? 1;
  const tol = options.tol ?? 1e-6;
  if (!(G > 0) || !Number.isFinite(G)) throw new RangeError(`G must be a positive finite number, got ${G}`);
  if (!(tol > 0 && tol < 1)) throw new RangeError(`tolerance must lie in (0, 1), got ${tol}`);
  for (const [name, v] of [['alpha', options.alpha], ['rCut', options.rCut], ['kCut', options.kCut]] as const) {
    if (v !== undefined && !(v > 0 && Number.isFinite(v))) throw new RangeError(`${name} must be a positive finite number, got ${v}`);
  }
  const softening = softeningValidate(options.softening ?? NO_SOFTENING);
  const n = masses.length;
  const V = boxVolume(box);
  const sides = boxSides(box);
  const Q = sums.q === 0 ? 1e-300 : sums.q;
  const clustering = clusteringKnown ?? clusteringFactor(positions, box);
  const scale = accelerationScale(G, masses, V, sums);
  // Safety factor and the clustering margin c^{1/4} (see SAFETY and DEVELOPERS.md, "Error estimates").
  const budget = (tol * scale) / (SAFETY * Math.pow(clustering, 0.25));
  const eps = budget / Math.SQRT2;

  // Plummer is never Newtonian: by convention its correction (f_P − 1/r³) is applied to every pair image
  // closer than half the shortest side (the minimum-image sphere), as a code with Plummer-softened
  // direct interactions and point-mass periodic images does; the omitted tail is reported, not hidden.
  const rSoft = softening.kind === 'plummer' ? Math.min(...sides) / 2 : softeningSupport(softening);

  // Both estimates have the same shape: x = α r_c = k_c / 2α solves one equation per α (memoised).
  let xAlpha = NaN, xValue = NaN;
  const xFor = (alpha: number) => {
    if (alpha !== xAlpha) {
      xAlpha = alpha;
      xValue = solveGaussianTail(G * Math.sqrt((Q * alpha) / V), eps);
    }
    return xValue;
  };
  const rFor = (alpha: number) => xFor(alpha) / alpha;
  const kFor = (alpha: number) => 2 * alpha * xFor(alpha);
  const density = n / V;
  const symmetric = targetCount >= n;
  const cost = (alpha: number) => {
    const rc = options.rCut ?? rFor(alpha);
    const kc = options.kCut ?? kFor(alpha);
    const rl = Math.max(rc, rSoft);
    const pairs = targetCount * ((4 * Math.PI) / 3) * rl ** 3 * density;
    const real = symmetric ? 0.5 * pairs * COST_PAIR_SYM : pairs * COST_PAIR;
    const kk = (n + targetCount) * kVectorCount(kc, V) * COST_K;
    return real + kk;
  };
  let alpha = options.alpha ?? 0;
  if (!options.alpha) {
    const base = Math.cbrt(n / V) * 1.0 + 1e-300;
    const maxSide = Math.max(...sides);
    let bestCost = Infinity;
    for (let j = -60; j <= 60; j++) {
      const a = base * Math.pow(2, j / 8);
      const rc = options.rCut ?? rFor(a);
      if (rc > 3 * maxSide && j < 60) continue; // keep the stencil from exploding at tiny α
      const c = cost(a);
      if (c < bestCost) {
        bestCost = c;
        alpha = a;
      }
    }
    if (alpha === 0) alpha = 4 / maxSide;
  }
  const rCut = options.rCut ?? rFor(alpha);
  const kCut = options.kCut ?? kFor(alpha);
  const realSpaceError = ewaldRealSpaceError(G, Q, V, alpha, rCut);
  const fourierError = ewaldFourierError(G, Q, V, alpha, kCut);
  const softeningTailError = softening.kind === 'plummer' ? plummerTailError(G, Q, V, softening.eps, rSoft) : 0;
  const predictedRmsError = Math.pow(clustering, 0.25) * Math.hypot(realSpaceError, fourierError);
  const hMax = sides.map((l) => Math.floor((kCut * l) / (2 * Math.PI) + 1e-12)) as [number, number, number];
  const rLoop = Math.max(rCut, rSoft);
  const grid = cellGridChoose(box, n, rLoop);
  return {
    G,
    tol,
    alpha,
    rCut,
    kCut,
    hMax,
    kVectors: 0, // filled in by ewaldSetup once the k-vectors are enumerated
    softening,
    rSoft,
    cells: grid.cells,
    stencilCells: grid.stencil,
    realSpaceError,
    fourierError,
    softeningTailError,
    predictedRmsError,
    accelerationScale: scale,
    predictedRelativeError: predictedRmsError / scale,
    clustering,
  };
}
