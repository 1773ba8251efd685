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
import { type CellList } from './cellList';
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

/** Slow path for pairs inside the softening radius (also handles r ≥ rCut for long Plummer radii). */
function softPair(k: RealSpaceKernel, r2: number, out: Scratch): void {
  const fs = softenedForceFactor(k.softening, r2);
  const ps = softenedPotential(k.softening, r2);
  if (r2 < k.rCut * k.rCut) {
    const u = k.alpha * k.alpha * r2;
    const c = k.table.coef;
    const s = u * k.table.perUnit;
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
  const { xyzm, start, stencil, slot } = cells;
  const [nx, ny, nz] = cells.n;
  const [wx, wy, wz] = cells.w;
  const lx = box.lx, ly = box.ly, lz = box.lz;
  const alpha = k.alpha, alpha3 = alpha * alpha * alpha;
  const rc2 = k.rCut * k.rCut;
  const rs2 = k.rSoft * k.rSoft;
  const loop2 = Math.max(rc2, rs2);
  const uScale = alpha * alpha * k.table.perUnit;
  const c = k.table.coef;
  const nSt = stencil.length / 3;
  const sc: Scratch = { f: 0, p: 0 };
  for (let t = begin; t < end; t++) {
    const si = slot[targets[t]];
    const x = xyzm[4 * si], y = xyzm[4 * si + 1], z = xyzm[4 * si + 2];
    let cx = Math.floor(x / wx), cy = Math.floor(y / wy), cz = Math.floor(z / wz);
    if (cx >= nx) cx = nx - 1;
    if (cy >= ny) cy = ny - 1;
    if (cz >= nz) cz = nz - 1;
    let ax = 0, ay = 0, az = 0, pp = 0;
    for (let q = 0; q < nSt; q++) {
      let ix = cx + stencil[3 * q], iy = cy + stencil[3 * q + 1], iz = cz + stencil[3 * q + 2];
      let px = x, py = y, pz = z;
      if (ix < 0 || ix >= nx) { const f = Math.floor(ix / nx); ix -= f * nx; px -= f * lx; }
      if (iy < 0 || iy >= ny) { const f = Math.floor(iy / ny); iy -= f * ny; py -= f * ly; }
      if (iz < 0 || iz >= nz) { const f = Math.floor(iz / nz); iz -= f * nz; pz -= f * lz; }
      const cell = (ix * ny + iy) * nz + iz;
      const j1 = start[cell + 1];
      for (let j = start[cell]; j < j1; j++) {
        const dx = px - xyzm[4 * j], dy = py - xyzm[4 * j + 1], dz = pz - xyzm[4 * j + 2];
        const r2 = dx * dx + dy * dy + dz * dz;
        if (r2 >= loop2) continue;
        if (q === 0 && j === si) continue;
        const m = xyzm[4 * j + 3];
        let F: number, Pot: number;
        if (r2 < rs2) {
          softPair(k, r2, sc);
          F = sc.f;
          Pot = sc.p;
        } else {
          const ir = 1 / Math.sqrt(r2);
          const s = r2 * uScale;
          const iv = s | 0;
          const tt = 2 * (s - iv) - 1;
          const o = iv * 12;
          F = ir * ir * ir - alpha3 * (c[o] + tt * (c[o + 1] + tt * (c[o + 2] + tt * (c[o + 3] + tt * (c[o + 4] + tt * c[o + 5])))));
          Pot = ir - alpha * (c[o + 6] + tt * (c[o + 7] + tt * (c[o + 8] + tt * (c[o + 9] + tt * (c[o + 10] + tt * c[o + 11])))));
        }
        const mf = m * F;
        ax -= mf * dx;
        ay -= mf * dy;
        az -= mf * dz;
        pp += m * Pot;
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
  const { xyzm, start, stencil, halfCount } = cells;
  const [nx, ny, nz] = cells.n;
  const lx = box.lx, ly = box.ly, lz = box.lz;
  const alpha = k.alpha, alpha3 = alpha * alpha * alpha;
  const rc2 = k.rCut * k.rCut;
  const rs2 = k.rSoft * k.rSoft;
  const loop2 = Math.max(rc2, rs2);
  const uScale = alpha * alpha * k.table.perUnit;
  const c = k.table.coef;
  const sc: Scratch = { f: 0, p: 0 };
  for (let cell0 = cellBegin; cell0 < cellEnd; cell0++) {
    const i0 = start[cell0], i1 = start[cell0 + 1];
    if (i0 === i1) continue;
    const cz = cell0 % nz;
    const cy = ((cell0 - cz) / nz) % ny;
    const cx = (cell0 - cz - cy * nz) / (ny * nz);
    for (let q = 0; q < halfCount; q++) {
      let ix = cx + stencil[3 * q], iy = cy + stencil[3 * q + 1], iz = cz + stencil[3 * q + 2];
      let sx = 0, sy = 0, sz = 0;
      if (ix < 0 || ix >= nx) { const f = Math.floor(ix / nx); ix -= f * nx; sx = f * lx; }
      if (iy < 0 || iy >= ny) { const f = Math.floor(iy / ny); iy -= f * ny; sy = f * ly; }
      if (iz < 0 || iz >= nz) { const f = Math.floor(iz / nz); iz -= f * nz; sz = f * lz; }
      const cell = (ix * ny + iy) * nz + iz;
      const j0 = start[cell], j1 = start[cell + 1];
      if (j0 === j1) continue;
      for (let i = i0; i < i1; i++) {
        const px = xyzm[4 * i] - sx, py = xyzm[4 * i + 1] - sy, pz = xyzm[4 * i + 2] - sz;
        const mi = xyzm[4 * i + 3];
        let ax = 0, ay = 0, az = 0, pp = 0;
        for (let j = q === 0 ? i + 1 : j0; j < j1; j++) {
          const dx = px - xyzm[4 * j], dy = py - xyzm[4 * j + 1], dz = pz - xyzm[4 * j + 2];
          const r2 = dx * dx + dy * dy + dz * dz;
          if (r2 >= loop2) continue;
          const mj = xyzm[4 * j + 3];
          let F: number, Pot: number;
          if (r2 < rs2) {
            softPair(k, r2, sc);
            F = sc.f;
            Pot = sc.p;
          } else {
            const ir = 1 / Math.sqrt(r2);
            const s = r2 * uScale;
            const iv = s | 0;
            const tt = 2 * (s - iv) - 1;
            const o = iv * 12;
            F = ir * ir * ir - alpha3 * (c[o] + tt * (c[o + 1] + tt * (c[o + 2] + tt * (c[o + 3] + tt * (c[o + 4] + tt * c[o + 5])))));
            Pot = ir - alpha * (c[o + 6] + tt * (c[o + 7] + tt * (c[o + 8] + tt * (c[o + 9] + tt * (c[o + 10] + tt * c[o + 11])))));
          }
          const fx = F * dx, fy = F * dy, fz = F * dz;
          ax -= mj * fx;
          ay -= mj * fy;
          az -= mj * fz;
          pp += mj * Pot;
          acc[3 * j] += mi * fx;
          acc[3 * j + 1] += mi * fy;
          acc[3 * j + 2] += mi * fz;
          phi[j] += mi * Pot;
        }
        acc[3 * i] += ax;
        acc[3 * i + 1] += ay;
        acc[3 * i + 2] += az;
        phi[i] += pp;
      }
    }
  }
}
