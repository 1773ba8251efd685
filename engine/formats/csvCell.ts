/**
 * One cell of delimited text (comma, tab or whitespace separated) → one double, straight from the bytes: the number grammar, the exact fast paths and the
 * fallback, with the outcome in a reusable state object (parsing a file allocates nothing per cell).
 */
import { decimalToDouble } from './decimalToDouble';
import { SnapshotFormatError, type SnapshotPlace } from './snapshot';

const TAB = 9;
const SPACE = 32;
const COMMA = 44;
const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const ZERO = 48;

/** 10^0 … 10^22: every one is exactly representable as a double. */
const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

/** Outcome of cellParse (reused for every cell of one read, so parsing allocates nothing). */
export interface CellState {
  value: number;
  /** A decoded window of the file, bytes [textBegin, textEnd), for numbers off the fast path. */
  text: string;
  textBegin: number;
  textEnd: number;
  /** Whether the window is pure ASCII (then string index = byte index − textBegin). */
  textAscii: boolean;
  /** Index just past the cell: at the delimiter (comma, tab, or the first blank) or the line end. */
  end: number;
  /** 0 fine, 1 empty, 2 not a number, 3 NaN/Inf written out, 4 overflows to ±Infinity. */
  error: number;
}

export const CELL_OK = 0;
export const CELL_EMPTY = 1;
export const CELL_NAN = 2;
export const CELL_NONFINITE = 3;
export const CELL_OVERFLOW = 4;

/** Space or tab. */
export function isBlank(c: number): boolean {
  return c === SPACE || c === TAB;
}

/** Delimiter codes: a comma, a tab, or (DELIM_WHITESPACE) any run of spaces and tabs. */
export const DELIM_COMMA = COMMA;
export const DELIM_TAB = TAB;
export const DELIM_WHITESPACE = SPACE;

/** Index of the end of the cell starting at `i` (the next delimiter, or `end`). */
export function cellEndFind(b: Uint8Array, i: number, end: number, delim: number): number {
  if (delim === SPACE) {
    while (i < end && !isBlank(b[i])) i++;
    return i;
  }
  const k = b.indexOf(delim, i);
  return k < 0 || k > end ? end : k;
}

function latin1(b: Uint8Array, begin: number, end: number): string {
  let s = '';
  for (let i = begin; i < end; i++) s += String.fromCharCode(b[i]);
  return s;
}

const WINDOW = 1 << 20;
/** Made on first use: most files never leave the fast paths, and a decoder costs time to set up. */
let utf8: TextDecoder | null = null;

/**
 * The text of b[begin..end) (already checked to be ASCII digits, signs, point, e). Decodes the file a
 * window at a time (decoding ASCII in bulk is far cheaper than per cell) and cuts substrings from it.
 */
function slowText(b: Uint8Array, begin: number, end: number, st: CellState): string {
  if (begin < st.textBegin || end > st.textEnd) {
    st.textBegin = begin;
    st.textEnd = Math.min(b.length, Math.max(end, begin + WINDOW));
    utf8 ??= new TextDecoder('utf-8');
    st.text = utf8.decode(b.subarray(st.textBegin, st.textEnd));
    // Equal lengths ⇔ every byte decoded to one UTF-16 unit (any multi-byte or invalid run shortens it).
    st.textAscii = st.text.length === st.textEnd - st.textBegin;
  }
  return st.textAscii ? st.text.substring(begin - st.textBegin, end - st.textBegin) : latin1(b, begin, end);
}

/**
 * Parses the decimal number in b[i..) up to the next delimiter or `end` into st. Grammar: blanks,
 * [+-], digits with an optional point (at least one digit), optional exponent [eE][+-]digits, blanks.
 * Up to 15 significant digits and |exponent| ≤ 22 take one exact multiply or divide, which IEEE
 * rounding makes correctly rounded (Clinger 1990, "How to read floating point numbers accurately",
 * PLDI '90, the fast path); up to 19 digits go through decimalToDouble; whatever that cannot decide,
 * and longer numbers, go to Number() (ECMA-262 StringToNumber, also correctly rounded).
 */
