// AssemblyScript twin of the fast paths of cellParse (engine/formats/csvCell.ts) and of decimalToDouble
// (engine/formats/decimalToDouble.ts): the same grammar, the same significant digits and exponent, and the
// same f64 operations in the same order, so every value it accepts has the same bits as in JavaScript.
// The digits of the usual shapes are read 16 bytes at a time (cellQuick, SIMD); other shapes by a port of
// cellParse's byte loop (cellScalar). It accepts a cell only where JavaScript would not call Number():
// whatever the JavaScript parser would refuse or send to its fallback (empty or bad cell, NaN/Inf, more than
// 19 significant digits, an undecided rounding) makes cellFast return false, and the caller hands the whole
// row to JavaScript.

const TAB: u32 = 9;
const SPACE: u32 = 32;
const PLUS: u32 = 43;
const MINUS: u32 = 45;
const DOT: u32 = 46;
const ZERO: u32 = 48;

/** 10^0 … 10^22: every one is exactly representable as a double. */
const POW10: StaticArray<f64> = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/** 10^0 … 10^19 as integers. */
const POW10U: StaticArray<u64> = [
  1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000, 1000000000, 10000000000, 100000000000, 1000000000000,
  10000000000000, 100000000000000, 1000000000000000, 10000000000000000, 100000000000000000, 1000000000000000000,
  10000000000000000000,
];

const SPLIT: f64 = 134217729; // 2^27 + 1
const MARGIN: f64 = 8.077935669463161e-28; // 2^-90

/** The value of the last cell cellFast accepted. */
export let gValue: f64 = 0;
/** Address just past that cell (at the delimiter, the first blank for whitespace, or the line end). */
export let gEnd: usize = 0;

@inline function isBlank(c: u32): bool {
  return c == SPACE || c == TAB;
}

// What cellStart and cellEnding found.
let gNeg = false;
let gExp: i32 = 0;
let gAt: usize = 0;

/** Past the leading blanks and an optional sign of a cell (gNeg: the sign was −). */
@inline function cellStart(i: usize, end: usize, tabBlank: bool): usize {
  while (i < end) {
    const c = <u32>load<u8>(i);
    if (c == SPACE || (c == TAB && tabBlank)) i++;
    else break;
  }
  gNeg = false;
  if (i < end) {
    const c = <u32>load<u8>(i);
    if (c == PLUS || c == MINUS) {
      gNeg = c == MINUS;
      i++;
    }
  }
  return i;
}

/**
 * After the digits of a cell at i: the optional exponent [eE][+-]digits (gExp), then what cellParse
 * accepts before the next cell (blanks, then the delimiter or the line end). False when JavaScript must
 * parse the cell; else gAt is where the cell ends.
 */
@inline function cellEnding(i: usize, end: usize, delim: u32, tabBlank: bool): bool {
  let e: i32 = 0;
  if (i < end && (<u32>load<u8>(i) | 32) == 101) {
    i++;
    let eneg = false;
    if (i < end) {
      const c = <u32>load<u8>(i);
      if (c == PLUS || c == MINUS) {
        eneg = c == MINUS;
        i++;
      }
    }
    let edigits: i32 = 0;
    while (i < end) {
      const d = <u32>load<u8>(i) - ZERO;
      if (d > 9) break;
      if (e < 100000) e = e * 10 + <i32>d;
      edigits++;
      i++;
    }
    if (edigits == 0) return false;
    if (eneg) e = -e;
  }
  if (delim == SPACE) {
    if (i < end && !isBlank(<u32>load<u8>(i))) return false;
  } else {
    while (i < end) {
      const c = <u32>load<u8>(i);
      if (c == SPACE || (c == TAB && tabBlank)) i++;
      else break;
    }
    if (i < end && <u32>load<u8>(i) != delim) return false;
  }
  gExp = e;
  gAt = i;
  return true;
}

/** Index of the end of the cell starting at `i` (the next delimiter, or `end`): cellEndFind. */
export function cellEndFind(i: usize, end: usize, delim: u32): usize {
  if (delim == SPACE) {
    while (i < end && !isBlank(<u32>load<u8>(i))) i++;
    return i;
  }
  while (i < end && <u32>load<u8>(i) != delim) i++;
  return i;
}

/**
 * cellParse on bytes [i, end) when it ends on a fast path: true with gValue and gEnd set; false when
 * JavaScript must parse the cell (then nothing is promised about gValue and gEnd). The bytes at and past
 * `end` must not be digits (a line end, or the byte the caller puts after its window), and 48 bytes past
 * any cell must be readable.
 */
