/**
 * The WebAssembly real-space kernels against their JavaScript twins (engine/ewald/realSpace.ts), alone:
 * same cell list, same kernel table, the all-particle (half stencil, each pair once) and per-target (full
 * stencil) sums. The WebAssembly loops meet the stencil by columns of cells, one run of sources per
 * periodic image and per particle, cut to the cells its loop sphere reaches; the twins visit every
 * stencil cell and test every pair. Independent derivation: separate codes for the same sums, so
 * agreement to round-off checks both. The cases are chosen to reach every branch of the column loops:
 * cutoffs longer than every side (several images of one column, a particle's own images), thin and long
 * boxes, one or two cells per side, odd cell occupancies (the masked second lane), coincident particles
 * under softening (a masked lane at zero distance), both softening kernels.
 */
import { describe, expect, it } from 'vitest';
import { type Box, boxMake } from '../../../engine/box';
import { cellColumns, cellListBuild, cellStencil } from '../../../engine/ewald/cellList';
import { kernelTableBuild } from '../../../engine/ewald/kernelTable';
import { type RealSpaceKernel, realSpaceAllSorted, realSpaceTargets } from '../../../engine/ewald/realSpace';
import { type Softening, NO_SOFTENING, softeningSupport } from '../../../engine/softening';
import { positionsWrap } from '../../../engine/box';
import { realSpaceWasmCreate } from '../../../engine/wasm/realSpaceWasm';
import { kernelInstance } from '../../../engine/wasm/module';
import { snapshotClustered, snapshotUniform } from '../../helpers/snapshots';

interface Case {
  name: string;
  positions: Float64Array;
  masses: Float64Array;
  box: Box;
  cells: [number, number, number];
  alpha: number;
  rCut: number;
  softening: Softening;
}

function kernelOf(c: Case): RealSpaceKernel {
  const rSoft = c.softening.kind === 'plummer' ? Math.min(c.box.lx, c.box.ly, c.box.lz) / 2 : softeningSupport(c.softening);
  return { alpha: c.alpha, rCut: c.rCut, rSoft, softening: c.softening, table: kernelTableBuild(c.alpha * c.alpha * c.rCut * c.rCut) };
}

/** Largest |a − b| over the largest |b| (one scale per array). */
function maxErrorOverScale(a: Float64Array, b: Float64Array): number {
  let err = 0, scale = 0;
  for (let k = 0; k < b.length; k++) {
    err = Math.max(err, Math.abs(a[k] - b[k]));
    scale = Math.max(scale, Math.abs(b[k]));
  }
  return err / scale;
}

const clumped = snapshotClustered(257, 3, [1, 1.4, 0.7]);
const uniform = snapshotUniform(131, 8, [2, 0.5, 1.2], 1, 0.6);
const thin = snapshotUniform(97, 5, [3, 3, 0.2]);
const coincident = (() => {
  const s = snapshotUniform(60, 2, [1, 1, 1]);
  const positions = Float64Array.from(s.positions);
  for (let i = 0; i < 10; i++) for (let d = 0; d < 3; d++) positions[3 * (50 + i) + d] = positions[3 * i + d];
  return { ...s, positions };
})();

const cases: Case[] = [
  { name: 'clumped, rectangular box, 5×7×4 cells', ...clumped, cells: [5, 7, 4], alpha: 7, rCut: 0.45, softening: NO_SOFTENING },
  { name: 'clumped, r_c longer than every side (own images), 3×3×3 cells', ...clumped, cells: [3, 3, 3], alpha: 1.6, rCut: 1.9, softening: NO_SOFTENING },
  { name: 'clumped, one cell per side', ...clumped, cells: [1, 1, 1], alpha: 5, rCut: 0.6, softening: NO_SOFTENING },
  { name: 'uniform, long box, 8×2×1 cells, r_c beyond L_y and L_z', ...uniform, cells: [8, 2, 1], alpha: 2.5, rCut: 1.3, softening: NO_SOFTENING },
  { name: 'thin slab in z, 9×9×2 cells, r_c = 4 L_z', ...thin, cells: [9, 9, 2], alpha: 3.5, rCut: 0.8, softening: NO_SOFTENING },
  { name: 'clumped, spline softening inside r_c', ...clumped, cells: [4, 6, 3], alpha: 6, rCut: 0.5, softening: { kind: 'spline', h: 0.08 } },
  { name: 'uniform, spline support beyond r_c', ...uniform, cells: [6, 2, 3], alpha: 6, rCut: 0.35, softening: { kind: 'spline', h: 0.5 } },
  { name: 'uniform, Plummer softening', ...uniform, cells: [5, 1, 3], alpha: 4, rCut: 0.7, softening: { kind: 'plummer', eps: 0.02 } },
  { name: 'ten coincident pairs under spline softening', ...coincident, cells: [3, 3, 3], alpha: 6, rCut: 0.45, softening: { kind: 'spline', h: 0.1 } },
];

