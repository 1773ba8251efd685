/**
 * Predicted relative acceleration errors. A particle's error has mean square G²ρ₂·Q (meshError.ts, with
 * the coherent local ρ₂ of density.ts), and the relative error divides that by |a_i|².
 *   After the run (pmePredictedErrors in pme.ts) |a_i| is known.
 *   Before it (parameter choice) |a_i|² is modelled as |A + F|²: A the large-scale field from a coarse
 *   mesh solve, F the small-scale field of the local particles, taken as Holtsmark-distributed with
 *   normal field Q_H = 2π(4/15)^{2/3} G ρ_{3/2}^{2/3}, ρ_{3/2} = Σ|m|^{3/2}/volume of the other particles in
 *   the finest Morton cell around i that holds at least 16 of them (Chandrasekhar 1943,
 *   Rev. Mod. Phys. 15, 1, Ch. IV). With the characteristic function e^{−|q Q_H|^{3/2}} of F and the
 *   transform 2π²/q of 1/|x|², E[1/|A + F|²] = g(|A|/Q_H)/Q_H², g(s) = (1/s)∫₀^∞ sin(st) e^{−t^{3/2}} dt,
 *   g(0) = (2/3)Γ(4/3) (our derivation; checked by quadrature and by sampling in the tests).
 */
import { type Box, boxSides, boxVolume } from '../box';
import {
  type CoherentDensity,
  type DensityStats,
  densityCellOf,
  densityCellRanges,
  densityCoherent,
  densityLevelFor,
  MORTON_LEVELS,
} from './density';
import {
  meshColumnBlocks,
  meshFftCreate,
  meshFftLength,
  meshFftScratch,
  meshForwardColumns,
  meshInverseColumns,
  meshSlabCount,
  meshSlabsSolve,
} from './fft3d';
import { fftSizeNext } from './fftRows';
import { influenceApplySlab, influenceTables } from './influence';
import { meshInterpolate, meshSpread } from './spread';

/** Holtsmark normal-field factor 2π(4/15)^{2/3}. */
export const HOLTSMARK_FACTOR = 2 * Math.PI * Math.pow(4 / 15, 2 / 3);
/** g(0) = ⟨β⁻²⟩ = (2/3)Γ(4/3), Γ(4/3) = 0.8929795115692492 (A&S 1964, Table 6.1). */
export const HOLTSMARK_INV_SQ = (2 / 3) * 0.8929795115692492;

const G_S_MAX = 24;
/** Γ(5/2)·sin(π/4) = (3√π/4)(√2/2). */
const G_TAIL = ((3 * Math.sqrt(Math.PI)) / 4) * Math.SQRT1_2;
const G_STEPS = 480;
let gTable: Float64Array | null = null;

/** g(s) = Q_H²·E[1/|A + F|²] for |A| = s·Q_H (see the header); tends to 1/s² for large s. */
export function holtsmarkInverseSquare(s: number): number {
  if (!(s > 0)) return HOLTSMARK_INV_SQ;
  // Large s: ∫₀^∞ sin(st)(1 − t^{3/2} + …) dt = 1/s + Γ(5/2) sin(π/4)/s^{5/2} + … (generalised functions).
  if (s >= G_S_MAX) return 1 / (s * s) + G_TAIL / (s * s * s * Math.sqrt(s));
  if (!gTable) {
    // Simpson's rule on t ∈ [0, 15] (e^{−15^{1.5}} ≈ 6e-26) with step 1/200 (≥ 50 points per period).
    const T = 15, m = 3000, dt = T / m;
    const f = new Float64Array(m + 1);
    for (let j = 0; j <= m; j++) f[j] = (j === 0 || j === m ? 1 : j % 2 ? 4 : 2) * Math.exp(-Math.pow(j * dt, 1.5));
    gTable = new Float64Array(G_STEPS + 1);
    gTable[0] = HOLTSMARK_INV_SQ;
    for (let k = 1; k <= G_STEPS; k++) {
      const sv = (k * G_S_MAX) / G_STEPS;
      // sin(sv·j·dt) by the angle-addition recurrence (exact to rounding over 3000 steps)
      const c1 = Math.cos(sv * dt), s1 = Math.sin(sv * dt);
      let sn = 0, cs = 1, sum = 0;
      for (let j = 0; j <= m; j++) {
        sum += f[j] * sn;
        const t = sn * c1 + cs * s1;
        cs = cs * c1 - sn * s1;
        sn = t;
      }
      gTable[k] = (sum * dt) / 3 / sv;
    }
  }
  const pos = (s / G_S_MAX) * G_STEPS;
  const k = Math.floor(pos);
  const f = pos - k;
  return gTable[k] * (1 - f) + gTable[k + 1] * f;
}

