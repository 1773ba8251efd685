/**
 * Comma-separated snapshots: an optional UTF-8 byte-order mark, a header row naming the columns, one
 * particle per data row. Blank lines and lines starting with # are skipped; LF or CRLF line ends;
 * spaces and tabs around cells are ignored; columns the mapping does not use are not looked at.
 * Parses bytes straight into typed arrays: one pass, no per-row objects or strings.
 */
import type { SnapshotReader } from './reader';
import { decimalToDouble } from './decimalToDouble';
import { type ColumnMapping, type ColumnRef, type Snapshot, SnapshotFormatError } from './snapshot';

const LF = 10;
const CR = 13;
const TAB = 9;
const SPACE = 32;
const HASH = 35;
const COMMA = 44;
const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const ZERO = 48;

/** 10^0 … 10^22: every one is exactly representable as a double. */
const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

/** Outcome of cellParse (reused for every cell of one read, so parsing allocates nothing). */
interface CellState {
  value: number;
  /** A decoded window of the file, bytes [textBegin, textEnd), for numbers off the fast path. */
  text: string;
  textBegin: number;
  textEnd: number;
  /** Whether the window is pure ASCII (then string index = byte index − textBegin). */
  textAscii: boolean;
  /** Index just past the cell: at the comma or the line end. */
  end: number;
  /** 0 fine, 1 empty, 2 not a number, 3 NaN/Inf written out, 4 overflows to ±Infinity. */
  error: number;
}

const CELL_OK = 0;
const CELL_EMPTY = 1;
const CELL_NAN = 2;
const CELL_NONFINITE = 3;
const CELL_OVERFLOW = 4;

function isBlank(c: number): boolean {
  return c === SPACE || c === TAB;
}

function latin1(b: Uint8Array, begin: number, end: number): string {
  let s = '';
  for (let i = begin; i < end; i++) s += String.fromCharCode(b[i]);
  return s;
}

const WINDOW = 1 << 20;
const utf8 = new TextDecoder('utf-8');

/**
 * The text of b[begin..end) (already checked to be ASCII digits, signs, point, e). Decodes the file a
 * window at a time (decoding ASCII in bulk is far cheaper than per cell) and cuts substrings from it.
 */
function slowText(b: Uint8Array, begin: number, end: number, st: CellState): string {
  if (begin < st.textBegin || end > st.textEnd) {
    st.textBegin = begin;
    st.textEnd = Math.min(b.length, Math.max(end, begin + WINDOW));
    st.text = utf8.decode(b.subarray(st.textBegin, st.textEnd));
    // Equal lengths ⇔ every byte decoded to one UTF-16 unit (any multi-byte or invalid run shortens it).
    st.textAscii = st.text.length === st.textEnd - st.textBegin;
  }
  return st.textAscii ? st.text.substring(begin - st.textBegin, end - st.textBegin) : latin1(b, begin, end);
}

/**
 * Parses the decimal number in b[i..) up to the next comma or `end` into st. Grammar: blanks,
 * [+-], digits with an optional point (at least one digit), optional exponent [eE][+-]digits, blanks.
 * Up to 15 significant digits and |exponent| ≤ 22 take one exact multiply or divide, which IEEE
 * rounding makes correctly rounded (Clinger 1990, "How to read floating point numbers accurately",
 * PLDI '90, the fast path); up to 19 digits go through decimalToDouble; whatever that cannot decide,
 * and longer numbers, go to Number() (ECMA-262 StringToNumber, also correctly rounded).
 */
