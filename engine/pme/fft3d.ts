/**
 * Real-to-complex 3D FFT of an n0×n1×n2 mesh (index (i0·n1 + i1)·n2 + i2, n0 even, every n_d with prime
 * factors 2, 3, 5 only), in place in a buffer of (n0 + 2)·n1·n2 numbers, split into independent pieces
 * a scheduler can hand out:
 *   A. columns of axis 0 (meshForwardColumns): pairs of x-planes (2j, 2j+1) are the real and imaginary
 *      parts of a half-length complex transform, untangled into the half spectrum k0 = 0 … n0/2
 *      (the half-length trick for real data: Cooley, Lewis & Welch 1970, J. Sound Vib. 12, 315);
 *   B. slabs k0 (meshSlabsForward / meshSlabsSolve): complex transforms along y, a transpose, along z;
 *   C. columns again (meshInverseColumns): the inverse of A.
 * Spectrum layout: slab k0 at k0·2B (B = n1·n2): real parts [k2][k1] then imaginary parts [k2][k1].
 * Forward uses e^{−2πi k·j/n}; the inverse e^{+…}, unnormalised (inverse∘forward = n0·n1·n2).
 */
import { type FftPlan, fftPlan, fftRows, fftSizeOk } from './fftRows';

export interface MeshFft {
  readonly n: [number, number, number];
  /** Plans: half-length along axis 0, full along axes 1 and 2. */
  readonly half: FftPlan;
  readonly py: FftPlan;
  readonly pz: FftPlan;
  /** cos, sin of 2πk/n0 for k = 0 … n0/2 (untangling twiddles). */
  readonly cosT: Float64Array;
  readonly sinT: Float64Array;
  /** Columns of axis 0 per block in passes A and C. */
  readonly columnBlock: number;
}

/** Scratch for one thread: two buffers large enough for a column block and for one slab. */
export interface FftScratch {
  readonly a: Float64Array;
  readonly b: Float64Array;
}

/** Plans a mesh FFT; throws a RangeError naming the side that is not usable. */
export function meshFftCreate(n: [number, number, number]): MeshFft {
  n.forEach((v, d) => {
    if (!fftSizeOk(v)) throw new RangeError(`mesh side ${d} must be a positive integer with prime factors 2, 3, 5 only, got ${v}`);
  });
  if (n[0] % 2 !== 0) throw new RangeError(`mesh side 0 must be even for the real-to-complex transform, got ${n[0]}`);
  const h = n[0] / 2;
  const cosT = new Float64Array(h + 1);
  const sinT = new Float64Array(h + 1);
  for (let k = 0; k <= h; k++) {
    cosT[k] = Math.cos((2 * Math.PI * k) / n[0]);
    sinT[k] = Math.sin((2 * Math.PI * k) / n[0]);
  }
  const b = n[1] * n[2];
  const columnBlock = Math.max(1, Math.min(b, Math.floor(8192 / Math.max(1, h))));
  return { n: [n[0], n[1], n[2]], half: fftPlan(h), py: fftPlan(n[1]), pz: fftPlan(n[2]), cosT, sinT, columnBlock };
}

/** Numbers in the in-place buffer: (n0 + 2)·n1·n2. */
export function meshFftLength(f: MeshFft): number {
  return (f.n[0] + 2) * f.n[1] * f.n[2];
}

/** Number of axis-0 column blocks (work units of passes A and C). */
export function meshColumnBlocks(f: MeshFft): number {
  return Math.ceil((f.n[1] * f.n[2]) / f.columnBlock);
}

/** Number of spectrum slabs (work units of pass B): n0/2 + 1. */
export function meshSlabCount(f: MeshFft): number {
  return f.n[0] / 2 + 1;
}

/** Allocates scratch for one thread. */
export function meshFftScratch(f: MeshFft): FftScratch {
  const size = Math.max(2 * (f.n[0] / 2) * f.columnBlock, 2 * f.n[1] * f.n[2]);
  return { a: new Float64Array(size), b: new Float64Array(size) };
}

