/**
 * Comma-separated snapshots: an optional UTF-8 byte-order mark, a header row naming the columns, one
 * particle per data row. Blank lines and lines starting with # are skipped; LF or CRLF line ends;
 * spaces and tabs around cells are ignored; columns the mapping does not use are not looked at.
 * Parses bytes straight into typed arrays: one pass, no per-row objects or strings.
 */
import { CELL_OK, cellError, cellParse, cellStateMake, isBlank } from './csvCell';
import { NUMBER_LIKE, SLOT_NAMES, headerName, layoutResolve } from './csvColumns';
import type { SnapshotReader } from './reader';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';

const LF = 10;
const CR = 13;
const HASH = 35;
const COMMA = 44;

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

/** Reads CSV bytes into a Snapshot (positions, masses and any mapped columns, in file units). */
export function csvRead(bytes: Uint8Array, fileName: string, mapping: ColumnMapping = {}): Snapshot {
  const b = bytes;
  const massDefault = mapping.massDefault ?? 1;
  if (!Number.isFinite(massDefault)) throw new SnapshotFormatError(fileName, `default mass must be finite, got ${massDefault}`);
  let pos = b.length >= 3 && b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  if (b.indexOf(LF) < 0 && b.indexOf(CR) >= 0) {
    throw new SnapshotFormatError(fileName, 'lines end in CR alone (old Mac style); save the file with LF or CRLF line ends');
  }
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
  let capacity = b.length > pos && b[b.length - 1] !== LF ? 1 : 0;
  for (let k = b.indexOf(LF, pos); k >= 0; k = b.indexOf(LF, k + 1)) capacity++;
  const positions = new Float64Array(3 * capacity);
  const masses = new Float64Array(capacity);
  const acc = layout.hasAcc ? new Float64Array(3 * capacity) : null;
  const ids = layout.hasIds ? new Float64Array(capacity) : null;
  const lines = new Int32Array(capacity);
  if (layout.massColumn === null) masses.fill(massDefault);

  const { slotOf } = layout;
  const lastColumn = slotOf.length - 1;
  const st = cellStateMake();
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
