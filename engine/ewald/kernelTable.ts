/**
 * Piecewise-polynomial table of the Ewald real-space functions forceP(u) and potQ(u) (see
 * special/erf.ts), u = (αr)² in [0, uMax]. Each interval holds two degree-5 Chebyshev interpolants,
 * re-expressed as monomials in the local variable t ∈ [−1, 1] for Horner evaluation, interleaved as
 * [P0..P5, Q0..Q5] so one interval is one 96-byte read. No erfc or exp call per pair.
 */
import { ewaldForceP, ewaldPotQ } from '../special/erf';

export const KERNEL_DEGREE = 5;
export const KERNEL_STRIDE = 2 * (KERNEL_DEGREE + 1);

export interface KernelTable {
  /** Upper end of the tabulated range of u = (αr)². */
  readonly uMax: number;
  /** Intervals per unit of u. */
  readonly perUnit: number;
  /** Interleaved monomial coefficients, KERNEL_STRIDE per interval. */
  readonly coef: Float64Array;
}

// Monomial coefficients of the Chebyshev polynomials T_0..T_5 (T_j(t) = Σ_k MONO[j][k] t^k).
const CHEB_MONO: number[][] = [
  [1, 0, 0, 0, 0, 0],
  [0, 1, 0, 0, 0, 0],
  [-1, 0, 2, 0, 0, 0],
  [0, -3, 0, 4, 0, 0],
  [1, 0, -8, 0, 8, 0],
  [0, 5, 0, -20, 0, 16],
];

function chebyshevMonomials(samples: number[]): number[] {
  const n = KERNEL_DEGREE + 1;
  const mono = new Array<number>(n).fill(0);
  for (let j = 0; j < n; j++) {
    let c = 0;
    for (let k = 0; k < n; k++) c += samples[k] * Math.cos((Math.PI * j * (k + 0.5)) / n);
    c *= (j === 0 ? 1 : 2) / n;
    for (let m = 0; m < n; m++) mono[m] += c * CHEB_MONO[j][m];
  }
  return mono;
}

// The coefficients of an interval depend on the interval alone, so tables are cut from the longest one
// built so far (per density); this saves rebuilding them for every run in one process.
const built = new Map<number, Float64Array>();

/**
 * Hands this thread tables built elsewhere (another thread's kernelTableBuild(…).coef, same perUnit), so
 * that later builds up to that length are cuts; a shorter one than already held is ignored.
 */
export function kernelTableSeed(coef: Float64Array, perUnit = 32): void {
  const have = built.get(perUnit);
  if (coef.length % KERNEL_STRIDE === 0 && (!have || have.length < coef.length)) built.set(perUnit, Float64Array.from(coef));
}

/** Builds the table on [0, uMax] with `perUnit` intervals per unit of u (default 32: error ≈ 1e-15). */
export function kernelTableBuild(uMax: number, perUnit = 32): KernelTable {
  if (!(uMax > 0) || !Number.isFinite(uMax)) throw new RangeError(`kernel table: uMax must be positive, got ${uMax}`);
  const intervals = Math.max(1, Math.ceil(uMax * perUnit)) + 1; // one spare interval for u == uMax
  const have = built.get(perUnit);
  if (have && have.length >= intervals * KERNEL_STRIDE) return { uMax, perUnit, coef: have.slice(0, intervals * KERNEL_STRIDE) };
  const coef = kernelTableCoefficients(intervals, perUnit);
  built.set(perUnit, coef);
  return { uMax, perUnit, coef: coef.slice() };
}

/** Interleaved monomial coefficients of the first `intervals` intervals at `perUnit` per unit of u. */
function kernelTableCoefficients(intervals: number, perUnit: number): Float64Array {
  const coef = new Float64Array(intervals * KERNEL_STRIDE);
  const n = KERNEL_DEGREE + 1;
  const nodes = Array.from({ length: n }, (_, k) => Math.cos((Math.PI * (k + 0.5)) / n));
  const h = 1 / perUnit;
  const p: number[] = new Array(n);
  const q: number[] = new Array(n);
  for (let iv = 0; iv < intervals; iv++) {
    const mid = (iv + 0.5) * h;
    for (let k = 0; k < n; k++) {
      const u = mid + 0.5 * h * nodes[k];
      p[k] = ewaldForceP(u);
      q[k] = ewaldPotQ(u);
    }
    const pm = chebyshevMonomials(p);
    const qm = chebyshevMonomials(q);
    for (let m = 0; m < n; m++) {
      coef[iv * KERNEL_STRIDE + m] = pm[m];
      coef[iv * KERNEL_STRIDE + n + m] = qm[m];
    }
  }
  return coef;
}

/** Evaluates forceP(u) from the table (reference path; hot loops inline the same arithmetic). */
export function kernelTableForceP(table: KernelTable, u: number): number {
  const s = u * table.perUnit;
  const iv = s | 0;
  const t = 2 * (s - iv) - 1;
  const c = table.coef;
  const o = iv * KERNEL_STRIDE;
  return c[o] + t * (c[o + 1] + t * (c[o + 2] + t * (c[o + 3] + t * (c[o + 4] + t * c[o + 5]))));
}

/** Evaluates potQ(u) from the table. */
export function kernelTablePotQ(table: KernelTable, u: number): number {
  const s = u * table.perUnit;
  const iv = s | 0;
  const t = 2 * (s - iv) - 1;
  const c = table.coef;
  const o = iv * KERNEL_STRIDE + KERNEL_DEGREE + 1;
  return c[o] + t * (c[o + 1] + t * (c[o + 2] + t * (c[o + 3] + t * (c[o + 4] + t * c[o + 5]))));
}
