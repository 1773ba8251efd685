// The 17 significant decimal digits of a double, exactly as ECMA-262 Number.prototype.toPrecision(17)
// chooses them (§21.1.3.5 step 10: the n with 10^16 ≤ n < 10^17 for which n·10^(e−16) − x is closest
// to zero, ties to the larger n), computed with integer arithmetic only — no floating-point scaling.
//
// For |x| = m·2^q (m < 2^53), with e_lo = floor(log10 2^(q+L−1)) (L = bit length of m; e_lo is e or
// e − 1), Y = floor(|x|·10^(17−e_lo)) lies in [10^17, 10^19) and fits a u64. Y is the exact integer
// part of a product (m·5^k shifted) or quotient (m·2^q / 10^j) of integers; if Y ≥ 10^18, e = e_lo + 1
// and Y ← floor(Y/10) (floor of a floor is the floor). Then Y has 18 digits: the first 17 truncated and
// the 18th; rounding half up (ties to the larger n) needs only the 18th digit: up iff it is ≥ 5, since
// the exact fractional part of x·10^(16−e) is ≥ 1/2 exactly when its first decimal digit is ≥ 5.

// 5^k for k = 0 … 55 as (low u64, high u64): 5^55 < 2^128.
const POW5: usize = memory.data(56 * 16);
// Scratch big integer: little-endian u32 limbs (m·5^342 < 2^848 and m·2^969 < 2^1022 need ≤ 32 limbs).
const BIG: usize = memory.data(64 * 4);

let powLo: u64 = 1;
let powHi: u64 = 0;
for (let k = 0; k < 56; k++) {
  store<u64>(POW5 + (<usize>k << 4), powLo);
  store<u64>(POW5 + (<usize>k << 4) + 8, powHi);
  // (powHi, powLo) ← 5·(powHi, powLo)
  powHi = powHi * 5 + mulHi64(powLo, 5);
  powLo = powLo * 5;
}

/** The high 64 bits of the 128-bit product a·b. */
@inline
export function mulHi64(a: u64, b: u64): u64 {
  const a0 = a & 0xffffffff;
  const a1 = a >> 32;
  const b0 = b & 0xffffffff;
  const b1 = b >> 32;
  const p00 = a0 * b0;
  const p01 = a0 * b1;
  const p10 = a1 * b0;
  const p11 = a1 * b1;
  const mid = (p00 >> 32) + (p01 & 0xffffffff) + (p10 & 0xffffffff);
  return p11 + (p01 >> 32) + (p10 >> 32) + (mid >> 32);
}

/** Bits [s, s + 64) of the 192-bit number (w2, w1, w0); the caller guarantees the higher bits are zero. */
@inline
function shr192(w0: u64, w1: u64, w2: u64, s: i32): u64 {
  if (s >= 128) return w2 >> (<u64>(s - 128));
  if (s >= 64) {
    const b = s - 64;
    return b == 0 ? w1 : (w1 >> (<u64>b)) | (w2 << (<u64>(64 - b)));
  }
  return s == 0 ? w0 : (w0 >> (<u64>s)) | (w1 << (<u64>(64 - s)));
}

/** floor(m·5^k / 2^s) for k ≤ 55 (5^k in two words; the product has at most 181 bits). */
function mulShift(m: u64, k: i32, s: i32): u64 {
  const at = POW5 + (<usize>k << 4);
  const lo = load<u64>(at);
  const hi = load<u64>(at, 8);
  const a0 = m * lo;
  const a1 = mulHi64(m, lo);
  const b0 = m * hi;
  const b1 = mulHi64(m, hi);
  const w1 = a1 + b0;
  const w2 = b1 + (w1 < a1 ? 1 : 0);
  return shr192(a0, w1, w2, s);
}

/** Multiplies the n-limb scratch number by f < 2^32; returns the new limb count. */
function bigMulSmall(n: i32, f: u64): i32 {
  let carry: u64 = 0;
  for (let i = 0; i < n; i++) {
    const at = BIG + (<usize>i << 2);
    const t = <u64>load<u32>(at) * f + carry;
    store<u32>(at, <u32>t);
    carry = t >> 32;
  }
  if (carry != 0) {
    store<u32>(BIG + (<usize>n << 2), <u32>carry);
    n++;
  }
  return n;
}

/** Divides the n-limb scratch number by d < 2^32 (floor); returns the new limb count (≥ 1). */
function bigDivSmall(n: i32, d: u64): i32 {
  let rem: u64 = 0;
  for (let i = n - 1; i >= 0; i--) {
    const at = BIG + (<usize>i << 2);
    const cur = (rem << 32) | <u64>load<u32>(at);
    const qd = cur / d;
    store<u32>(at, <u32>qd);
    rem = cur - qd * d;
  }
  while (n > 1 && load<u32>(BIG + (<usize>(n - 1) << 2)) == 0) n--;
  return n;
}