export interface FieldSample {
  /** Input rows of the sampled particles. */
  readonly rows: Uint32Array;
  /** Splitting parameter of the coarse solve (the field is the long-range part, ×e^{−k²/4α²}). */
  readonly alpha: number;
  /** Large-scale acceleration at each sampled particle (3 per sample, G·mass/length²). */
  readonly acc: Float64Array;
}

/**
 * Large-scale field at up to `maxSamples` particles (every k-th input row) from a coarse mesh solve:
 * order-3 assignment on ~N^{1/3}/2 points per side (16 … 64), Gaussian split α_c = 0.5/h_c, optimal
 * influence function; scales below ~1/α_c are left to the local terms.
 */
export function errorModelFieldSample(positions: Float64Array, masses: Float64Array, box: Box, G: number, maxSamples = 4096): FieldSample {
  const n = masses.length;
  const step = Math.max(1, Math.ceil(n / maxSamples));
  const rows = Uint32Array.from({ length: Math.ceil(n / step) }, (_, k) => k * step);
  const acc = new Float64Array(3 * rows.length);
  if (n < 2) return { rows, acc, alpha: 0 };
  const sides = boxSides(box);
  const cbrtV = Math.cbrt(boxVolume(box));
  const perSide = Math.max(16, Math.min(64, Math.round(Math.cbrt(n) / 2)));
  const mesh = sides.map((l, d) => fftSizeNext(Math.max(8, Math.round((perSide * l) / cbrtV)), d === 0)) as [number, number, number];
  const hc = Math.max(...sides.map((l, d) => l / mesh[d]));
  const alpha = 0.5 / hc;
  const inv: [number, number, number] = [mesh[0] / box.lx, mesh[1] / box.ly, mesh[2] / box.lz];
  const geo = { n: mesh, inv, p: 3 };
  const f = meshFftCreate(mesh);
  const grid = new Float64Array(meshFftLength(f));
  // Order-3 assignment through the shared kernel, in blocks (no full copy of the particles).
  const block = new Float64Array(4 * 4096);
  for (let b = 0; b < n; b += 4096) {
    const len = Math.min(4096, n - b);
    for (let k = 0; k < len; k++) {
      const i = b + k;
      block[4 * k] = positions[3 * i];
      block[4 * k + 1] = positions[3 * i + 1];
      block[4 * k + 2] = positions[3 * i + 2];
      block[4 * k + 3] = masses[i];
    }
    meshSpread(geo, block, 0, len, grid);
  }
  const tab = influenceTables(mesh, box, alpha, 3, 'optimal');
  const sc = meshFftScratch(f);
  meshForwardColumns(f, grid, 0, meshColumnBlocks(f), sc);
  meshSlabsSolve(f, grid, 0, meshSlabCount(f), sc, (k0, s) => influenceApplySlab(f, tab, k0, s));
  meshInverseColumns(f, grid, 0, meshColumnBlocks(f), sc);
  const sample = new Float64Array(4 * rows.length);
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k];
    for (let d = 0; d < 3; d++) sample[4 * k + d] = positions[3 * i + d];
    sample[4 * k + 3] = masses[i];
  }
  const phi = new Float64Array(rows.length);
  meshInterpolate(geo, sample, 0, rows.length, grid, acc, phi);
  for (let k = 0; k < acc.length; k++) acc[k] *= G;
  return { rows, acc, alpha };
}

/** Fine and coarse levels of the coherent density for mesh spacing h and cutoff r_c (density.ts). */
export function errorModelLevels(box: Box, h: number, rCut: number): { coarse: number; fine: number } {
  const coarse = densityLevelFor(box, rCut, 0, 7);
  const fine = Math.max(coarse, Math.min(MORTON_LEVELS, Math.floor(Math.log2(Math.cbrt(boxVolume(box)) / (2 * h)))));
  return { coarse, fine };
}

/** Neighbours the local Holtsmark density is measured over (adaptive cell, density.ts). */
const HOLTSMARK_NEIGHBOURS = 16;
/** Poisson significance (standard deviations) a cell's mass excess needs to count as a clump. */
const CLUMP_SIGMAS = 3;

export interface ErrorModelSamples {
  /** Input rows of the sampled particles. */
  readonly rows: Uint32Array;
  /** Modelled E[1/|a_i|²] per sampled particle ((acceleration units)⁻²; 0 for a particle alone). */
  readonly inv2: Float64Array;
}