describe('WebAssembly real-space kernels = JavaScript twins (by stencil columns vs by stencil cells)', () => {
  it('runs on the WebAssembly path here', () => expect(kernelInstance()).not.toBeNull());

  for (const c of cases) {
    it(`${c.name}: all-particle and per-target sums equal to 1e-13 of their scale`, () => {
      const n = c.masses.length;
      const wrapped = Float64Array.from(c.positions);
      positionsWrap(wrapped, c.box);
      const k = kernelOf(c);
      const cells = cellListBuild(wrapped, c.masses, c.box, c.cells, Math.max(k.rCut, k.rSoft));
      const w = realSpaceWasmCreate(cells, c.box, k)!;
      // All particles, in two chunks of cells (as threads take them).
      const nc = cells.start.length - 1;
      const half = Math.floor(nc / 2);
      w.allChunk(0, half);
      w.allChunk(half, nc);
      const accW = new Float64Array(3 * n), phiW = new Float64Array(n);
      w.allCollect(accW, phiW);
      const accJ = new Float64Array(3 * n), phiJ = new Float64Array(n);
      realSpaceAllSorted(cells, c.box, k, 0, nc, accJ, phiJ);
      expect(maxErrorOverScale(accW, accJ)).toBeLessThan(1e-13);
      expect(maxErrorOverScale(phiW, phiJ)).toBeLessThan(1e-13);
      // Every particle as a target, in an odd-sized chunk after the first.
      const targets = Int32Array.from({ length: n }, (_, i) => (i * 7) % n);
      const tW = new Float64Array(3 * n), pW = new Float64Array(n);
      w.targets(targets, 0, 5, tW, pW);
      w.targets(targets, 5, n, tW, pW);
      const tJ = new Float64Array(3 * n), pJ = new Float64Array(n);
      realSpaceTargets(cells, c.box, k, targets, 0, n, tJ, pJ);
      expect(maxErrorOverScale(tW, tJ)).toBeLessThan(1e-13);
      expect(maxErrorOverScale(pW, pJ)).toBeLessThan(1e-13);
      // Sanity of the comparison itself: the sums are not all zero.
      expect(Math.max(...accJ.map(Math.abs))).toBeGreaterThan(0);
    });
  }
});

describe('cellColumns: the stencil regrouped into columns of consecutive cells', () => {
  for (const [w, r] of [
    [[0.2, 0.3, 0.1], 0.45],
    [[1, 1, 1], 2.5],
    [[0.05, 0.4, 0.4], 0.3],
  ] as [[number, number, number], number][]) {
    it(`covers exactly the stencil's cells, half and full (w = ${w}, r = ${r})`, () => {
      const { offsets, halfCount } = cellStencil(w, r);
      const all = offsets.length / 3;
      for (const [first, end] of [[0, halfCount], [0, all]]) {
        const cols = cellColumns(offsets, first, end);
        const fromColumns: string[] = [];
        for (let c = 0; c < cols.length; c += 4) for (let z = cols[c + 2]; z <= cols[c + 3]; z++) fromColumns.push(`${cols[c]},${cols[c + 1]},${z}`);
        const fromStencil: string[] = [];
        for (let q = first; q < end; q++) fromStencil.push(`${offsets[3 * q]},${offsets[3 * q + 1]},${offsets[3 * q + 2]}`);
        expect(fromColumns.sort()).toEqual(fromStencil.sort());
      }
      // The half stencil's own column comes first and starts at oz = 0 (the kernel relies on both).
      const half = cellColumns(offsets, 0, halfCount);
      expect(Array.from(half.subarray(0, 3))).toEqual([0, 0, 0]);
    });
  }

  it('refuses offsets that leave a gap in z', () => {
    expect(() => cellColumns(Int32Array.from([0, 0, 0, 0, 0, 2]), 0, 2)).toThrow(/not contiguous/);
  });
});
