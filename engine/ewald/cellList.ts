/**
 * Cell list for the real-space sum in a periodic rectangular box. Particles are sorted by cell into a
 * flat [x, y, z, m] array; a stencil lists every cell offset (in an unwrapped grid) whose nearest point
 * lies within the cutoff, so cutoffs longer than the box (several images of one particle) are handled.
 */
import { type Box, boxSides } from '../box';
import { float64s, int32s } from '../util/arrays';

export interface CellList {
  /** Cells per side. */
  readonly n: [number, number, number];
  /** Cell widths (length units). */
  readonly w: [number, number, number];
  /** Sorted particles, 4 doubles each: x, y, z (wrapped into the home cell), mass. */
  readonly xyzm: Float64Array;
  /** Input row of each sorted particle. */
  readonly order: Int32Array;
  /** Sorted slot of each input row. */
  readonly slot: Int32Array;
  /** Cell c holds sorted particles start[c] .. start[c+1]−1; cells are numbered (ix·ny + iy)·nz + iz. */
  readonly start: Int32Array;
  /** Stencil offsets, 3 ints each; the first is (0,0,0). */
  readonly stencil: Int32Array;
  /** Number of leading stencil offsets that form the half stencil (the zero offset plus one of ±o). */
  readonly halfCount: number;
}

/** Cell index of a wrapped coordinate. */
function cellOf(x: number, w: number, n: number): number {
  const c = Math.floor(x / w);
  return c < 0 ? 0 : c >= n ? n - 1 : c;
}

/**
 * Offsets o with min distance between cell 0 and cell o below rCut; ordered with (0,0,0) first, then the
 * lexicographically positive half, then their negatives. The gap along z grows with |oz|, so each (ox, oy)
 * keeps one range |oz| ≤ M: M is found from the same test per column, and the offsets are written in one
 * pass into an array of the exact size (a refinement's cutoff beyond the box makes 10^4 offsets or more).
 */
export function cellStencil(w: [number, number, number], rCut: number): { offsets: Int32Array; halfCount: number } {
  const reach = w.map((wd) => Math.ceil(rCut / wd)) as [number, number, number];
  const r2 = rCut * rCut;
  const nx = reach[0] + 1, ny = 2 * reach[1] + 1;
  const top = new Int32Array(nx * ny).fill(-1); // M per (ox, oy) of the positive half; −1: none
  let half = 0;
  for (let ox = 0; ox <= reach[0]; ox++) {
    const gx = Math.max(0, ox - 1) * w[0];
    for (let oy = ox === 0 ? 0 : -reach[1]; oy <= reach[1]; oy++) {
      const gy = Math.max(0, Math.abs(oy) - 1) * w[1];
      const inside = (oz: number): boolean => {
        const gz = Math.max(0, oz - 1) * w[2];
        return gx * gx + gy * gy + gz * gz < r2;
      };
      if (!inside(0)) continue;
      let m = Math.min(reach[2], Math.ceil(Math.sqrt(Math.max(0, r2 - gx * gx - gy * gy)) / w[2]));
      while (m < reach[2] && inside(m + 1)) m++;
      while (m > 0 && !inside(m)) m--;
      if (ox === 0 && oy === 0 && m === 0) continue; // the zero offset is not in the positive half
      top[ox * ny + oy + reach[1]] = m;
      half += ox === 0 && oy === 0 ? m : 2 * m + 1;
    }
  }
  const offsets = new Int32Array(3 * (1 + 2 * half));
  let k = 3;
  for (let ox = 0; ox <= reach[0]; ox++) {
    for (let oy = -reach[1]; oy <= reach[1]; oy++) {
      const m = top[ox * ny + oy + reach[1]];
      if (m < 0) continue;
      for (let oz = ox === 0 && oy === 0 ? 1 : -m; oz <= m; oz++) {
        offsets[k] = ox;
        offsets[k + 1] = oy;
        offsets[k + 2] = oz;
        offsets[k + 3 * half] = -ox;
        offsets[k + 3 * half + 1] = -oy;
        offsets[k + 3 * half + 2] = -oz;
        k += 3;
      }
    }
  }
  return { offsets, halfCount: 1 + half };
}

/**
 * The stencil offsets first..end−1 grouped into columns: 4 ints per column (ox, oy, ozLow, ozHigh), in the
 * order each (ox, oy) first appears. A column's cells are consecutive in the sorted order (cells are
 * numbered with z fastest), so a kernel can meet a column in one run of sources per periodic image.
 * Throws if a column's oz values are not one contiguous range (never for cellStencil's offsets, whose
 * reach in z shrinks monotonically away from the centre).
 */