export function cellParse(b: Uint8Array, i: number, end: number, st: CellState, delim: number = COMMA): void {
  while (i < end && (b[i] === SPACE || (b[i] === TAB && delim !== TAB))) i++;
  const start = i;
  let neg = false;
  if (i < end && (b[i] === PLUS || b[i] === MINUS)) {
    neg = b[i] === MINUS;
    i++;
  }
  // Significant digits: the first 15 in `mant`, the next up to 4 in `tail` (M = mant·10^tailDigits + tail).
  // Zeros after a significant digit wait in `zeros` and enter M only when a nonzero digit follows, so
  // trailing zeros (0.25000000000000000000) scale the exponent instead of counting as digits.
  let mant = 0;
  let tail = 0;
  let tailDigits = 0;
  let significant = 0;
  let zeros = 0;
  let digits = 0;
  let dexp = 0;
  let fraction = false;
  for (; i < end; i++) {
    const c = b[i];
    const d = c - ZERO;
    if (d < 0 || d > 9) {
      if (c === DOT && !fraction) {
        fraction = true;
        continue;
      }
      break;
    }
    digits++;
    if (fraction) dexp--;
    if (d === 0) {
      if (significant > 0) zeros++;
      continue;
    }
    // A nonzero digit: first the zeros it follows, then the digit itself.
    while (zeros > 0 && significant < 15) {
      mant *= 10;
      significant++;
      zeros--;
    }
    if (significant < 15 && zeros === 0) {
      mant = mant * 10 + d;
      significant++;
      continue;
    }
    significant += zeros + 1;
    if (significant <= 19) {
      while (zeros > 0) {
        tail *= 10;
        tailDigits++;
        zeros--;
      }
      tail = tail * 10 + d;
      tailDigits++;
    }
    zeros = 0;
  }
  let ok = digits > 0;
  let e = 0;
  if (ok && i < end && (b[i] | 32) === 101) {
    i++;
    let eneg = false;
    if (i < end && (b[i] === PLUS || b[i] === MINUS)) {
      eneg = b[i] === MINUS;
      i++;
    }
    let edigits = 0;
    while (i < end) {
      const d = b[i] - ZERO;
      if (d < 0 || d > 9) break;
      if (e < 100000) e = e * 10 + d;
      edigits++;
      i++;
    }
    if (edigits === 0) ok = false;
    if (eneg) e = -e;
  }
  const numberEnd = i;
  if (delim === SPACE) {
    if (i < end && !isBlank(b[i])) ok = false;
  } else {
    while (i < end && (b[i] === SPACE || (b[i] === TAB && delim !== TAB))) i++;
    if (i < end && b[i] !== delim) ok = false;
  }
  if (!ok) {
    const stop = cellEndFind(b, start, end, delim);
    st.end = stop;
    let textEnd = stop;
    while (textEnd > start && isBlank(b[textEnd - 1])) textEnd--;
    if (textEnd === start) {
      st.error = CELL_EMPTY;
    } else {
      const word = latin1(b, start, textEnd).toLowerCase().replace(/^[+-]/, '');
      st.error = word === 'nan' || word === 'inf' || word === 'infinity' ? CELL_NONFINITE : CELL_NAN;
    }
    st.value = NaN;
    return;
  }
  st.end = i;
  st.error = CELL_OK;
  const exp10 = dexp + e + zeros; // zeros: trailing ones, not in M
  let v: number;
  if (mant === 0) v = 0;
  else if (significant <= 15 && exp10 >= -22 && exp10 <= 22) v = exp10 < 0 ? mant / POW10[-exp10] : mant * POW10[exp10];
  else v = significant <= 19 ? decimalToDouble(mant, tail, tailDigits, exp10) : NaN;
  if (v !== v) {
    st.value = Number(slowText(b, start, numberEnd, st));
    if (!Number.isFinite(st.value)) st.error = CELL_OVERFLOW;
    return;
  }
  st.value = neg ? -v : v;
}

/** The error for a cell that cellParse refused (st.error ≠ CELL_OK), quoting the cell. */
export function cellError(file: string, b: Uint8Array, begin: number, st: CellState, place: SnapshotPlace): SnapshotFormatError {
  let textBegin = begin, textEnd = st.end;
  while (textBegin < textEnd && isBlank(b[textBegin])) textBegin++;
  while (textEnd > textBegin && isBlank(b[textEnd - 1])) textEnd--;
  let text = new TextDecoder('utf-8').decode(b.subarray(textBegin, Math.min(textEnd, textBegin + 40)));
  if (textEnd > textBegin + 40) text += '…';
  const shown = JSON.stringify(text);
  const reason =
    st.error === CELL_EMPTY
      ? 'the cell is empty'
      : st.error === CELL_NONFINITE
        ? `${shown} is not a finite number (NaN and Inf are not allowed)`
        : st.error === CELL_OVERFLOW
          ? `${shown} is too large for a double (overflows to infinity)`
          : `${shown} is not a number`;
  return new SnapshotFormatError(file, reason, place);
}

/** A fresh state for cellParse, one per file read. */
export function cellStateMake(): CellState {
  return { value: 0, text: '', textBegin: 0, textEnd: 0, textAscii: true, end: 0, error: 0 };
}