export function cellFast(i: usize, end: usize, delim: u32): bool {
  const q = cellQuick(i, end, delim);
  return q < 0 ? cellScalar(i, end, delim) : q != 0;
}

// Right-aligning shuffles: row `len` moves bytes 0..len−1 to lanes 16−len..15 and zeroes the others.
const ALIGN: usize = memory.data(17 * 16, 16);
for (let len = 0; len <= 16; len++) {
  for (let k = 0; k < 16; k++) store<u8>(ALIGN + <usize>(len * 16 + k), k >= 16 - len ? <u8>(k - (16 - len)) : <u8>0xff);
}

/** The integer whose decimal digits are the first `len` (≤ 16) lanes of t (digit values 0–9). */
@inline function digitsValue(t: v128, len: i32): u64 {
  const d = i8x16.swizzle(t, v128.load(ALIGN + (<usize>len << 4)));
  // Pairs, then fours, then eights of digits, by multiply-and-add of adjacent lanes.
  const w10 = i16x8(10, 1, 10, 1, 10, 1, 10, 1);
  const p2a = i32x4.dot_i16x8_s(i16x8.extend_low_i8x16_u(d), w10);
  const p2b = i32x4.dot_i16x8_s(i16x8.extend_high_i8x16_u(d), w10);
  const p4 = i32x4.dot_i16x8_s(i16x8.narrow_i32x4_u(p2a, p2b), i16x8(100, 1, 100, 1, 100, 1, 100, 1));
  const p8 = i32x4.dot_i16x8_s(i16x8.narrow_i32x4_u(p4, p4), i16x8(10000, 1, 10000, 1, 10000, 1, 10000, 1));
  return <u64>i32x4.extract_lane(p8, 0) * 100000000 + <u64>i32x4.extract_lane(p8, 1);
}

/**
 * The common shapes of cellParse's grammar 16 bytes at a time: up to 15 integer digits, then optionally a
 * point and up to 31 digits. The digits D (integer part, then fraction) give the same quantities as the
 * byte loop of cellScalar: the significant digits run from the first to the last nonzero digit of D
 * (their count, M their value), the trailing zeros of D raise the exponent, the fraction digits lower it.
 * 1: done (gValue, gEnd); 0: JavaScript must parse the cell; −1: a shape for cellScalar.
 */
function cellQuick(i: usize, end: usize, delim: u32): i32 {
  const tabBlank = delim != TAB;
  i = cellStart(i, end, tabBlank);
  const neg = gNeg;
  const zero = i8x16.splat(0);
  const ten = i8x16.splat(10);
  const ascii0 = i8x16.splat(<i8>ZERO);
  const tI = i8x16.sub(v128.load(i), ascii0);
  const nInt = <i32>ctz(~i8x16.bitmask(i8x16.lt_u(tI, ten)));
  if (nInt >= 16) return -1;
  let nz: u64 = <u64>(i8x16.bitmask(i8x16.ne(tI, zero)) & ((1 << nInt) - 1));
  let j = i + <usize>nInt;
  let nFrac: i32 = 0;
  let tF1 = zero;
  let tF2 = zero;
  if (<u32>load<u8>(j) == DOT) {
    j++;
    tF1 = i8x16.sub(v128.load(j), ascii0);
    const n1 = <i32>ctz(~i8x16.bitmask(i8x16.lt_u(tF1, ten)));
    nz |= <u64>(i8x16.bitmask(i8x16.ne(tF1, zero)) & ((1 << n1) - 1)) << <u64>nInt;
    nFrac = n1;
    if (n1 == 16) {
      tF2 = i8x16.sub(v128.load(j + 16), ascii0);
      const n2 = <i32>ctz(~i8x16.bitmask(i8x16.lt_u(tF2, ten)));
      if (n2 >= 16) return -1;
      nz |= <u64>(i8x16.bitmask(i8x16.ne(tF2, zero)) & ((1 << n2) - 1)) << <u64>(nInt + 16);
      nFrac = 16 + n2;
    }
    j += <usize>nFrac;
  }
  const digits = nInt + nFrac;
  if (digits == 0) return -1;
  if (!cellEnding(j, end, delim, tabBlank)) return 0;
  const e = gExp;
  const i2 = gAt;
  let v: f64 = 0;
  if (nz != 0) {
    const first = <i32>ctz(nz);
    const last = 63 - <i32>clz(nz);
    const significant = last - first + 1;
    if (significant > 19) return 0; // Number() in JavaScript
    // M: the digits of D up to the last nonzero one (the zeros before the first add nothing).
    const upTo = last + 1;
    let M = digitsValue(tI, upTo < nInt ? upTo : nInt);
    let len = upTo - nInt;
    if (len > 0) {
      const len1 = len < 16 ? len : 16;
      M = M * unchecked(POW10U[len1]) + digitsValue(tF1, len1);
      len -= 16;
      if (len > 0) M = M * unchecked(POW10U[len]) + digitsValue(tF2, len);
    }
    const exp10 = e - nFrac + (digits - upTo);
    if (significant <= 15 && exp10 >= -22 && exp10 <= 22) {
      v = exp10 < 0 ? <f64>M / unchecked(POW10[-exp10]) : <f64>M * unchecked(POW10[exp10]);
    } else {
      v = decimalToDouble(M, exp10);
      if (v != v) return 0;
    }
  }
  gEnd = i2;
  gValue = neg ? -v : v;
  return 1;
}