export function cellColumns(stencil: Int32Array, first: number, end: number): Int32Array {
  let reach = 0;
  for (let q = first; q < end; q++) reach = Math.max(reach, Math.abs(stencil[3 * q]), Math.abs(stencil[3 * q + 1]));
  const side = 2 * reach + 1;
  const index = new Int32Array(side * side).fill(-1); // column number of (ox, oy)
  const cols: number[] = [];
  const counts: number[] = [];
  for (let q = first; q < end; q++) {
    const ox = stencil[3 * q], oy = stencil[3 * q + 1], oz = stencil[3 * q + 2];
    const key = (ox + reach) * side + oy + reach;
    let c = index[key];
    if (c < 0) {
      c = index[key] = counts.length;
      cols.push(ox, oy, oz, oz);
      counts.push(0);
    }
    if (oz < cols[4 * c + 2]) cols[4 * c + 2] = oz;
    if (oz > cols[4 * c + 3]) cols[4 * c + 3] = oz;
    counts[c]++;
  }
  for (let c = 0; c < counts.length; c++) {
    if (cols[4 * c + 3] - cols[4 * c + 2] + 1 !== counts[c]) {
      throw new Error(`stencil column (${cols[4 * c]}, ${cols[4 * c + 1]}) is not contiguous in z`);
    }
  }
  return Int32Array.from(cols);
}

/** Number of stencil cells for cells of width w and cutoff rCut (cost model helper). */
export function cellStencilSize(w: [number, number, number], rCut: number): number {
  return cellStencil(w, rCut).offsets.length / 3;
}

/**
 * Builds the cell list with n[d] cells per side. Positions must already lie in the home cell.
 * shared: the sorted arrays live in SharedArrayBuffers (for threads: posted without a copy).
 */
export function cellListBuild(positions: Float64Array, masses: Float64Array, box: Box, n: [number, number, number], rCut: number, shared = false): CellList {
  const sides = boxSides(box);
  const w: [number, number, number] = [sides[0] / n[0], sides[1] / n[1], sides[2] / n[2]];
  const count = masses.length;
  const nCells = n[0] * n[1] * n[2];
  const cellOfParticle = new Int32Array(count);
  const start = int32s(nCells + 1, shared);
  for (let i = 0; i < count; i++) {
    const c =
      (cellOf(positions[3 * i], w[0], n[0]) * n[1] + cellOf(positions[3 * i + 1], w[1], n[1])) * n[2] +
      cellOf(positions[3 * i + 2], w[2], n[2]);
    cellOfParticle[i] = c;
    start[c + 1]++;
  }
  for (let c = 0; c < nCells; c++) start[c + 1] += start[c];
  const fill = start.slice(0, nCells);
  const order = int32s(count, shared);
  const slot = int32s(count, shared);
  const xyzm = float64s(4 * count, shared);
  for (let i = 0; i < count; i++) {
    const s = fill[cellOfParticle[i]]++;
    order[s] = i;
    slot[i] = s;
    xyzm[4 * s] = positions[3 * i];
    xyzm[4 * s + 1] = positions[3 * i + 1];
    xyzm[4 * s + 2] = positions[3 * i + 2];
    xyzm[4 * s + 3] = masses[i];
  }
  const { offsets, halfCount } = cellStencil(w, rCut);
  return { n, w, xyzm, order, slot, start, stencil: offsets, halfCount };
}

/**
 * Neighbour of cell (cx, cy, cz) at stencil offset q: returns its cell index and writes into shift[0..2]
 * the periodic shift (length units) of the image of that cell that the offset reaches.
 */
export function cellListNeighbour(cells: CellList, box: Box, cx: number, cy: number, cz: number, q: number, shift: Float64Array): number {
  const [nx, ny, nz] = cells.n;
  const st = cells.stencil;
  let ix = cx + st[3 * q], iy = cy + st[3 * q + 1], iz = cz + st[3 * q + 2];
  const fx = Math.floor(ix / nx), fy = Math.floor(iy / ny), fz = Math.floor(iz / nz);
  ix -= fx * nx;
  iy -= fy * ny;
  iz -= fz * nz;
  shift[0] = fx * box.lx;
  shift[1] = fy * box.ly;
  shift[2] = fz * box.lz;
  return (ix * ny + iy) * nz + iz;
}

/** Grid coordinates (cx, cy, cz) of cell number `cell`. */
export function cellListCoordinates(cells: CellList, cell: number): [number, number, number] {
  const [, ny, nz] = cells.n;
  const cz = cell % nz;
  const cy = ((cell - cz) / nz) % ny;
  return [(cell - cz - cy * nz) / (ny * nz), cy, cz];
}

/** Cell index of a sorted particle's coordinates. */
export function cellListCellOf(cells: CellList, x: number, y: number, z: number): [number, number, number] {
  return [cellOf(x, cells.w[0], cells.n[0]), cellOf(y, cells.w[1], cells.n[1]), cellOf(z, cells.w[2], cells.n[2])];
}
