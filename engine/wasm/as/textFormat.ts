// Entry point of the 17-significant-digit number formatter (see engine/formats/csvWrite.ts and
// engine/wasm/textFormatWasm.ts): rows of doubles → CSV bytes, byte for byte what
// Number.prototype.toPrecision(17) (ECMA-262 §21.1.3.5) writes for non-integer columns and String(v) for
// integer columns. Values it does not handle (NaN, ±Infinity; in integer columns anything but an
// integer of magnitude < 2^53) stop the row loop so that JavaScript writes that row.
import { digits17, digitsExponent, mulHi64 } from './textFormatDigits';

// "00", "01", … "99" as little-endian u16 pairs of ASCII digits.
const DIG2: usize = memory.data(200);
for (let i = 0; i < 100; i++) store<u16>(DIG2 + (<usize>i << 1), <u16>((48 + i / 10) | ((48 + (i % 10)) << 8)));

export function textFormatVersion(): i32 {
  return 2;
}

/** First byte after the module's static data: callers keep their buffers above it. */
export function textFormatHeapBase(): i32 {
  return <i32>__heap_base;
}

let stopRow: i32 = -1;

/** Row where the last formatRows call stopped, or −1 when it wrote all its rows. */
export function formatStopRow(): i32 {
  return stopRow;
}

// Divisions by constants below are multiply-and-shift with m = ⌈2^s/d⌉, exact for v < 2^N when
// m·d − 2^s ≤ 2^(s−N) (Granlund & Montgomery 1994): /100 with s = 19 for v < 2^14 (m·d − 2^s = 12);
// /10000 with s = 45 for v < 2^32 (1168 ≤ 2^13); /10^8 with s = 57 for v < 2^30 (24144128 ≤ 2^27) and
// with s = 84 for v < 2^57 (4701184 ≤ 2^27).

@inline
function write4(p: usize, v: u32): void {
  const c = (v * 5243) >> 19; // v / 100, v < 10^4
  store<u16>(p, load<u16>(DIG2 + (<usize>c << 1)));
  store<u16>(p + 2, load<u16>(DIG2 + (<usize>(v - c * 100) << 1)));
}

@inline
function write8(p: usize, v: u32): void {
  const a = <u32>((<u64>v * 3518437209) >> 45); // v / 10^4
  write4(p, a);
  write4(p + 4, v - a * 10000);
}

/** The 17 digits of n (10^16 ≤ n < 10^17) at p. */
function write17(p: usize, n: u64): void {
  const hi = <u32>(mulHi64(n, 193428131138340668) >> 20); // n / 10^8 < 10^9
  const lo = <u32>(n - <u64>hi * 100000000);
  const d0 = <u32>((<u64>hi * 1441151881) >> 57); // hi / 10^8
  store<u8>(p, <u8>(48 + d0));
  write8(p + 1, hi - d0 * 100000000);
  write8(p + 9, lo);
}

/**
 * v as toPrecision(17) writes it, at p; returns the end, or 0 for NaN/±Infinity. May write garbage in the
 * 16 bytes after the end (the caller's buffer has room for it; later values overwrite it).
 */
function writeDouble(v: f64, p: usize): usize {
  const bits = reinterpret<u64>(v);
  const be = <i32>((bits >> 52) & 0x7ff);
  const frac = bits & 0xfffffffffffff;
  if (be == 0x7ff) return 0;
  if (be == 0 && frac == 0) {
    // ±0: "0.0000000000000000" (no sign for −0: §21.1.3.5 tests x < 0, false for −0)
    store<u16>(p, 0x2e30); // "0."
    store<u64>(p, 0x3030303030303030, 2);
    store<u64>(p, 0x3030303030303030, 10);
    return p + 18;
  }
  if (bits >> 63) {
    store<u8>(p, 45); // '-'
    p++;
  }
  const n = digits17(be == 0 ? frac : frac | 0x10000000000000, be == 0 ? -1074 : be - 1075);
  const e = digitsExponent;
  if (e >= 0 && e <= 16) {
    // fixed notation: e + 1 integer digits, then (for e < 16) '.' and the other 16 − e digits
    write17(p, n);
    if (e == 16) return p + 17;
    // move digits e + 1 … 16 one place right (two 8-byte words, both loaded before either is stored)
    const tail = p + <usize>(e + 1);
    const w0 = load<u64>(tail);
    const w1 = load<u64>(tail, 8);
    store<u64>(tail, w0, 1);
    store<u64>(tail, w1, 9);
    store<u8>(tail, 46); // '.'
    return p + 18;
  }
  if (e < 0 && e >= -6) {
    // "0." then −e − 1 zeros then the 17 digits
    store<u64>(p, 0x3030303030302e30); // "0.000000"
    const z = <usize>(-e - 1);
    write17(p + 2 + z, n);
    return p + 19 + z;
  }
  // exponential notation d.dddddddddddddddde±X
  write17(p + 1, n);
  store<u8>(p, load<u8>(p + 1));
  store<u8>(p + 1, 46);
  p += 18;
  store<u8>(p, 101); // 'e'
  store<u8>(p + 1, e < 0 ? 45 : 43);
  p += 2;
  const a = <u32>(e < 0 ? -e : e);
  if (a < 10) {
    store<u8>(p, <u8>(48 + a));
    return p + 1;
  }
  if (a < 100) {
    store<u16>(p, load<u16>(DIG2 + (<usize>a << 1)));
    return p + 2;
  }
  const h = (a * 5243) >> 19; // a / 100
  store<u8>(p, <u8>(48 + h));
  store<u16>(p + 1, load<u16>(DIG2 + (<usize>(a - h * 100) << 1)));
  return p + 3;
}

