/**
 * The real-space kernels of realSpace.ts run in WebAssembly (SIMD, two pairs per step): same pair terms,
 * same kernel table. One context per setup (per thread): sorted particles (as SoA), cell offsets, stencil columns
 * and table are copied into the instance's memory once; all-particle sums accumulate there until collected.
 */
import { type Box } from '../box';
import { type CellList, cellColumns } from '../ewald/cellList';
import { KERNEL_STRIDE } from '../ewald/kernelTable';
import { type RealSpaceKernel } from '../ewald/realSpace';
import { WasmArena, kernelInstance } from './module';

export interface RealSpaceWasm {
  /** Symmetric all-particle sums over cells [cellBegin, cellEnd), kept inside the context. */
  allChunk(cellBegin: number, cellEnd: number): void;
  /** Adds the kept sums into accSorted (3N, sorted order) and phiSorted (N), then clears them. */
  allCollect(accSorted: Float64Array, phiSorted: Float64Array): void;
  /** Adds the kept sums into input-order acc (3N) and phi (N) through `order` (cells.order), then clears them. */
  allAddUnsorted(acc: Float64Array, phi: Float64Array): void;
  /**
   * ewaldFinalize for all particles, in place on acc (3N) and phi (N), which hold other sums (e.g. Fourier)
   * on entry: adds the kept sums (as allAddUnsorted), then each of `parts` (input order), then applies G,
   * the self term and the background constant. The same operations in the same order as the twins.
   */
  allFinalize(acc: Float64Array, phi: Float64Array, parts: readonly { acc: Float64Array; phi: Float64Array }[], G: number, selfCoef: number, background: number): void;
  /** Per-target sums for targets[begin..end) (input rows), added into acc[3t..], phi[t]. */
  targets(targets: Int32Array, begin: number, end: number, acc: Float64Array, phi: Float64Array): void;
  /**
   * A context for the same sorted particles and cell grid (`cells` differs from this context's only in its
   * stencil) under another kernel, inside this context's instance: no new memory for the particles.
   */
  derive(cells: CellList, k: RealSpaceKernel): RealSpaceWasm;
}

/** What contexts over one instance share: the instance, its memory, the SoA particles and accumulators. */
interface RealSpaceBase {
  x: Record<string, (...a: number[]) => void>;
  arena: WasmArena;
  n: number;
  soa: number[];
  acc: number[];
  pStart: number;
}

const SOFT_KIND = { none: 0, plummer: 1, spline: 2 } as const;
/** Bytes after each SoA array: an odd run's masked second lane reads (and writes back) one slot past the end. */
const PAD = 16;
/** Particles (about) per kernel call. */
const CALL_PARTICLES = 128;

/** Creates the WebAssembly context, or null when WebAssembly SIMD is unavailable. */
export function realSpaceWasmCreate(cells: CellList, box: Box, k: RealSpaceKernel): RealSpaceWasm | null {
  const w = kernelInstance();
  if (!w) return null;
  const x = w as unknown as Record<string, (...a: number[]) => void>;
  const arena = new WasmArena(w);
  const n = cells.order.length;
  const nCells = cells.start.length - 1;
  const soa = [0, 1, 2, 3].map(() => arena.alloc(8 * n + PAD));
  const acc = [0, 1, 2, 3].map(() => arena.alloc(8 * n + PAD));
  // The sorted particles split into SoA arrays inside the instance, through the accumulators' (contiguous,
  // still unused) memory, which is zeroed again afterwards.
  arena.f64(acc[0], 4 * n).set(cells.xyzm);
  x.deinterleave4(acc[0], n, soa[0], soa[1], soa[2], soa[3]);
  arena.f64(acc[0], 4 * n).fill(0);
  const pStart = arena.alloc(4 * (nCells + 1));
  arena.i32(pStart, nCells + 1).set(cells.start);
  return contextMake({ x, arena, n, soa, acc, pStart }, cells, box, k);
}

