/**
 * Fast scaled complementary error function erfcx(x) = e^{x²} erfc(x) for x ≥ 0, for the hot loops of the
 * screened and slab sums: on [0, 25] a table of degree-9 Chebyshev interpolants on intervals of width 1/8
 * (evaluated by Clenshaw's recurrence), built once from engine/special/erf.ts; beyond 25 the asymptotic
 * series erfcx(x) ≈ (1/(x√π)) Σ_k (−1)^k (2k−1)!!/(2x²)^k (Abramowitz & Stegun 1964, 7.1.23), whose
 * tenth term is below 1e-22 there. Relative error ≲ 3e-13, set by erfc's own 1 − erf near x = 2, elsewhere
 * ≲ 1e-15 (tests/engine/orders/erfcScaled.test.ts).
 */
import { erfc } from '../special/erf';

const DEGREE = 9;
const PER_UNIT = 8;
const X_MAX = 25;
const INTERVALS = X_MAX * PER_UNIT;
let table: Float64Array | null = null;

/** erfcx from the accurate (slow) erfc: e^{x·x} and erfc's own e^{−x·x} share the rounding of x·x. */
function erfcxSlow(x: number): number {
  return Math.exp(x * x) * erfc(x);
}

function buildTable(): Float64Array {
  const n = DEGREE + 1;
  const coef = new Float64Array(INTERVALS * n);
  const nodes = Array.from({ length: n }, (_, k) => Math.cos((Math.PI * (k + 0.5)) / n));
  const h = 1 / PER_UNIT;
  const f = new Float64Array(n);
  for (let iv = 0; iv < INTERVALS; iv++) {
    const mid = (iv + 0.5) * h;
    for (let k = 0; k < n; k++) f[k] = erfcxSlow(mid + 0.5 * h * nodes[k]);
    for (let j = 0; j < n; j++) {
      let c = 0;
      for (let k = 0; k < n; k++) c += f[k] * Math.cos((Math.PI * j * (k + 0.5)) / n);
      coef[iv * n + j] = (c * (j === 0 ? 1 : 2)) / n;
    }
  }
  return coef;
}

/** Scaled complementary error function e^{x²} erfc(x) for x ≥ 0 (NaN for x < 0 or NaN). */
export function erfcScaled(x: number): number {
  if (!(x >= 0)) return NaN;
  if (x >= X_MAX) {
    const w = 1 / (2 * x * x);
    let term = 1, sum = 1;
    for (let k = 1; k <= 10; k++) {
      term *= -(2 * k - 1) * w;
      sum += term;
    }
    return sum / (x * Math.sqrt(Math.PI));
  }
  const c = table ?? (table = buildTable());
  const s = x * PER_UNIT;
  const iv = s | 0;
  const t = 2 * (s - iv) - 1;
  const t2 = 2 * t;
  const o = iv * (DEGREE + 1);
  // Clenshaw's recurrence for Σ c_j T_j(t), unrolled (DEGREE = 9)
  let b1 = c[o + 9];
  let b2 = 2 * t * b1 + c[o + 8];
  let b3 = t2 * b2 - b1 + c[o + 7];
  b1 = t2 * b3 - b2 + c[o + 6];
  b2 = t2 * b1 - b3 + c[o + 5];
  b3 = t2 * b2 - b1 + c[o + 4];
  b1 = t2 * b3 - b2 + c[o + 3];
  b2 = t2 * b1 - b3 + c[o + 2];
  b3 = t2 * b2 - b1 + c[o + 1];
  return t * b3 - b2 + c[o];
}

/** erfc(x) for any real x through the table: erfcx(|x|)·e^{−x²}, and 2 minus that for x < 0. */
export function erfcFast(x: number): number {
  if (x >= 0) return erfcScaled(x) * Math.exp(-x * x);
  return 2 - erfcScaled(-x) * Math.exp(-x * x);
}