// Scratch for writeU32.
const DIGITS8: usize = memory.data(8);

/** w < 10^8 in decimal without leading zeros at p; returns the end (may write 7 bytes of scratch after it). */
function writeU32(p: usize, w: u32): usize {
  const len: u64 = w < 10000 ? (w < 100 ? (w < 10 ? 1 : 2) : w < 1000 ? 3 : 4) : w < 1000000 ? (w < 100000 ? 5 : 6) : w < 10000000 ? 7 : 8;
  // eight digits with leading zeros, then the last `len` of them (bytes are little-endian in the word)
  write8(DIGITS8, w);
  store<u64>(p, load<u64>(DIGITS8) >> ((8 - len) << 3));
  return p + <usize>len;
}

/** v as String(v) writes an integer of magnitude < 2^53, at p; returns the end, or 0 for anything else. */
function writeInteger(v: f64, p: usize): usize {
  if (!(Math.abs(v) < 9007199254740992.0)) return 0;
  let i = <i64>v;
  if (<f64>i != v) return 0;
  if (i < 0) {
    store<u8>(p, 45);
    p++;
    i = -i;
  }
  const u = <u64>i;
  if (u < 100000000) return writeU32(p, <u32>u);
  // u < 2^53: the digits above the last eight (< 10^8), then those eight.
  // (a true division: the multiply-high form here made the optimizing compiler take ~10 ms longer)
  const hi = <u32>(u / 100000000);
  p = writeU32(p, hi);
  write8(p, <u32>(u - <u64>hi * 100000000));
  return p + 8;
}

/**
 * Formats `rows` rows of `cols` columns as CSV lines at outPtr: values joined by ',' and each row ended
 * by '\n'. Column c is described by three u32 at colsPtr + 12c: the address of its first value (f64),
 * the distance between rows in values, and 1 for an integer column (else 0). Needs at most 26 bytes per
 * value and 32 bytes of room after the end (scratch, see writeDouble). Returns the bytes written; when a
 * value is not handled, stops before its row (formatStopRow() says which) and returns the bytes of the
 * rows before it.
 */
export function formatRows(colsPtr: usize, firstRow: i32, rows: i32, cols: i32, outPtr: usize): i32 {
  let p = outPtr;
  for (let r = firstRow; r < firstRow + rows; r++) {
    const rowStart = p;
    for (let c = 0; c < cols; c++) {
      const d = colsPtr + <usize>(c * 12);
      const v = load<f64>(<usize>load<u32>(d) + ((<usize>r * <usize>load<u32>(d, 4)) << 3));
      const end = load<u32>(d, 8) != 0 ? writeInteger(v, p) : writeDouble(v, p);
      if (end == 0) {
        stopRow = r;
        return <i32>(rowStart - outPtr);
      }
      store<u8>(end, c == cols - 1 ? 10 : 44);
      p = end + 1;
    }
  }
  stopRow = -1;
  return <i32>(p - outPtr);
}

/** Test hook: toPrecision(17) of one double at outPtr; returns the length (0 when not handled). */
export function formatDouble(v: f64, outPtr: usize): i32 {
  const end = writeDouble(v, outPtr);
  return end == 0 ? 0 : <i32>(end - outPtr);
}
