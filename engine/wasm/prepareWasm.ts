/**
 * The particle passes of a direct-Ewald setup in WebAssembly (engine/wasm/as/prepare.ts): validation,
 * wrapping, the clustering counts and mass sums in one pass, then the cell list from the wrapped copy
 * that stays in the instance's memory. Same operations in the same order as the JavaScript twins
 * (particlesValidate, positionsWrap, clusteringFactor, massSums, cellListBuild), so the same bits; those
 * run where this returns null (no WebAssembly SIMD, or TORUSGRAV_NO_WASM).
 */
import type { Box } from '../box';
import { type CellList, cellStencil } from '../ewald/cellList';
import { float64s, int32s } from '../util/arrays';
import { WasmArena, kernelInstance } from './module';

/** What one pass over the particles found (all sums in input order). */
export interface ParticlesPrepared {
  /** Particles that lay outside the box and were wrapped. */
  readonly moved: number;
  /** Σ over the clustering grid's cells of (particles in the cell)². */
  readonly clusterSumSq: number;
  /** Σ m², Σ |m|^{3/2}, Σ |m|, Σ m. */
  readonly q: number;
  readonly m32: number;
  readonly mAbs: number;
  readonly total: number;
}

export interface PrepareWasm {
  /**
   * Copies positions and masses in, wraps, counts particles per cell of the clustering grid and sums the
   * masses; writes the wrapped positions into `wrappedOut`. Returns null when a mass or coordinate is not
   * finite (the caller's validation then names it).
   */
  particles(positions: Float64Array, masses: Float64Array, box: Box, grid: readonly [number, number, number], wrappedOut: Float64Array): ParticlesPrepared | null;
  /** The cell list of the last particles() call (as cellListBuild), its arrays shared when `shared`. */
  cellList(box: Box, n: readonly [number, number, number], rCut: number, shared: boolean): CellList;
  /**
   * Whether two wrapped positions of the last particles() call are exactly equal (a hash pass, O(N)):
   * false rules out what cellListFindCoincident looks for; true means it will find a pair to name.
   */
  anyCoincident(): boolean;
}

/** A fresh context (one kernel instance), or null where the WebAssembly kernels are unavailable. */
export function prepareWasmCreate(): PrepareWasm | null {
  const k = kernelInstance();
  if (!k) return null;
  const x = k as unknown as Record<string, (...a: number[]) => number>;
  const arena = new WasmArena(k);
  let count = 0, pPos = 0, pMass = 0;
  return {
    particles(positions, masses, box, grid, wrappedOut) {
      count = masses.length;
      pPos = arena.alloc(24 * count);
      pMass = arena.alloc(8 * count);
      const pCounts = arena.alloc(4 * grid[0] * grid[1] * grid[2]);
      const pOut = arena.alloc(48);
      arena.f64(pPos, 3 * count).set(positions);
      arena.f64(pMass, count).set(masses);
      const bad = x.particlesPrepare(pPos, pMass, count, box.lx, box.ly, box.lz, grid[0], grid[1], grid[2], pCounts, pOut);
      if (bad >= 0) return null;
      wrappedOut.set(arena.f64(pPos, 3 * count));
      const o = arena.f64(pOut, 6);
      return { moved: o[0], clusterSumSq: o[1], q: o[2], m32: o[3], mAbs: o[4], total: o[5] };
    },
    cellList(box, n, rCut, shared) {
      const nCells = n[0] * n[1] * n[2];
      const w: [number, number, number] = [box.lx / n[0], box.ly / n[1], box.lz / n[2]];
      const pStart = arena.alloc(4 * (nCells + 1));
      const pOrder = arena.alloc(4 * count);
      const pSlot = arena.alloc(4 * count);
      const pXyzm = arena.alloc(32 * count);
      const pCellOf = arena.alloc(4 * count);
      const pFill = arena.alloc(4 * nCells);
      x.cellListFill(pPos, pMass, count, n[0], n[1], n[2], w[0], w[1], w[2], pStart, pOrder, pSlot, pXyzm, pCellOf, pFill);
      const start = int32s(nCells + 1, shared);
      start.set(arena.i32(pStart, nCells + 1));
      const order = int32s(count, shared);
      order.set(arena.i32(pOrder, count));
      const slot = int32s(count, shared);
      slot.set(arena.i32(pSlot, count));
      const xyzm = float64s(4 * count, shared);
      xyzm.set(arena.f64(pXyzm, 4 * count));
      const { offsets, halfCount } = cellStencil(w, rCut);
      return { n: [n[0], n[1], n[2]], w, xyzm, order, slot, start, stencil: offsets, halfCount };
    },
    anyCoincident() {
      let size = 16;
      while (size < 2 * count) size *= 2;
      return x.positionsRepeat(pPos, count, arena.alloc(4 * size), size) === 1;
    },
  };
}
