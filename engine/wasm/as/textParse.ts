// Entry point of the delimited-text number parser: the row loop of textRowParserMake
// (engine/formats/textRows.ts) for the rows whose used cells all take the fast paths of cellParse.
// The JavaScript side (engine/wasm/textParseWasm.ts) copies a window of whole lines into memory and calls
// textRows; it stops at the first row it cannot finish (a cell off the fast paths, a missing cell, an id
// that is not an integer) or when its output space is full, without counting that row, and JavaScript
// parses that row with its own code before calling again.
import { cellEndFind, cellFast, gEnd, gValue } from './textParseNumber';

const LF: u8 = 10;
const CR: u32 = 13;
const TAB: u32 = 9;
const SPACE: u32 = 32;
const HASH: u32 = 35;

/** Why textRows returned: at the end of its bytes, at a kept row with no output space, at a row for JavaScript. */
const STOP_END: i32 = 0;
const STOP_FULL: i32 = 1;
const STOP_ROW: i32 = 2;

let gStop: i32 = 0;
let gLines: i32 = 0;
let gRows: i32 = 0;
let gKept: i32 = 0;

// Output arrays (byte addresses): positions (3 per row), masses, accelerations (3), ids, softening, lines.
let oPos: usize = 0;
let oMass: usize = 0;
let oAcc: usize = 0;
let oId: usize = 0;
let oSoft: usize = 0;

export function textParseVersion(): i32 {
  return 2;
}

/** Why the last textRows call returned (STOP_END 0, STOP_FULL 1, STOP_ROW 2). */
export function stopReason(): i32 {
  return gStop;
}

/** Lines the last call went past (data, blank and comment lines). */
export function linesDone(): i32 {
  return gLines;
}

/** Data rows it went past (kept or not). */
export function rowsDone(): i32 {
  return gRows;
}

/** Rows it stored. */
export function rowsKept(): i32 {
  return gKept;
}

@inline function isBlank(c: u32): bool {
  return c == SPACE || c == TAB;
}

/** The first LF in [p, lim), or lim (reads up to 15 bytes past lim: the caller pads the window). */
@inline function lineEndFind(p: usize, lim: usize): usize {
  const lf = i8x16.splat(LF);
  while (p < lim) {
    const m = i8x16.bitmask(i8x16.eq(v128.load(p), lf));
    if (m != 0) {
      const at = p + <usize>ctz(m);
      return at < lim ? at : lim;
    }
    p += 16;
  }
  return lim;
}

/** rowCells of textRows.ts for the row [pos, end) into output row k; false: JavaScript must do the row. */
function rowCells(pos: usize, end: usize, k: usize, slots: usize, lastColumn: i32, delim: u32): bool {
  const whitespace = delim == SPACE;
  let i = pos;
  if (whitespace) while (i < end && isBlank(<u32>load<u8>(i))) i++;
  for (let col: i32 = 0; ; col++) {
    const slot = load<i32>(slots + (<usize>col << 2));
    if (slot >= 0) {
      if (!cellFast(i, end, delim)) return false;
      const v = gValue;
      if (slot < 3) store<f64>(oPos + ((3 * k + <usize>slot) << 3), v);
      else if (slot == 3) store<f64>(oMass + (k << 3), v);
      else if (slot < 7) store<f64>(oAcc + ((3 * k + <usize>(slot - 4)) << 3), v);
      else if (slot == 7) {
        if (Math.trunc(v) != v) return false; // JavaScript reports the id that is not an integer
        store<f64>(oId + (k << 3), v);
      } else store<f64>(oSoft + (k << 3), v);
      i = gEnd;
    } else i = cellEndFind(i, end, delim);
    if (col == lastColumn) break;
    if (whitespace) {
      while (i < end && isBlank(<u32>load<u8>(i))) i++;
      if (i == end) return false; // a missing cell: JavaScript reports it
    } else if (i < end) i++; // past the delimiter
    else return false;
  }
  return true;
}

/**
 * The lines in [p, lim) (whole lines; the last may lack its LF only at the end of the data), as the loop
 * of textRows.ts parses them: skips blank and # lines, keeps the data rows whose index is 0 modulo `every`
 * (`phase` = rows before p modulo every), stores at most maxKeep rows. slots: the Int32 slot of each column
 * up to lastColumn; line: lines before p. Returns where it stopped (a line start, or past lim); results
 * through stopReason, linesDone, rowsDone, rowsKept.
 */
export function textRows(
  p: usize,
  lim: usize,
  slots: usize,
  lastColumn: i32,
  delim: u32,
  every: i32,
  phase: i32,
  line: i32,
  maxKeep: i32,
  pos: usize,
  mass: usize,
  acc: usize,
  id: usize,
  soft: usize,
  lines: usize,
): usize {
  oPos = pos;
  oMass = mass;
  oAcc = acc;
  oId = id;
  oSoft = soft;
  let kept: i32 = 0;
  let nLines: i32 = 0;
  let nRows: i32 = 0;
  let stop = STOP_END;
  while (p < lim) {
    const lineEnd = lineEndFind(p, lim);
    const end = lineEnd > p && <u32>load<u8>(lineEnd - 1) == CR ? lineEnd - 1 : lineEnd;
    let i = p;
    while (i < end && isBlank(<u32>load<u8>(i))) i++;
    if (i == end || <u32>load<u8>(i) == HASH) {
      nLines++;
      p = lineEnd + 1;
      continue;
    }
    if (phase == 0) {
      if (kept == maxKeep) {
        stop = STOP_FULL;
        break;
      }
      if (!rowCells(p, end, <usize>kept, slots, lastColumn, delim)) {
        stop = STOP_ROW;
        break;
      }
      store<i32>(lines + (<usize>kept << 2), line + nLines + 1);
      kept++;
    }
    nLines++;
    nRows++;
    phase++;
    if (phase == every) phase = 0;
    p = lineEnd + 1;
  }
  gStop = stop;
  gLines = nLines;
  gRows = nRows;
  gKept = kept;
  return p;
}