function cellParse(b: Uint8Array, i: number, end: number, st: CellState): void {
  while (i < end && isBlank(b[i])) i++;
  const start = i;
  let neg = false;
  if (i < end && (b[i] === PLUS || b[i] === MINUS)) {
    neg = b[i] === MINUS;
    i++;
  }
  // Significant digits: the first 15 in `mant`, the next up to 4 in `tail` (M = mant·10^tailDigits + tail).
  let mant = 0;
  let tail = 0;
  let tailDigits = 0;
  let significant = 0;
  let digits = 0;
  let dexp = 0;
  while (i < end) {
    const d = b[i] - ZERO;
    if (d < 0 || d > 9) break;
    digits++;
    if (significant > 0 || d !== 0) {
      significant++;
      if (significant <= 15) mant = mant * 10 + d;
      else if (significant <= 19) {
        tail = tail * 10 + d;
        tailDigits++;
      }
    }
    i++;
  }
  if (i < end && b[i] === DOT) {
    i++;
    while (i < end) {
      const d = b[i] - ZERO;
      if (d < 0 || d > 9) break;
      digits++;
      dexp--;
      if (significant > 0 || d !== 0) {
        significant++;
        if (significant <= 15) mant = mant * 10 + d;
        else if (significant <= 19) {
          tail = tail * 10 + d;
          tailDigits++;
        }
      }
      i++;
    }
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
  while (i < end && isBlank(b[i])) i++;
  if (i < end && b[i] !== COMMA) ok = false;
  if (!ok) {
    let stop = b.indexOf(COMMA, start);
    if (stop < 0 || stop > end) stop = end;
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
  const exp10 = dexp + e;
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

/** Index of the next LF at or after `from`, or the length when there is none. */
function lineEndFind(b: Uint8Array, from: number): number {
  const k = b.indexOf(LF, from);
  return k < 0 ? b.length : k;
}

/** Content end of a line (drops a CR before the LF). */
function contentEnd(b: Uint8Array, begin: number, lineEnd: number): number {
  return lineEnd > begin && b[lineEnd - 1] === CR ? lineEnd - 1 : lineEnd;
}

/** Whether the line holds nothing but blanks, or is a comment. */
function lineSkippable(b: Uint8Array, begin: number, end: number): boolean {
  let i = begin;
  while (i < end && isBlank(b[i])) i++;
  return i === end || b[i] === HASH;
}

const NUMBER_LIKE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$/i;

/** Header cell → column name: trimmed, surrounding double quotes removed. */
function headerName(cell: string): string {
  const t = cell.trim();
  return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).trim() : t;
}

/** Slots a column can feed: 0–2 position, 3 mass, 4–6 acceleration, 7 id. */
const SLOT_NAMES = ['position x', 'position y', 'position z', 'mass', 'acceleration x', 'acceleration y', 'acceleration z', 'id'];

interface Layout {
  /** Slot of each column up to the last used one (−1 = unused). */
  readonly slotOf: Int32Array;
  readonly massColumn: string | null;
  readonly hasAcc: boolean;
  readonly hasIds: boolean;
}

function layoutResolve(file: string, columns: readonly string[], header: boolean, headerRow: number, mapping: ColumnMapping): Layout {
  const lower = columns.map((c) => c.toLowerCase());
  const place = header ? { row: headerRow } : {};
  const find = (ref: ColumnRef, what: string): number => {
    if (typeof ref === 'number') {
      if (!Number.isInteger(ref) || ref < 0 || ref >= columns.length) {
        throw new SnapshotFormatError(file, `${what} is mapped to column ${ref}, but the rows have columns 0 to ${columns.length - 1}`, { ...place, column: String(ref) });
      }
      return ref;
    }
    if (!header) {
      throw new SnapshotFormatError(
        file,
        `the first data line holds numbers, not column names: add a header row naming the columns (x,y,z and optionally m)`,
        { row: headerRow },
      );
    }
    const key = ref.toLowerCase();
    const at = lower.indexOf(key);
    if (at < 0) {
      throw new SnapshotFormatError(file, `the header names no column "${ref}" (needed for ${what}); it has: ${columns.join(', ')}`, { ...place, column: ref });
    }
    const again = lower.indexOf(key, at + 1);
    if (again >= 0) throw new SnapshotFormatError(file, `column "${ref}" appears twice in the header (columns ${at} and ${again}), so ${what} is ambiguous`, { ...place, column: ref });
    return at;
  };
  const wanted: [number, number][] = [];
  const pos = mapping.positions ?? ['x', 'y', 'z'];
  pos.forEach((ref, d) => wanted.push([find(ref, SLOT_NAMES[d]), d]));
  let massColumn: string | null = null;
  if (mapping.mass !== null) {
    let ref: ColumnRef | undefined = mapping.mass;
    if (ref === undefined && header) {
      const hasM = lower.includes('m');
      const hasMass = lower.includes('mass');
      if (hasM && hasMass) throw new SnapshotFormatError(file, 'the header has both an "m" and a "mass" column; keep one', { ...place, column: 'mass' });
      ref = hasM ? 'm' : hasMass ? 'mass' : undefined;
    }
    if (ref !== undefined) {
      const k = find(ref, 'mass');
      wanted.push([k, 3]);
      massColumn = columns[k];
    }
  }
  if (mapping.accelerations) mapping.accelerations.forEach((ref, d) => wanted.push([find(ref, SLOT_NAMES[4 + d]), 4 + d]));
  if (mapping.ids !== undefined) wanted.push([find(mapping.ids, 'id'), 7]);
  const last = Math.max(...wanted.map(([k]) => k));
  const slotOf = new Int32Array(last + 1).fill(-1);
  for (const [k, slot] of wanted) {
    if (slotOf[k] >= 0) {
      throw new SnapshotFormatError(file, `column ${k} is mapped to both ${SLOT_NAMES[slotOf[k]]} and ${SLOT_NAMES[slot]}`, { ...place, column: columns[k] });
    }
    slotOf[k] = slot;
  }
  return { slotOf, massColumn, hasAcc: mapping.accelerations !== undefined, hasIds: mapping.ids !== undefined };
}

/** Reads CSV bytes into a Snapshot (positions, masses and any mapped columns, in file units). */
export function csvRead(bytes: Uint8Array, fileName: string, mapping: ColumnMapping = {}): Snapshot {
  const b = bytes;
  const massDefault = mapping.massDefault ?? 1;
  if (!Number.isFinite(massDefault)) throw new SnapshotFormatError(fileName, `default mass must be finite, got ${massDefault}`);
  let pos = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  let line = 0;

  // First meaningful line: the header, unless every cell in it is a number.
  let firstBegin = -1, firstEnd = -1, firstLineEnd = -1;
  while (pos < b.length) {
    const lineEnd = lineEndFind(b, pos);
    const end = contentEnd(b, pos, lineEnd);
    line++;
    if (!lineSkippable(b, pos, end)) {
      firstBegin = pos;
      firstEnd = end;
      firstLineEnd = lineEnd;
      break;
    }
    pos = lineEnd + 1;
  }
  if (firstBegin < 0) throw new SnapshotFormatError(fileName, 'the file is empty (no header row, no data)');
  const firstCells = new TextDecoder('utf-8').decode(b.subarray(firstBegin, firstEnd)).split(',');
  const header = !firstCells.every((c) => NUMBER_LIKE.test(c.trim()));
  const columns = header ? firstCells.map(headerName) : firstCells.map((_, k) => String(k));
  const headerRow = line;
  const layout = layoutResolve(fileName, columns, header, headerRow, mapping);
  if (header) pos = firstLineEnd + 1;
  else {
    pos = firstBegin;
    line--;
  }

  // Capacity: one particle per remaining line at most.
  let capacity = 1;
  for (let k = b.indexOf(LF, pos); k >= 0; k = b.indexOf(LF, k + 1)) capacity++;
  const positions = new Float64Array(3 * capacity);
  const masses = new Float64Array(capacity);
  const acc = layout.hasAcc ? new Float64Array(3 * capacity) : null;
  const ids = layout.hasIds ? new Float64Array(capacity) : null;
  const lines = new Int32Array(capacity);
  if (layout.massColumn === null) masses.fill(massDefault);

  const { slotOf } = layout;
  const lastColumn = slotOf.length - 1;
  const st: CellState = { value: 0, text: '', textBegin: 0, textEnd: 0, textAscii: true, end: 0, error: 0 };
  let n = 0;
  while (pos < b.length) {
    const lineEnd = lineEndFind(b, pos);
    const end = contentEnd(b, pos, lineEnd);
    line++;
    if (lineSkippable(b, pos, end)) {
      pos = lineEnd + 1;
      continue;
    }
    let i = pos;
    for (let col = 0; ; col++) {
      const slot = slotOf[col];
      if (slot >= 0) {
        cellParse(b, i, end, st);
        if (st.error !== CELL_OK) throw cellError(fileName, b, i, st, { row: line, particle: n, column: columns[col] });
        const v = st.value;
        if (slot < 3) positions[3 * n + slot] = v;
        else if (slot === 3) masses[n] = v;
        else if (slot < 7) acc![3 * n + slot - 4] = v;
        else {
          if (!Number.isInteger(v)) throw new SnapshotFormatError(fileName, `id ${v} is not an integer`, { row: line, particle: n, column: columns[col] });
          ids![n] = v;
        }
        i = st.end;
      } else {
        const k = b.indexOf(COMMA, i);
        i = k < 0 || k > end ? end : k;
      }
      if (col === lastColumn) break;
      if (i >= end) {
        let missing = col + 1;
        while (slotOf[missing] < 0) missing++;
        throw new SnapshotFormatError(fileName, `the row has only ${col + 1} cell${col === 0 ? '' : 's'}; ${SLOT_NAMES[slotOf[missing]]} is missing`, {
          row: line,
          particle: n,
          column: columns[missing],
        });
      }
      i++; // past the comma
    }
    lines[n] = line;
    n++;
    pos = lineEnd + 1;
  }
  if (n === 0) throw new SnapshotFormatError(fileName, 'the file has a header row but no particle rows', { row: headerRow });
  const trim = <T extends Float64Array | Int32Array>(a: T, per: number): T => (a.length === per * n ? a : (a.slice(0, per * n) as T));
  return {
    format: 'csv',
    count: n,
    positions: trim(positions, 3),
    masses: trim(masses, 1),
    ...(acc ? { accelerations: trim(acc, 3) } : {}),
    ...(ids ? { ids: trim(ids, 1) } : {}),
    columns,
    massColumn: layout.massColumn,
    lines: trim(lines, 1),
  };
}

function cellError(file: string, b: Uint8Array, begin: number, st: CellState, place: { row: number; particle: number; column: string }): SnapshotFormatError {
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

/** True when the first bytes contain a NUL (binary data, not text). */
function looksBinary(b: Uint8Array): boolean {
  const n = Math.min(b.length, 4096);
  for (let i = 0; i < n; i++) if (b[i] === 0) return true;
  return false;
}

/** The CSV reader: claims .csv files, and other text files whose first meaningful line has a comma. */
export const csvReader: SnapshotReader = {
  name: 'csv',
  description: 'comma-separated text with a header row naming x,y,z (and m or mass)',
  extensions: ['.csv'],
  sniff(bytes: Uint8Array, fileName: string): boolean {
    if (looksBinary(bytes)) return false;
    if (fileName.toLowerCase().endsWith('.csv')) return true;
    let pos = 0;
    while (pos < bytes.length) {
      const lineEnd = lineEndFind(bytes, pos);
      const end = contentEnd(bytes, pos, lineEnd);
      if (!lineSkippable(bytes, pos, end)) {
        const k = bytes.indexOf(COMMA, pos);
        return k >= 0 && k < end;
      }
      pos = lineEnd + 1;
    }
    return false;
  },
  read: csvRead,
};
