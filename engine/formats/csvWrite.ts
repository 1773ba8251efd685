/**
 * Writing columns of numbers as CSV text. Non-integer columns use 17 significant digits
 * (toPrecision(17)), which is enough for every IEEE-754 double to read back bit for bit (IEEE 754-2008
 * §5.12.2: 17 significant decimal digits round-trip binary64).
 *
 * csvChunksBytes writes the same text as bytes, formatted in WebAssembly (engine/wasm/textFormatWasm.ts:
 * exact integer arithmetic, the same digits as toPrecision(17)) where available, else by the string
 * functions here; the bytes are identical either way.
 */
import { TEXT_FORMAT_BASE, TEXT_FORMAT_BYTES_PER_VALUE, TEXT_FORMAT_SLACK, textFormatInstance, textFormatReserve } from '../wasm/textFormatWasm';

/** One output column: values[offset + stride·row] for each row (stride 3 picks x, y or z from xyz). */
export interface CsvColumn {
  readonly name: string;
  readonly values: ArrayLike<number>;
  readonly stride?: number;
  readonly offset?: number;
  /** Write as an integer (ids); values must be integers. */
  readonly integer?: boolean;
}

/** The header line: column names joined by commas, LF-terminated. */
export function csvHeader(columns: readonly CsvColumn[]): string {
  return columns.map((c) => c.name).join(',') + '\n';
}

/** Rows [begin, end) as LF-terminated CSV lines (no header). */
export function csvRows(columns: readonly CsvColumn[], begin: number, end: number): string {
  const parts: string[] = [];
  const cells: string[] = new Array(columns.length);
  for (let r = begin; r < end; r++) {
    for (let c = 0; c < columns.length; c++) {
      const col = columns[c];
      const v = col.values[(col.offset ?? 0) + (col.stride ?? 1) * r];
      cells[c] = col.integer ? String(v) : v.toPrecision(17);
    }
    parts.push(cells.join(','));
  }
  parts.push('');
  return parts.join('\n');
}

/** The whole table as chunks of at most `rowsPerChunk` rows, header first (for streaming to a file). */
export function* csvChunks(columns: readonly CsvColumn[], rows: number, rowsPerChunk = 4096): Generator<string> {
  yield csvHeader(columns);
  for (let r = 0; r < rows; r += rowsPerChunk) yield csvRows(columns, r, Math.min(rows, r + rowsPerChunk));
}

/** Options of csvChunksBytes. */
export interface CsvBytesOptions {
  /**
   * Yield views of the formatter's own memory instead of copies: each chunk is valid only until the next
   * one is asked for (for a consumer that writes each chunk away before asking; saves a copy per chunk).
   */
  readonly transient?: boolean;
}

let encoder: TextEncoder | undefined;

/** The text's bytes (ASCII here, so UTF-8 is the same). */
function asciiBytes(text: string): Uint8Array {
  encoder ??= new TextEncoder();
  return encoder.encode(text);
}

/**
 * The whole table as ASCII byte chunks of at most `rowsPerChunk` rows, header first: byte for byte the
 * text of csvChunks, formatted in WebAssembly where it can be (else with toPrecision).
 */
export function* csvChunksBytes(columns: readonly CsvColumn[], rows: number, rowsPerChunk = 4096, options: CsvBytesOptions = {}): Generator<Uint8Array> {
  yield asciiBytes(csvHeader(columns));
  const ex = columns.length > 0 && rows > 0 ? textFormatInstance() : null;
  const per = Math.max(1, Math.min(rowsPerChunk, rows));
  if (!ex) {
    for (let r = 0; r < rows; r += per) yield asciiBytes(csvRows(columns, r, Math.min(rows, r + per)));
    return;
  }
  const cols = columns.length;
  // The columns' values in groups that share an array and a stride (x, y, z of one xyz array); each chunk
  // copies the span of every group's array that its rows need into the formatter's memory, natively
  // (typed-array set), and the formatter picks the values from there.
  const groups: { values: ArrayLike<number>; stride: number; lo: number; hi: number }[] = [];
  const groupOf: number[] = [];
  for (const col of columns) {
    const stride = col.stride ?? 1;
    const offset = col.offset ?? 0;
    let g = groups.findIndex((x) => x.values === col.values && x.stride === stride);
    if (g < 0) g = groups.push({ values: col.values, stride, lo: offset, hi: offset }) - 1;
    groups[g].lo = Math.min(groups[g].lo, offset);
    groups[g].hi = Math.max(groups[g].hi, offset);
    groupOf.push(g);
  }
  const descPtr = TEXT_FORMAT_BASE;
  let inBytes = 0;
  for (const g of groups) inBytes += (g.stride * (per - 1) + g.hi - g.lo + 1) * 8;
  const inPtr = descPtr + ((cols * 12 + 15) & ~15);
  const outPtr = inPtr + ((inBytes + 15) & ~15);
  const total = outPtr + per * cols * TEXT_FORMAT_BYTES_PER_VALUE + TEXT_FORMAT_SLACK;
  const groupPtr = new Array<number>(groups.length);
  for (let r = 0; r < rows; r += per) {
    const k = Math.min(rows, r + per) - r;
    // Reserved and filled per chunk: another generator may have used the same instance in between.
    const buf = textFormatReserve(ex, total);
    const bytes = new Uint8Array(buf);
    const desc = new Uint32Array(buf, descPtr, cols * 3);
    let at = inPtr;
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi];
      const from = g.lo + g.stride * r;
      const to = g.hi + g.stride * (r + k - 1) + 1;
      if (to > g.values.length) throw new RangeError(`csv: a column has ${g.values.length} values, row ${r + k - 1} needs index ${to - 1}`);
      const dst = new Float64Array(buf, at, to - from);
      const v = g.values as ArrayLike<number> & { subarray?: (a: number, b: number) => ArrayLike<number> };
      if (ArrayBuffer.isView(v) && typeof v.subarray === 'function') dst.set(v.subarray(from, to));
      else for (let i = from; i < to; i++) dst[i - from] = v[i];
      groupPtr[gi] = at - 8 * g.lo;
      at += 8 * (to - from);
    }
    for (let c = 0; c < cols; c++) {
      const col = columns[c];
      const g = groups[groupOf[c]];
      desc[3 * c] = groupPtr[groupOf[c]] + 8 * (col.offset ?? 0);
      desc[3 * c + 1] = g.stride;
      desc[3 * c + 2] = col.integer ? 1 : 0;
    }
    let len = 0;
    let done = 0;
    while (done < k) {
      len += ex.formatRows(descPtr, done, k - done, cols, outPtr + len);
      const stop = ex.formatStopRow();
      if (stop < 0) break;
      // A value the formatter leaves to JavaScript (NaN, ±Infinity, a non-integer in an integer column).
      const text = csvRows(columns, r + stop, r + stop + 1);
      for (let i = 0; i < text.length; i++) bytes[outPtr + len + i] = text.charCodeAt(i);
      len += text.length;
      done = stop + 1;
    }
    const view = new Uint8Array(buf, outPtr, len);
    yield options.transient ? view : view.slice();
  }
}