function contextMake(base: RealSpaceBase, cells: CellList, box: Box, k: RealSpaceKernel): RealSpaceWasm {
  const { x, arena, n, soa, acc, pStart } = base;
  const nCells = cells.start.length - 1;
  // Stencil columns: the half stencil's (own column first) for the all-particle loop, the full one's for targets.
  const columns = (first: number, end: number): [number, number] => {
    const c = cellColumns(cells.stencil, first, end);
    const p = arena.alloc(4 * c.length);
    arena.i32(p, c.length).set(c);
    return [p, c.length / 4];
  };
  const [pHalf, nHalf] = columns(0, cells.halfCount);
  let full: [number, number] | null = null;
  // Table re-laid for the kernel: per interval (P0, Q0, P1, Q1, …) instead of (P0..P5, Q0..Q5).
  const pTable = arena.alloc(8 * k.table.coef.length);
  const tab = arena.f64(pTable, k.table.coef.length);
  const half = KERNEL_STRIDE / 2;
  for (let o = 0; o < tab.length; o += KERNEL_STRIDE) {
    for (let m = 0; m < half; m++) {
      tab[o + 2 * m] = k.table.coef[o + m];
      tab[o + 2 * m + 1] = k.table.coef[o + half + m];
    }
  }
  const softLen = k.softening.kind === 'plummer' ? k.softening.eps : k.softening.kind === 'spline' ? k.softening.h : 0;
  const setKernel = () =>
    x.setKernel(k.alpha, k.rCut, k.rSoft, k.table.perUnit, k.table.uMax, pTable, SOFT_KIND[k.softening.kind], softLen);
  const [nx, ny, nz] = cells.n;
  let tslotRef: Int32Array | null = null;
  let pOrder = 0, pDst = 0;
  /**
   * acc (3N) and phi (N) copied whole into the staging area, the kept sums added through `order` (the
   * scatter runs in WebAssembly), the kept sums cleared.
   */
  const unsortedIn = (accIn: Float64Array, phiIn: Float64Array): void => {
    if (pOrder === 0) {
      pOrder = arena.alloc(4 * n + PAD);
      arena.i32(pOrder, n).set(cells.order);
      pDst = arena.alloc(32 * n + PAD);
    }
    arena.f64(pDst, 3 * n).set(accIn.subarray(0, 3 * n));
    arena.f64(pDst + 24 * n, n).set(phiIn.subarray(0, n));
    x.addSoaUnsorted(acc[0], acc[1], acc[2], acc[3], pOrder, n, pDst, pDst + 24 * n);
    for (const p of acc) arena.f64(p, n).fill(0);
  };
  let pTslot = 0;
  let pOut = 0, pPhi = 0, cap = 0;
  return {
    allChunk(cellBegin, cellEnd) {
      setKernel();
      // Many short calls rather than one long one (wasm tier-up happens between calls).
      const step = Math.max(1, Math.ceil((CALL_PARTICLES * nCells) / Math.max(1, n)));
      for (let c = cellBegin; c < cellEnd; c += step) {
        x.realSpaceAll(c, Math.min(cellEnd, c + step), nx, ny, nz, box.lx, box.ly, box.lz, cells.w[0], cells.w[1], cells.w[2], pStart, pHalf, nHalf, ...soa, ...acc);
      }
    },
    allCollect(accSorted, phiSorted) {
      const [ax, ay, az, ph] = acc.map((p) => arena.f64(p, n));
      for (let s = 0; s < n; s++) {
        accSorted[3 * s] += ax[s];
        accSorted[3 * s + 1] += ay[s];
        accSorted[3 * s + 2] += az[s];
        phiSorted[s] += ph[s];
      }
      for (const a of [ax, ay, az, ph]) a.fill(0);
    },
    allAddUnsorted(accOut, phiOut) {
      unsortedIn(accOut, phiOut);
      accOut.set(arena.f64(pDst, 3 * n));
      phiOut.set(arena.f64(pDst + 24 * n, n));
    },
    allFinalize(accOut, phiOut, parts, G, selfCoef, background) {
      unsortedIn(accOut, phiOut);
      // Each part through the accumulators' memory (consecutive, already touched, zeroed again afterwards).
      for (const q of parts) {
        arena.f64(acc[0], 3 * n).set(q.acc.subarray(0, 3 * n));
        x.addInto(acc[0], 3 * n, pDst);
        arena.f64(acc[0], n).set(q.phi.subarray(0, n));
        x.addInto(acc[0], n, pDst + 24 * n);
      }
      if (parts.length > 0) arena.f64(acc[0], 3 * n).fill(0);
      x.finalizeAll(pDst, pDst + 24 * n, soa[3], pOrder, n, G, selfCoef, background);
      accOut.set(arena.f64(pDst, 3 * n));
      phiOut.set(arena.f64(pDst + 24 * n, n));
    },
    targets(targets, begin, end, out, phi) {
      setKernel();
      full ??= columns(0, cells.stencil.length / 3);
      if (tslotRef !== targets) {
        pTslot = arena.alloc(4 * targets.length);
        const ts = arena.i32(pTslot, targets.length);
        for (let t = 0; t < targets.length; t++) ts[t] = cells.slot[targets[t]];
        tslotRef = targets;
      }
      const m = end - begin;
      if (m > cap) {
        cap = Math.max(m, 256);
        pOut = arena.alloc(8 * 3 * cap);
        pPhi = arena.alloc(8 * cap);
      }
      arena.f64(pOut, 3 * m).fill(0);
      arena.f64(pPhi, m).fill(0);
      for (let b = begin; b < end; b += CALL_PARTICLES) {
        // The kernel writes acc/phi relative to its own begin: offset the output pointers.
        x.realSpaceTargets(pTslot, b, Math.min(end, b + CALL_PARTICLES), nx, ny, nz, box.lx, box.ly, box.lz, cells.w[0], cells.w[1], cells.w[2],
          pStart, full[0], full[1], ...soa, pOut + 24 * (b - begin), pPhi + 8 * (b - begin));
      }
      const a = arena.f64(pOut, 3 * m), p = arena.f64(pPhi, m);
      for (let t = 0; t < m; t++) {
        out[3 * (begin + t)] += a[3 * t];
        out[3 * (begin + t) + 1] += a[3 * t + 1];
        out[3 * (begin + t) + 2] += a[3 * t + 2];
        phi[begin + t] += p[t];
      }
    },
    derive(cells2, k2) {
      return contextMake(base, cells2, box, k2);
    },
  };
}
