/**
 * Data rows of delimited text → typed arrays, fed in pieces (so a file can be streamed, gzip or not).
 * One pass over the bytes, no per-row objects or strings; a line split between two pieces is carried
 * over (only that line is copied). Keeps every `every`-th data row when subsampling.
 * Where WebAssembly is available, runs of rows whose cells all take the fast paths are parsed by its
 * twin of this loop (engine/wasm/textParseWasm.ts; same bits); each row it stops at is parsed here.
 */
import { CELL_OK, DELIM_WHITESPACE, cellEndFind, cellError, cellParse, cellStateMake, isBlank } from './csvCell';
import { type Layout, SLOT_NAMES } from './csvColumns';
import { SnapshotFormatError } from './snapshot';
import { contentEnd, lineSkippable } from './textHead';
import { textRowsWasmMake } from '../wasm/textParseWasm';

const LF = 10;

/** Arrays of a finished parse, trimmed to the particle count. */
export interface TextRowsResult {
  readonly count: number;
  /** Data rows in the file (before subsampling). */
  readonly total: number;
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly accelerations?: Float64Array;
  readonly ids?: Float64Array;
  readonly softening?: Float64Array;
  readonly lines: Int32Array;
}

/** The parser: push() pieces of the data part of the file in order, then finish(). */
export interface TextRowParser {
  push(piece: Uint8Array): void;
  finish(): TextRowsResult;
}

/**
 * A row parser for `columns` laid out by `layout`; `line` is the number of lines before the data part,
 * `capacity` a guess of the rows to keep (arrays grow by half when it is exceeded).
 */
