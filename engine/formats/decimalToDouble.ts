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

/**
 * The double nearest to (hi·10^r + lo)·10^exp10 for integers 0 ≤ hi < 10^15, 0 ≤ r ≤ 4, 0 ≤ lo < 10^r;
 * NaN when it cannot decide cheaply (then use Number() on the text).
 *
 * The exact products (Dekker's twoProduct) and sums (TwoSum, FastTwoSum) are written out inline with
 * local variables: this runs once per number of a file, mostly before the JIT has optimised it.
 */
export function decimalToDouble(hi: number, lo: number, r: number, exp10: number): number {
  // Magnitude guard: M has at most 19 digits, so M·10^exp10 lies in [10^exp10, 10^(exp10+19)).
  if (exp10 < -250 || exp10 + 19 > 300) return NaN;
  // M = hi·10^r + lo as h + l. hi < 2^50 and 10^r ≤ 10^4 < 2^14: split hi = hh + hl with hh a multiple
  // of 2^26 so that both partial products are exact (twoProduct with the splitting done by hand).
  const pr = POW10[r];
  let p = hi * pr;
  let c = SPLIT * hi;
  const ah = c - (c - hi);
  const al = hi - ah;
  let e = ah * pr - p + al * pr; // pr < 2^27 needs no split: ah·pr and al·pr are exact
  // TwoSum(p, lo), then FastTwoSum(s, t + e): all terms are integers below 2^64, so the low parts are
  // small integers and their sum is exact.
  let s = p + lo;
  let bb = s - p;
  const t = p - (s - bb) + (lo - bb);
  const low = t + e;
  let h = s + low;
  let l = low - (h - s);
  if (h === 0) return 0;
  for (let k = exp10; k > 0; ) {
    const step = k < 22 ? k : 22;
    const q = POW10[step];
    // twoProduct(h, q) then FastTwoSum(p, e + l·q).
    p = h * q;
    c = SPLIT * h;
    const hh = c - (c - h);
    const hl = h - hh;
    c = SPLIT * q;
    const qh = c - (c - q);
    const ql = q - qh;
    e = hh * qh - p + hh * ql + hl * qh + hl * ql;
    const w = e + l * q;
    h = p + w;
    l = w - (h - p);
    k -= step;
  }
  for (let k = -exp10; k > 0; ) {
    const step = k < 22 ? k : 22;
    const d = POW10[step];
    const q = h / d;
    // twoProduct(q, d) = p + e exactly; then FastTwoSum(q, remainder / d).
    p = q * d;
    c = SPLIT * q;
    const qh = c - (c - q);
    const ql = q - qh;
    c = SPLIT * d;
    const dh = c - (c - d);
    const dl = d - dh;
    e = qh * dh - p + qh * dl + ql * dh + ql * dl;
    const w = (h - p - e + l) / d;
    h = q + w;
    l = w - (h - q);
    k -= step;
  }
  const a = h < 0 ? -h : h;
  if (!(a > 1e-250 && a < 1e300)) return NaN;
  // h = fl(h + l); the exact value lies within MARGIN·a of h + l. It rounds to h when both ends of that
  // interval do: fl(l ± 2·MARGIN·a) lies beyond l ± MARGIN·a (its own rounding error is below
  // 2^-105·a), and fl(h + x) === h means h + x is at most half-way to a neighbour (strictly short of
  // it for the true value), with the neighbour's gap (half the size below a power of two) handled by
  // the addition itself.
  const m = 2 * MARGIN * a;
  if (h + (l + m) === h && h + (l - m) === h) return h;
  return NaN;
}
