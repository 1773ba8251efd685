/**
 * Real-space part of the Ewald sum over a cell list. For a pair at separation r⃗ = r_i − (r_j + shift),
 * the raw sums accumulate −m_j F(r) r⃗ into acc_i and m_j Ψ(r) into phi_i, where
 *   F = f_short(r) − α³ forceP(α²r²),  Ψ = ψ_short(r) − α potQ(α²r²)   for r < rCut,
 * f_short/ψ_short are Newton (1/r³, 1/r) or the softened kernel inside its radius, and beyond rCut the
 * screened Ewald part is dropped (only the softening correction f_short − 1/r³ remains, r < rSoft).
 * Multiply acc by G and phi by −G (see ewald.ts).
 */
import { type Box } from '../box';
import { type Softening, softenedForceFactor, softenedPotential } from '../softening';
import { type CellList, cellListCellOf, cellListCoordinates, cellListNeighbour } from './cellList';
import { type KernelTable, KERNEL_STRIDE } from './kernelTable';

export interface RealSpaceKernel {
  readonly alpha: number;
  readonly rCut: number;
  /** Radius inside which the softened kernel replaces Newton (0: none). */
  readonly rSoft: number;
  readonly softening: Softening;
  readonly table: KernelTable;
}

interface Scratch {
  f: number;
  p: number;
}

/**
 * Pair terms for r² inside the loop radius: F (multiplies r⃗) and Ψ into out. Newton or the softened
 * kernel inside rSoft; minus the screened long-range part α³P(u), αQ(u) inside rCut, or minus the full
 * Newton term beyond it (where only a softening correction remains).
 */
function pairTerms(k: RealSpaceKernel, r2: number, out: Scratch): void {
  let fs: number, ps: number;
  if (r2 < k.rSoft * k.rSoft) {
    fs = softenedForceFactor(k.softening, r2);
    ps = softenedPotential(k.softening, r2);
  } else {
    const ir = 1 / Math.sqrt(r2);
    fs = ir * ir * ir;
    ps = ir;
  }
  if (r2 < k.rCut * k.rCut) {
    const c = k.table.coef;
    const s = r2 * k.alpha * k.alpha * k.table.perUnit;
    const iv = s | 0;
    const t = 2 * (s - iv) - 1;
    const o = iv * KERNEL_STRIDE;
    const P = c[o] + t * (c[o + 1] + t * (c[o + 2] + t * (c[o + 3] + t * (c[o + 4] + t * c[o + 5]))));
    const Q = c[o + 6] + t * (c[o + 7] + t * (c[o + 8] + t * (c[o + 9] + t * (c[o + 10] + t * c[o + 11]))));
    out.f = fs - k.alpha * k.alpha * k.alpha * P;
    out.p = ps - k.alpha * Q;
  } else {
    const ir = 1 / Math.sqrt(r2);
    out.f = fs - ir * ir * ir;
    out.p = ps - ir;
  }
}

/**
 * Real-space sums for the targets targets[begin..end): adds into acc[3t..3t+2] and phi[t] (t indexes
 * the targets array). Full stencil; the target's own zero-shift term is skipped.
 */
export function realSpaceTargets(
  cells: CellList,
  box: Box,
  k: RealSpaceKernel,
  targets: Int32Array,
  begin: number,
  end: number,
  acc: Float64Array,
  phi: Float64Array,
): void {
  const { xyzm, start, slot } = cells;
  const loop2 = Math.max(k.rCut, k.rSoft) ** 2;
  const nSt = cells.stencil.length / 3;
  const sc: Scratch = { f: 0, p: 0 };
  const shift = new Float64Array(3);
  for (let t = begin; t < end; t++) {
    const si = slot[targets[t]];
    const x = xyzm[4 * si], y = xyzm[4 * si + 1], z = xyzm[4 * si + 2];
    const [cx, cy, cz] = cellListCellOf(cells, x, y, z);
    let ax = 0, ay = 0, az = 0, pp = 0;
    for (let q = 0; q < nSt; q++) {
      const cell = cellListNeighbour(cells, box, cx, cy, cz, q, shift);
      const px = x - shift[0], py = y - shift[1], pz = z - shift[2];
      const j1 = start[cell + 1];
      for (let j = start[cell]; j < j1; j++) {
        const dx = px - xyzm[4 * j], dy = py - xyzm[4 * j + 1], dz = pz - xyzm[4 * j + 2];
        const r2 = dx * dx + dy * dy + dz * dz;
        if (r2 >= loop2 || (q === 0 && j === si)) continue;
        pairTerms(k, r2, sc);
        const m = xyzm[4 * j + 3];
        const mf = m * sc.f;
        ax -= mf * dx;
        ay -= mf * dy;
        az -= mf * dz;
        pp += m * sc.p;
      }
    }
    acc[3 * t] += ax;
    acc[3 * t + 1] += ay;
    acc[3 * t + 2] += az;
    phi[t] += pp;
  }
}

/**
 * Real-space sums for all particles with each pair visited once (half stencil, Newton's third law), for
 * the cells [cellBegin, cellEnd). Adds into acc (3N) and phi (N) in SORTED order (cells.order maps a
 * sorted slot to its input row). Self-image pairs (a particle and its own periodic images) are included.
 */
export function realSpaceAllSorted(
  cells: CellList,
  box: Box,
  k: RealSpaceKernel,
  cellBegin: number,
  cellEnd: number,
  acc: Float64Array,
  phi: Float64Array,
): void {
  const { xyzm, start, halfCount } = cells;
  const loop2 = Math.max(k.rCut, k.rSoft) ** 2;
  const sc: Scratch = { f: 0, p: 0 };
  const shift = new Float64Array(3);
  for (let cell0 = cellBegin; cell0 < cellEnd; cell0++) {
    const i0 = start[cell0], i1 = start[cell0 + 1];
    if (i0 === i1) continue;
    const [cx, cy, cz] = cellListCoordinates(cells, cell0);
    for (let q = 0; q < halfCount; q++) {
      const cell = cellListNeighbour(cells, box, cx, cy, cz, q, shift);
      const j0 = start[cell], j1 = start[cell + 1];
      if (j0 === j1) continue;
      for (let i = i0; i < i1; i++) {
        const px = xyzm[4 * i] - shift[0], py = xyzm[4 * i + 1] - shift[1], pz = xyzm[4 * i + 2] - shift[2];
        const mi = xyzm[4 * i + 3];
        let ax = 0, ay = 0, az = 0, pp = 0;
        for (let j = q === 0 ? i + 1 : j0; j < j1; j++) {
          const dx = px - xyzm[4 * j], dy = py - xyzm[4 * j + 1], dz = pz - xyzm[4 * j + 2];
          const r2 = dx * dx + dy * dy + dz * dz;
          if (r2 >= loop2) continue;
          pairTerms(k, r2, sc);
          const mj = xyzm[4 * j + 3];
          const fx = sc.f * dx, fy = sc.f * dy, fz = sc.f * dz;
          ax -= mj * fx;
          ay -= mj * fy;
          az -= mj * fz;
          pp += mj * sc.p;
          acc[3 * j] += mi * fx;
          acc[3 * j + 1] += mi * fy;
          acc[3 * j + 2] += mi * fz;
          phi[j] += mi * sc.p;
        }
        acc[3 * i] += ax;
        acc[3 * i + 1] += ay;
        acc[3 * i + 2] += az;
        phi[i] += pp;
      }
    }
  }
}