/** Pass A for column blocks [blockBegin, blockEnd): real x-planes → half spectrum along axis 0. */
export function meshForwardColumns(f: MeshFft, data: Float64Array, blockBegin: number, blockEnd: number, sc: FftScratch): void {
  const B = f.n[1] * f.n[2];
  const H = f.n[0] / 2;
  const { cosT, sinT } = f;
  for (let blk = blockBegin; blk < blockEnd; blk++) {
    const c0 = blk * f.columnBlock;
    const w = Math.min(f.columnBlock, B - c0);
    const a = sc.a;
    const io = H * w;
    for (let j = 0; j < H; j++) {
      const re = 2 * j * B + c0, im = re + B;
      const o = j * w;
      for (let c = 0; c < w; c++) {
        a[o + c] = data[re + c];
        a[io + o + c] = data[im + c];
      }
    }
    const z = fftRows(f.half, a, sc.b, w, false);
    // X[k] = E[k] + e^{−2πik/n0} O[k], E = (Z[k] + conj Z[H−k])/2, O = −i (Z[k] − conj Z[H−k])/2.
    for (let k = 0; k <= H; k++) {
      const zk = (k % H) * w, zc = ((H - k) % H) * w;
      const ct = cosT[k], st = sinT[k];
      const out = 2 * k * B + c0;
      for (let c = 0; c < w; c++) {
        const ar = z[zk + c], ai = z[io + zk + c];
        const cr = z[zc + c], ci = -z[io + zc + c];
        const er = 0.5 * (ar + cr), ei = 0.5 * (ai + ci);
        const or = 0.5 * (ai - ci), oi = -0.5 * (ar - cr);
        data[out + c] = er + ct * or + st * oi;
        data[out + B + c] = ei + ct * oi - st * or;
      }
    }
  }
}

/** Pass C for column blocks [blockBegin, blockEnd): half spectrum along axis 0 → real x-planes. */
export function meshInverseColumns(f: MeshFft, data: Float64Array, blockBegin: number, blockEnd: number, sc: FftScratch): void {
  const B = f.n[1] * f.n[2];
  const H = f.n[0] / 2;
  const { cosT, sinT } = f;
  for (let blk = blockBegin; blk < blockEnd; blk++) {
    const c0 = blk * f.columnBlock;
    const w = Math.min(f.columnBlock, B - c0);
    const a = sc.a;
    const io = H * w;
    // Z[k] = E + iO, E = X[k] + conj X[H−k], O = (X[k] − conj X[H−k]) e^{+2πik/n0}  (k < H)
    for (let k = 0; k < H; k++) {
      const xk = 2 * k * B + c0, xc = 2 * (H - k) * B + c0;
      const ct = cosT[k], st = sinT[k];
      const o = k * w;
      for (let c = 0; c < w; c++) {
        const ar = data[xk + c], ai = data[xk + B + c];
        const cr = data[xc + c], ci = -data[xc + B + c];
        const er = ar + cr, ei = ai + ci;
        const dr = ar - cr, di = ai - ci;
        const or = dr * ct - di * st, oi = dr * st + di * ct;
        a[o + c] = er - oi;
        a[io + o + c] = ei + or;
      }
    }
    const z = fftRows(f.half, a, sc.b, w, true);
    for (let j = 0; j < H; j++) {
      const re = 2 * j * B + c0, im = re + B;
      const o = j * w;
      for (let c = 0; c < w; c++) {
        data[re + c] = z[o + c];
        data[im + c] = z[io + o + c];
      }
    }
  }
}

/** Transposes a split block of r rows × c columns (src) into c rows × r columns (dst). */
function transposeSplit(src: Float64Array, dst: Float64Array, r: number, c: number): void {
  const io = r * c;
  const T = 16;
  for (let i0 = 0; i0 < r; i0 += T) {
    const i1 = Math.min(r, i0 + T);
    for (let j0 = 0; j0 < c; j0 += T) {
      const j1 = Math.min(c, j0 + T);
      for (let i = i0; i < i1; i++) {
        for (let j = j0; j < j1; j++) {
          dst[j * r + i] = src[i * c + j];
          dst[io + j * r + i] = src[io + i * c + j];
        }
      }
    }
  }
}