/** floor(m·5^k / 2^s) for any k ≥ 0 (multi-limb product). */
function bigMulShift(m: u64, k: i32, s: i32): u64 {
  store<u32>(BIG, <u32>m);
  store<u32>(BIG + 4, <u32>(m >> 32));
  let n = 2;
  while (k > 0) {
    const c = k < 13 ? k : 13; // 5^13 < 2^32
    n = bigMulSmall(n, load<u64>(POW5 + (<usize>c << 4)));
    k -= c;
  }
  for (let i = 0; i < 3; i++) store<u32>(BIG + (<usize>(n + i) << 2), 0);
  const at = BIG + (<usize>(s >> 5) << 2);
  const b = <u64>(s & 31);
  const lo = <u64>load<u32>(at) | (<u64>load<u32>(at, 4) << 32);
  const top = <u64>load<u32>(at, 8);
  return b == 0 ? lo : (lo >> b) | (top << (64 - b));
}

/** floor(m·2^q / 10^j) for j ≥ 1: m·2^(q−j) divided by 5^j in u32 steps (floor∘floor = floor), then shifted. */
function bigDivShift(m: u64, q: i32, j: i32): u64 {
  const t = q - j;
  let n: i32;
  if (t >= 0) {
    const w = t >> 5;
    const b = <u64>(t & 31);
    for (let i = 0; i < w; i++) store<u32>(BIG + (<usize>i << 2), 0);
    const v0 = (m & 0xffffffff) << b;
    const v1 = ((m >> 32) << b) | (v0 >> 32);
    store<u32>(BIG + (<usize>w << 2), <u32>v0);
    store<u32>(BIG + (<usize>(w + 1) << 2), <u32>v1);
    store<u32>(BIG + (<usize>(w + 2) << 2), <u32>(v1 >> 32));
    n = w + 3;
  } else {
    store<u32>(BIG, <u32>m);
    store<u32>(BIG + 4, <u32>(m >> 32));
    n = 2;
  }
  while (j > 0) {
    const c = j < 13 ? j : 13;
    n = bigDivSmall(n, load<u64>(POW5 + (<usize>c << 4)));
    j -= c;
  }
  const y = <u64>load<u32>(BIG) | (<u64>load<u32>(BIG + 4) << 32);
  return t >= 0 ? y : y >> (<u64>-t);
}

/**
 * floor(m·2^q·10^k) with multi-limb arithmetic, for the exponents mulShift does not cover (|x| < 10^−38
 * or |x| ≥ 10^18). A function of its own, called from several places so that it is not inlined: the
 * optimizing compiler then never sees it unless such values are common.
 */
function scaledBig(m: u64, q: i32, k: i32): u64 {
  return k >= 0 ? bigMulShift(m, k, -(q + k)) : bigDivShift(m, q, -k);
}

/** The decimal exponent e of the last digits17 call. */
export let digitsExponent: i32 = 0;

/**
 * n (10^16 ≤ n < 10^17) of toPrecision(17) for |x| = m·2^q, 0 < m < 2^53, q ≥ −1074; the exponent e goes
 * to digitsExponent (|x| ≈ n·10^(e−16)).
 */
export function digits17(m: u64, q: i32): u64 {
  const pw = q + 63 - <i32>clz(m); // 2^pw ≤ |x| < 2^(pw+1)
  let e = (pw * 78913) >> 18; // floor(pw·log10 2) for −1100 ≤ pw ≤ 1100 (checked in the tests)
  const k = 17 - e;
  let y: u64;
  const t = q + k;
  // (two call sites of scaledBig keep the rare multi-limb code out of this function)
  if (k < 0) y = scaledBig(m, q, k);
  else if (t >= 0) y = (m * load<u64>(POW5 + (<usize>k << 4))) << (<u64>t); // y < 10^19 ⇒ k ≤ 27
  else if (k <= 55) y = mulShift(m, k, -t);
  else y = scaledBig(m, q, k);
  // Divisions by constants as multiply-high and shift (Granlund & Montgomery 1994, PLDI: with
  // m = ⌈2^s/d⌉ and m·d − 2^s ≤ 2^(s−N), floor(v·m / 2^s) = floor(v/d) for every v < 2^N); here
  // d = 10, s = 67, N = 64, m = 0xCCCCCCCCCCCCCCCD (m·d − 2^s = 2). Division instructions are slow.
  if (y >= 1000000000000000000) {
    y = mulHi64(y, 0xcccccccccccccccd) >> 3;
    e++;
  }
  let n = mulHi64(y, 0xcccccccccccccccd) >> 3;
  if (y - n * 10 >= 5) n++;
  if (n == 100000000000000000) {
    n = 10000000000000000;
    e++;
  }
  digitsExponent = e;
  return n;
}