/** cellParse's byte loop, for the shapes cellQuick leaves (long integer parts, long fractions). */
function cellScalar(i: usize, end: usize, delim: u32): bool {
  const tabBlank = delim != TAB;
  i = cellStart(i, end, tabBlank);
  const neg = gNeg;
  // Significant digits: the first 15 in mant, the next up to 4 in tail; zeros after a significant digit
  // wait in `zeros` (exactly as in cellParse).
  let mant: u64 = 0;
  let tail: u64 = 0;
  let tailDigits: i32 = 0;
  let significant: i32 = 0;
  let zeros: i32 = 0;
  let digits: i32 = 0;
  let dexp: i32 = 0;
  let fraction = false;
  for (; i < end; i++) {
    const c = <u32>load<u8>(i);
    const d = c - ZERO; // unsigned: bytes below '0' wrap to large values
    if (d > 9) {
      if (c == DOT && !fraction) {
        fraction = true;
        continue;
      }
      break;
    }
    digits++;
    if (fraction) dexp--;
    if (d == 0) {
      if (significant > 0) zeros++;
      continue;
    }
    while (zeros > 0 && significant < 15) {
      mant *= 10;
      significant++;
      zeros--;
    }
    if (significant < 15 && zeros == 0) {
      mant = mant * 10 + <u64>d;
      significant++;
      continue;
    }
    significant += zeros + 1;
    // More than 19 significant digits: JavaScript uses Number().
    if (significant > 19) return false;
    while (zeros > 0) {
      tail *= 10;
      tailDigits++;
      zeros--;
    }
    tail = tail * 10 + <u64>d;
    tailDigits++;
  }
  if (digits == 0) return false;
  if (!cellEnding(i, end, delim, tabBlank)) return false;
  const e = gExp;
  i = gAt;
  const exp10 = dexp + e + zeros; // zeros: trailing ones, not in M
  let v: f64;
  if (mant == 0) v = 0;
  else if (significant <= 15 && exp10 >= -22 && exp10 <= 22) {
    v = exp10 < 0 ? <f64>mant / unchecked(POW10[-exp10]) : <f64>mant * unchecked(POW10[exp10]);
  } else {
    v = decimalToDouble(mant * unchecked(POW10U[tailDigits]) + tail, exp10);
    if (v != v) return false;
  }
  gEnd = i;
  gValue = neg ? -v : v;
  return true;
}

/**
 * decimalToDouble(hi, lo, r, exp10) of engine/formats/decimalToDouble.ts for M = hi·10^r + lo < 10^19,
 * operation for operation (NaN: undecided). Its first steps turn (hi, lo, r) into the double-double
 * h + l = M exactly with h = fl(M) (exact products and sums of integers below 2^64, as its comments
 * show), which is (f64(M), M − f64(M)) here: the same two doubles, from the integer directly.
 */
function decimalToDouble(M: u64, exp10: i32): f64 {
  if (exp10 < -250 || exp10 + 19 > 300) return NaN;
  let h = <f64>M; // f64.convert_i64_u rounds to nearest, ties to even: fl(M)
  let l = <f64>(<i64>(M - <u64>h)); // |M − fl(M)| ≤ 2^10: exact
  let p: f64, c: f64, e: f64;
  if (h == 0) return 0;
  for (let k = exp10; k > 0; ) {
    const step = k < 22 ? k : 22;
    const q = unchecked(POW10[step]);
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
    const d = unchecked(POW10[step]);
    const q = h / d;
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
  const m = 2 * MARGIN * a;
  if (h + (l + m) == h && h + (l - m) == h) return h;
  return NaN;
}