/**
 * Per-slab spectrum operation: called with the slab index k0 and the slab's spectrum (split layout, real
 * parts [k2][k1] at 0, imaginary parts at n1·n2) to modify in place.
 */
export type SlabMultiply = (k0: number, spectrum: Float64Array) => void;

/**
 * Pass B, fused: for slabs [k0Begin, k0End), forward transforms along y and z, `multiply`, inverse
 * transforms along z and y; the slab is left in the layout pass C expects.
 */
export function meshSlabsSolve(f: MeshFft, data: Float64Array, k0Begin: number, k0End: number, sc: FftScratch, multiply: SlabMultiply): void {
  const [, n1, n2] = f.n;
  const B = n1 * n2;
  for (let k0 = k0Begin; k0 < k0End; k0++) {
    const base = 2 * k0 * B;
    const a = sc.a, b = sc.b;
    a.set(data.subarray(base, base + 2 * B));
    const ry = fftRows(f.py, a, b, n2, false); // rows y, columns z
    const other = ry === a ? b : a;
    transposeSplit(ry, other, n1, n2); // rows z, columns y
    const rz = fftRows(f.pz, other, ry, n1, false);
    multiply(k0, rz);
    const rz2 = fftRows(f.pz, rz, rz === a ? b : a, n1, true);
    const other2 = rz2 === a ? b : a;
    transposeSplit(rz2, other2, n2, n1); // back to rows y
    const ry2 = fftRows(f.py, other2, rz2, n2, true);
    data.set(ry2.subarray(0, 2 * B), base);
  }
}

/** Pass B, forward only: leaves the spectrum of slabs [k0Begin, k0End) in the documented layout. */
export function meshSlabsForward(f: MeshFft, data: Float64Array, k0Begin: number, k0End: number, sc: FftScratch): void {
  const [, n1, n2] = f.n;
  const B = n1 * n2;
  for (let k0 = k0Begin; k0 < k0End; k0++) {
    const base = 2 * k0 * B;
    const a = sc.a, b = sc.b;
    a.set(data.subarray(base, base + 2 * B));
    const ry = fftRows(f.py, a, b, n2, false);
    const other = ry === a ? b : a;
    transposeSplit(ry, other, n1, n2);
    const rz = fftRows(f.pz, other, ry, n1, false);
    data.set(rz.subarray(0, 2 * B), base);
  }
}

/** Pass B, inverse only: from the documented spectrum layout back to the layout pass C expects. */
export function meshSlabsInverse(f: MeshFft, data: Float64Array, k0Begin: number, k0End: number, sc: FftScratch): void {
  const [, n1, n2] = f.n;
  const B = n1 * n2;
  for (let k0 = k0Begin; k0 < k0End; k0++) {
    const base = 2 * k0 * B;
    const a = sc.a, b = sc.b;
    a.set(data.subarray(base, base + 2 * B));
    const rz = fftRows(f.pz, a, b, n1, true);
    const other = rz === a ? b : a;
    transposeSplit(rz, other, n2, n1);
    const ry = fftRows(f.py, other, rz, n2, true);
    data.set(ry.subarray(0, 2 * B), base);
  }
}

/** Whole forward transform on one thread: real mesh in data[0 … n0n1n2) → half spectrum in place. */
export function meshFftForward(f: MeshFft, data: Float64Array, sc: FftScratch = meshFftScratch(f)): void {
  meshForwardColumns(f, data, 0, meshColumnBlocks(f), sc);
  meshSlabsForward(f, data, 0, meshSlabCount(f), sc);
}

/** Whole inverse transform on one thread (unnormalised): half spectrum → real mesh in data[0 … n0n1n2). */
export function meshFftInverse(f: MeshFft, data: Float64Array, sc: FftScratch = meshFftScratch(f)): void {
  meshSlabsInverse(f, data, 0, meshSlabCount(f), sc);
  meshInverseColumns(f, data, 0, meshColumnBlocks(f), sc);
}