/**
 * Per sampled particle, E[1/|a_i|²] = g(A_i/Q_H(i))/Q_H(i)², where A_i is the larger of the coarse-mesh
 * field and the clump field: over the Morton levels from the adaptive cell up, a cell whose mass exceeds
 * 1/8 of its parent's by δ beyond 3 Poisson standard deviations contributes Gδ/(s/√3)² (the field of its
 * excess at distance s/√3, between the half side and the half diagonal of the cell; our choice,
 * calibrated on the clustered demo snapshots against measured accelerations: Gδ/(s/2)² made the estimate
 * optimistic on small samples, Gδ/s²·2 too pessimistic on large ones; uniform data are unaffected).
 * Independent of α, r_c and the mesh.
 */
export function errorModelSamples(stats: DensityStats, masses: Float64Array, field: FieldSample, G: number): ErrorModelSamples {
  const V = boxVolume(stats.box);
  const cbrtV = Math.cbrt(V);
  // Prefix sums over the Morton order: Σm, Σ|m|, Σ|m|^{3/2}.
  const n = stats.n;
  const pm = new Float64Array(n + 1), pa = new Float64Array(n + 1), p32 = new Float64Array(n + 1);
  for (let s = 0; s < n; s++) {
    const m = masses[stats.order[s]];
    const a = Math.abs(m);
    pm[s + 1] = pm[s] + m;
    pa[s + 1] = pa[s] + a;
    p32[s + 1] = p32[s] + a * Math.sqrt(a);
  }
  const count = field.rows.length;
  const inv2 = new Float64Array(count);
  const ranges = new Int32Array(2 * (MORTON_LEVELS + 1));
  for (let k = 0; k < count; k++) {
    const i = field.rows[k];
    densityCellRanges(stats, i, ranges);
    // adaptive cell: the finest level holding at least HOLTSMARK_NEIGHBOURS other particles
    let level = MORTON_LEVELS;
    while (level > 0 && ranges[2 * level + 1] - ranges[2 * level] - 1 < HOLTSMARK_NEIGHBOURS) level--;
    const a = Math.abs(masses[i]);
    const b0 = ranges[2 * level], e0 = ranges[2 * level + 1];
    const r32 = Math.max(0, (p32[e0] - p32[b0] - a * Math.sqrt(a)) / (V / Math.pow(8, level)));
    const qh = HOLTSMARK_FACTOR * G * Math.pow(r32, 2 / 3);
    let A = Math.hypot(field.acc[3 * k], field.acc[3 * k + 1], field.acc[3 * k + 2]);
    for (let j = level; j >= 1; j--) {
      const cb = ranges[2 * j], ce = ranges[2 * j + 1];
      const pb = ranges[2 * j - 2], pe = ranges[2 * j - 1];
      const mParent = pm[pe] - pm[pb];
      const aParent = pa[pe] - pa[pb];
      const nParent = pe - pb;
      const sigma = nParent > 0 ? Math.sqrt(nParent / 8) * (aParent / nParent) : 0;
      const excess = Math.abs(pm[ce] - pm[cb] - mParent / 8) - CLUMP_SIGMAS * sigma;
      if (excess > 0) {
        const side = cbrtV / Math.pow(2, j);
        A = Math.max(A, (3 * G * excess) / (side * side));
      }
    }
    if (qh > 0) inv2[k] = holtsmarkInverseSquare(A / qh) / (qh * qh);
    else if (A > 0) inv2[k] = 1 / (A * A);
    // else: a lone particle, no error model applies (0)
  }
  return { rows: field.rows, inv2 };
}

/**
 * Z (length units) with mean square relative error = Z·ΣQ, for mesh spacing h and cutoff r_c:
 * mean over the sampled particles of G²ρ₂(i)·E[1/|a_i|²] with the coherent ρ₂ of density.ts.
 */
export function errorModelFactor(stats: DensityStats, masses: Float64Array, samples: ErrorModelSamples, G: number, h: number, rCut: number): { factor: number; map: CoherentDensity } {
  const { coarse, fine } = errorModelLevels(stats.box, h, rCut);
  const map = densityCoherent(stats, masses, coarse, fine);
  let z = 0;
  const count = samples.rows.length;
  for (let k = 0; k < count; k++) z += G * G * map.rho2[densityCellOf(stats, map, samples.rows[k])] * samples.inv2[k];
  return { factor: count > 0 ? z / count : 0, map };
}
