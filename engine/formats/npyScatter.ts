/**
 * The data of one array, fed in pieces in storage order (C: row by row; Fortran: column by column),
 * decoded to doubles and scattered into flat output arrays: column c of kept row r goes to
 * out[offset + stride·(r / every)] for every pick of column c. Allocates one scratch block.
 */
import { type Dtype, dtypeDecode } from './npyDtype';

/** Column `column` of the array goes to out[offset + stride·p] for kept particle p. */
export interface ColumnPick {
  readonly column: number;
  readonly out: Float64Array;
  readonly stride: number;
  readonly offset: number;
}

/** A consumer of the array's data bytes. */
export interface ArrayScatter {
  push(piece: Uint8Array): void;
  /** Data bytes consumed so far (whole elements plus a partial one). */
  readonly consumed: number;
  /** Data bytes the array has in all. */
  readonly needed: number;
}

const BLOCK = 1 << 15;

/**
 * A scatter for an array of `rows` × `cols` elements of dtype `d` (cols = 1 for 1-D), in Fortran order
 * when `fortran`; keeps rows 0, every, 2·every, …
 */
export function arrayScatterMake(d: Dtype, rows: number, cols: number, fortran: boolean, picks: readonly ColumnPick[], every = 1): ArrayScatter {
  const size = d.size;
  const needed = rows * cols * size;
  const byColumn: ColumnPick[][] = Array.from({ length: cols }, () => []);
  for (const p of picks) byColumn[p.column].push(p);
  const scratch = new Float64Array(BLOCK);
  const carry = new Uint8Array(size);
  let carried = 0;
  let consumed = 0;
  let row = 0;
  let col = 0;
  let keep = true; // row % every === 0
  let p = 0; // kept index of the current row

  function take(count: number): void {
    for (let k = 0; k < count; k++) {
      if (keep) {
        const ps = byColumn[col];
        for (let q = 0; q < ps.length; q++) {
          const pick = ps[q];
          pick.out[pick.offset + pick.stride * p] = scratch[k];
        }
      }
      if (fortran) {
        row++;
        if (row === rows) {
          row = 0;
          col++;
        }
        keep = row % every === 0;
        p = (row / every) | 0;
      } else {
        col++;
        if (col === cols) {
          col = 0;
          row++;
          keep = row % every === 0;
          p = (row / every) | 0;
        }
      }
    }
  }

  /** Decodes whole elements of b[from, to) (to − from a multiple of size) and takes them. */
  function elements(b: Uint8Array, from: number, to: number): void {
    let at = from;
    while (at < to) {
      const count = Math.min(BLOCK, (to - at) / size);
      dtypeDecode(d, b, at, count, scratch);
      take(count);
      at += count * size;
    }
  }

  return {
    push(piece: Uint8Array): void {
      const room = needed - consumed;
      const b = piece.length > room ? piece.subarray(0, room) : piece;
      consumed += piece.length; // counted whole, so that extra bytes show up as consumed > needed
      let i = 0;
      if (carried > 0) {
        const take2 = Math.min(size - carried, b.length);
        carry.set(b.subarray(0, take2), carried);
        carried += take2;
        i = take2;
        if (carried < size) return;
        elements(carry, 0, size);
        carried = 0;
      }
      const whole = Math.floor((b.length - i) / size) * size;
      if (whole > 0) elements(b, i, i + whole);
      const rest = b.length - i - whole;
      if (rest > 0) {
        carry.set(b.subarray(i + whole));
        carried = rest;
      }
    },
    get consumed() {
      return consumed;
    },
    needed,
  };
}