export function textRowParserMake(
  fileName: string,
  columns: readonly string[],
  layout: Layout,
  delim: number,
  line: number,
  capacity: number,
  massDefault: number,
  every = 1,
): TextRowParser {
  let cap = Math.max(16, Math.ceil(capacity));
  let positions = new Float64Array(3 * cap);
  let masses = new Float64Array(cap);
  let acc = layout.hasAcc ? new Float64Array(3 * cap) : null;
  let ids = layout.hasIds ? new Float64Array(cap) : null;
  let soft = layout.hasSoftening ? new Float64Array(cap) : null;
  let lines = new Int32Array(cap);
  const massFromColumn = layout.massColumn !== null;
  const { slotOf } = layout;
  const lastColumn = slotOf.length - 1;
  const st = cellStateMake();
  const whitespace = delim === DELIM_WHITESPACE;
  let n = 0;
  let rows = 0;
  let carry: Uint8Array | null = null;
  let wasm = textRowsWasmMake(slotOf, delim, every);
  /** Rows stored by WebAssembly, and rows it handed back to the code below (when these are most, it is dropped). */
  let wasmKept = 0;
  let jsRows = 0;

  function grow(): void {
    const next = Math.ceil(cap * 1.5) + 16;
    const g = <T extends Float64Array | Int32Array>(a: T, per: number): T => {
      const b = new (a.constructor as { new (n: number): T })(per * next);
      b.set(a);
      return b;
    };
    positions = g(positions, 3);
    masses = g(masses, 1);
    if (acc) acc = g(acc, 3);
    if (ids) ids = g(ids, 1);
    if (soft) soft = g(soft, 1);
    lines = g(lines, 1);
    cap = next;
  }

  let lastBuffer: Uint8Array | null = null;

  /** The cells of one data row b[pos, end) into the arrays at particle n (a function of its own: optimised early). */
  function rowCells(b: Uint8Array, pos: number, end: number): void {
    let i = pos;
    if (whitespace) while (i < end && isBlank(b[i])) i++;
    for (let col = 0; ; col++) {
      const slot = slotOf[col];
      if (slot >= 0) {
        cellParse(b, i, end, st, delim);
        if (st.error !== CELL_OK) throw cellError(fileName, b, i, st, { row: line, particle: n, column: columns[col] });
        const v = st.value;
        if (slot < 3) positions[3 * n + slot] = v;
        else if (slot === 3) masses[n] = v;
        else if (slot < 7) acc![3 * n + slot - 4] = v;
        else if (slot === 7) {
          if (!Number.isInteger(v)) throw new SnapshotFormatError(fileName, `id ${v} is not an integer`, { row: line, particle: n, column: columns[col] });
          ids![n] = v;
        } else soft![n] = v;
        i = st.end;
      } else i = cellEndFind(b, i, end, delim);
      if (col === lastColumn) break;
      if (whitespace) while (i < end && isBlank(b[i])) i++;
      else if (i < end) i++; // past the delimiter
      else i = end + 1;
      if (i > end || (whitespace && i === end)) {
        let missing = col + 1;
        while (slotOf[missing] < 0) missing++;
        throw new SnapshotFormatError(fileName, `the row has only ${col + 1} cell${col === 0 ? '' : 's'}; ${SLOT_NAMES[slotOf[missing]]} is missing`, {
          row: line,
          particle: n,
          column: columns[missing],
        });
      }
    }
  }

  /** Lines from b[pos] on through WebAssembly while it can parse them; returns where it stopped. */
  function wasmRows(w: NonNullable<typeof wasm>, b: Uint8Array, pos: number, limit: number): number {
    do {
      pos = w.run(b, pos, limit, line, rows % every, cap - n);
      const k = w.kept;
      if (k > 0) {
        w.take(n, positions, massFromColumn ? masses : null, acc, ids, soft, lines);
        if (!massFromColumn) masses.fill(massDefault, n, n + k);
        n += k;
        wasmKept += k;
      }
      line += w.lines;
      rows += w.rows;
    } while (w.more);
    return pos;
  }

  /** Parses the lines in b[pos, limit) (the last one may lack its LF at the end of the file). */
  function parse(b: Uint8Array, pos: number, limit: number): void {
    if (b !== lastBuffer) {
      // The cell parser caches decoded text by byte offsets: forget it when the buffer changes.
      st.textBegin = 0;
      st.textEnd = 0;
      lastBuffer = b;
    }
    wasm?.forget(); // a reused buffer may hold new bytes
    while (pos < limit) {
      if (wasm) {
        pos = wasmRows(wasm, b, pos, limit);
        if (pos >= limit) break;
        if (++jsRows > 1024 && jsRows > wasmKept) wasm = null; // mostly slow rows: stay in JavaScript
      }
      let lineEnd = b.indexOf(LF, pos);
      if (lineEnd < 0 || lineEnd > limit) lineEnd = limit;
      const end = contentEnd(b, pos, lineEnd);
      line++;
      if (lineSkippable(b, pos, end)) {
        pos = lineEnd + 1;
        continue;
      }
      const keep = rows % every === 0;
      rows++;
      if (!keep) {
        pos = lineEnd + 1;
        continue;
      }
      if (n === cap) grow();
      rowCells(b, pos, end);
      if (!massFromColumn) masses[n] = massDefault;
      lines[n] = line;
      n++;
      pos = lineEnd + 1;
    }
  }

  return {
    push(piece: Uint8Array): void {
      if (piece.length === 0) return;
      let b = piece;
      if (carry) {
        const lf = piece.indexOf(LF);
        if (lf < 0) {
          const joined = new Uint8Array(carry.length + piece.length);
          joined.set(carry);
          joined.set(piece, carry.length);
          carry = joined;
          return;
        }
        const first = new Uint8Array(carry.length + lf + 1);
        first.set(carry);
        first.set(piece.subarray(0, lf + 1), carry.length);
        carry = null;
        parse(first, 0, first.length);
        b = piece.subarray(lf + 1);
      }
      const last = b.lastIndexOf(LF);
      if (last >= 0) parse(b, 0, last + 1);
      if (last + 1 < b.length) carry = b.slice(last + 1);
    },
    finish(): TextRowsResult {
      if (carry) {
        const c = carry;
        carry = null;
        parse(c, 0, c.length);
      }
      // A view when at most 1% (+16 rows) is spare, else a trimmed copy: no second copy of the data
      // for the usual exact or near-exact capacity.
      const view = cap - n <= 16 + cap / 100;
      const trim = <T extends Float64Array | Int32Array>(a: T, per: number): T =>
        a.length === per * n ? a : ((view ? a.subarray(0, per * n) : a.slice(0, per * n)) as T);
      return {
        count: n,
        total: rows,
        positions: trim(positions, 3),
        masses: trim(masses, 1),
        ...(acc ? { accelerations: trim(acc, 3) } : {}),
        ...(ids ? { ids: trim(ids, 1) } : {}),
        ...(soft ? { softening: trim(soft, 1) } : {}),
        lines: trim(lines, 1),
      };
    },
  };
}
