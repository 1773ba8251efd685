/**
 * Writing columns of numbers as CSV text. Non-integer columns use 17 significant digits
 * (toPrecision(17)), which is enough for every IEEE-754 double to read back bit for bit (IEEE 754-2008
 * §5.12.2: 17 significant decimal digits round-trip binary64).
 */

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
