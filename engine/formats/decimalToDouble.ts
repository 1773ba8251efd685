/**
 * Correctly rounded decimal → double without strings, for up to 19 significant digits.
 *
 * The digits M = hi·10^r + lo (hi < 10^15, r ≤ 4, so M < 10^19 < 2^64) are held exactly as a
 * double-double and scaled by exact powers 10^s (s ≤ 22) in double-double arithmetic: exact products by
 * Dekker's splitting and exact sums (Dekker 1971, "A floating-point technique for extending the
 * available precision", Numer. Math. 18, 224; Knuth, TAOCP vol. 2, §4.2.2). The relative error stays far
 * below 2^-90; the rounded double is returned only when the double-double lies farther than that from
 * a rounding boundary (half-way between two doubles), which fails with probability ≈ 2^-36. Otherwise,
 * and outside [1e-250, 1e300], it returns NaN and the caller uses an exact method (Number()).
 */

/** 10^0 … 10^22, all exact doubles. */
const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

const SPLIT = 134217729; // 2^27 + 1
const MARGIN = 2 ** -90;

// Results of the helpers below (two numbers each; module scratch so that nothing is allocated).
let rh = 0;
let rl = 0;

/** rh + rl = a·b exactly (Dekker). */
function twoProduct(a: number, b: number): void {
  const p = a * b;
  let c = SPLIT * a;
  const ah = c - (c - a);
  const al = a - ah;
  c = SPLIT * b;
  const bh = c - (c - b);
  const bl = b - bh;
  rh = p;
  rl = ah * bh - p + ah * bl + al * bh + al * bl;
}

/** rh + rl = a + b exactly, rh = fl(a + b) (Knuth's TwoSum). */
function twoSum(a: number, b: number): void {
  const s = a + b;
  const bb = s - a;
  rh = s;
  rl = a - (s - bb) + (b - bb);
}

/** rh + rl = a + b exactly for |a| ≥ |b| (Dekker's FastTwoSum). */
function fastTwoSum(a: number, b: number): void {
  const s = a + b;
  rh = s;
  rl = b - (s - a);
}

const view = new DataView(new ArrayBuffer(8));

/** Half the gap from h to the next double in the direction of `toward` (h normal, 2^-969 < |h| < 2^1023). */
function halfGap(h: number, toward: number): number {
  view.setFloat64(0, h);
  const high = view.getUint32(0);
  const exponent = (high >>> 20) & 0x7ff;
  const powerOfTwo = (high & 0xfffff) === 0 && view.getUint32(4) === 0;
  view.setUint32(0, (exponent - 52) << 20);
  view.setUint32(4, 0);
  const ulp = view.getFloat64(0);
  // Below a power of two (moving toward zero) the doubles are twice as dense.
  const shrinking = toward !== 0 && (toward < 0) !== (h < 0);
  return powerOfTwo && shrinking ? ulp / 4 : ulp / 2;
}

/**
 * The double nearest to (hi·10^r + lo)·10^exp10 for integers 0 ≤ hi < 10^15, 0 ≤ r ≤ 4, 0 ≤ lo < 10^r;
 * NaN when it cannot decide cheaply (then use Number() on the text).
 */
export function decimalToDouble(hi: number, lo: number, r: number, exp10: number): number {
  // Magnitude guard: M has at most 19 digits, so M·10^exp10 lies in [10^exp10, 10^(exp10+19)).
  if (exp10 < -250 || exp10 + 19 > 300) return NaN;
  twoProduct(hi, POW10[r]);
  const m2 = rl;
  twoSum(rh, lo);
  // All terms are integers below 2^64, so the low parts are small integers and their sum is exact.
  fastTwoSum(rh, rl + m2);
  let h = rh;
  let l = rl;
  if (h === 0) return 0;
  for (let k = exp10; k > 0; ) {
    const s = k < 22 ? k : 22;
    const p = POW10[s];
    twoProduct(h, p);
    fastTwoSum(rh, rl + l * p);
    h = rh;
    l = rl;
    k -= s;
  }
  for (let k = -exp10; k > 0; ) {
    const s = k < 22 ? k : 22;
    const d = POW10[s];
    const q = h / d;
    twoProduct(q, d);
    fastTwoSum(q, (h - rh - rl + l) / d);
    h = rh;
    l = rl;
    k -= s;
  }
  const a = Math.abs(h);
  if (!(a > 1e-250 && a < 1e300)) return NaN;
  // h = fl(h + l): h is the nearest double unless h + l is within the error bound of a half-way point.
  if (Math.abs(l) + MARGIN * a < halfGap(h, l)) return h;
  return NaN;
}
