/**
 * Plain image sums over whole cells added in spherical or cubic shells, with partial sums at every shell.
 *
 * Cell n (integer vector) is the home cell shifted by s_n = (n_x Lx, n_y Ly, n_z Lz): all N particles at
 * r_j + s_n (the target itself left out of n = 0) and, with the mean density removed, a homogeneous box of
 * density −ρ̄ = −M/V filling [s_n, s_n + L). Shell membership:
 *   sphere: cell n is in the partial sum of radius R when |s_n| ≤ R·ℓ, ℓ = the longest side (so for a cube
 *           |n| ≤ R in cell units; for a rectangular box a sphere in physical distance);
 *   cube:   max_i |n_i| ≤ R (cell units; for a rectangular box a prism similar to the box).
 * Cells closer than a radius chosen from the tolerance are summed exactly (pairs, plus the closed-form field
 * of the background box); farther cells enter through their Cartesian multipole moments, summed shell by
 * shell into local expansions about the home cell centre (multipole.ts), with an order per shell chosen so
 * that a calibrated model of the truncation error (shellTruncation), summed over shells, stays below
 * tol·G·Σ|m|/d² (d the box diagonal). Every shell is symmetric under n_i → −n_i, so only one octant of
 * cells is visited, shell by shell (memory independent of R).
 */
import { type Box, boxVolume } from '../box';
import {
  type MultiIndex,
  fieldCoefficients,
  inverseDistanceDerivatives,
  localFromShell,
  localMonomials,
  momentsAddPoint,
  momentsAddUniformBox,
  multiIndexBuild,
  multiIndexCount,
} from './multipole';
import { uniformBoxField } from './uniformBox';

export type ShellShape = 'sphere' | 'cube';

/** Largest multipole + local expansion order used for a far shell. */
export const SHELL_MAX_ORDER = 32;

export interface ShellSetup {
  readonly shape: ShellShape;
  readonly shells: number;
  readonly background: boolean;
  readonly G: number;
  readonly box: Box;
  /** Wrapped positions (flat xyz) and masses. */
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  readonly m: Float64Array;
  readonly meanDensity: number;
  /** Radius (length) inside which cells are summed exactly, and the box diagonal. */
  readonly nearRadius: number;
  readonly diagonal: number;
  /** Exactly summed cells: shifts (3 per cell), sorted by shell; nearStart[R]..nearStart[R+1] is shell R. */
  readonly nearShift: Float64Array;
  readonly nearStart: Int32Array;
  /** Expansion order per shell (0: no far cells) and the offsets of its field coefficients in farCoef. */
  readonly farOrder: Int32Array;
  readonly farStart: Int32Array;
  readonly farCoef: Float64Array;
  readonly mi: MultiIndex;
  /** Highest expansion order used. */
  readonly maxOrder: number;
  /** Numbers of cells summed exactly and by multipoles (all shells). */
  readonly nearCells: number;
  readonly farCells: number;
}

function shellUnit(box: Box): number {
  return Math.max(box.lx, box.ly, box.lz);
}

/** Callback for one octant cell (i, j, k ≥ 0) at distance r from the home cell, standing for `weight` cells. */
type CellVisit = (i: number, j: number, k: number, r: number, weight: number) => void;

/** Shell index of cell (i, j, k ≥ 0). */
function shellIndex(box: Box, shape: ShellShape, i: number, j: number, k: number): number {
  if (shape === 'cube') return Math.max(i, j, k);
  const r = Math.hypot(i * box.lx, j * box.ly, k * box.lz);
  return Math.ceil((r / shellUnit(box)) * (1 - 1e-12));
}

/**
 * Visits the octant cells (i, j, k ≥ 0) of shell s, each with weight 2^(number of nonzero indices) for its
 * mirror images; memory O(1), time proportional to the shell's cells.
 */
function shellVisit(box: Box, shape: ShellShape, s: number, visit: CellVisit): void {
  const { lx, ly, lz } = box;
  const cell = (i: number, j: number, k: number) =>
    visit(i, j, k, Math.hypot(i * lx, j * ly, k * lz), 1 << ((i > 0 ? 1 : 0) + (j > 0 ? 1 : 0) + (k > 0 ? 1 : 0)));
  if (shape === 'cube') {
    for (let i = 0; i <= s; i++) {
      for (let j = 0; j <= s; j++) {
        if (i === s || j === s) for (let k = 0; k <= s; k++) cell(i, j, k);
        else cell(i, j, s);
      }
    }
    return;
  }
  const ell = shellUnit(box);
  const outer2 = (s * ell) ** 2 * (1 + 1e-9), inner2 = Math.max(0, (s - 1) * ell) ** 2;
  for (let i = 0; (i * lx) ** 2 <= outer2; i++) {
    for (let j = 0; (i * lx) ** 2 + (j * ly) ** 2 <= outer2; j++) {
      const base = (i * lx) ** 2 + (j * ly) ** 2;
      let kLo = base >= inner2 ? 0 : Math.max(0, Math.floor(Math.sqrt(inner2 - base) / lz) - 1);
      let kHi = Math.floor(Math.sqrt(outer2 - base) / lz) + 1;
      while (kLo <= kHi && shellIndex(box, shape, i, j, kLo) < s) kLo++;
      while (kHi >= kLo && shellIndex(box, shape, i, j, kHi) > s) kHi--;
      for (let k = kLo; k <= kHi; k++) if (shellIndex(box, shape, i, j, k) === s) cell(i, j, k);
    }
  }
}

/** A lower bound of the distance from the home cell of every cell of shell s. */
function shellInnerBound(box: Box, shape: ShellShape, s: number): number {
  if (shape === 'cube') return s * Math.min(box.lx, box.ly, box.lz);
  return Math.max(0, (s - 1) * shellUnit(box));
}

/**
 * Truncation-error model of one far shell at order p (relative to G Σ|m|/d²): (p+1) ρ^p (d/s)²/(1 − ρ),
 * ρ = d/s, s the nearest far cell of the shell. It is the worst-case single-cell remainder of the expansion
 * of 1/|s + u|, |u| ≤ d, without the shell's cell count: the shell sums of the Legendre terms cancel to
 * well below count × term (measured: the model lies above the actual error by 3–5000× for mass at one
 * corner and the target at the opposite one, the worst placement; calibration, no published source).
 */
function shellTruncation(p: number, rho: number): number {
  return ((p + 1) * Math.pow(rho, p) * rho * rho) / (1 - rho);
}

interface ShellPlan {
  nearRadius: number;
  order: Int32Array;
}

/**
 * Chooses the exact-sum radius (q·d, q = 2.5, 2.75, …) and an even order per far shell (shell sums of odd
 * degree vanish by mirror symmetry) so that the modelled truncation, tol/(number of far shells) per shell,
 * needs no more than SHELL_MAX_ORDER.
 */
function shellPlan(box: Box, shape: ShellShape, R: number, d: number, tol: number): ShellPlan {
  for (let q = 2.5; ; q += 0.25) {
    const nearRadius = q * d;
    // nearest far cell per shell: enumerated where the shell reaches inside the exact radius, else a bound
    const farMin = new Float64Array(R + 1).fill(Infinity);
    for (let s = 0; s <= R; s++) {
      const bound = shellInnerBound(box, shape, s);
      if (bound >= nearRadius) {
        farMin[s] = bound;
        continue;
      }
      shellVisit(box, shape, s, (_i, _j, _k, r) => {
        if (r >= nearRadius && r < farMin[s]) farMin[s] = r;
      });
    }
    let farShells = 0;
    for (let s = 0; s <= R; s++) if (farMin[s] < Infinity) farShells++;
    const order = new Int32Array(R + 1);
    let ok = true;
    for (let s = 0; s <= R && ok; s++) {
      if (farMin[s] === Infinity) continue;
      const rho = d / farMin[s];
      let p = 2;
      while (p <= SHELL_MAX_ORDER && shellTruncation(p, rho) > tol / farShells) p += 2;
      if (p > SHELL_MAX_ORDER) ok = false;
      order[s] = p;
    }
    if (ok) return { nearRadius, order };
  }
}

/**
 * Prepares a shell-ordered image sum: wrapped positions (flat xyz, length units), masses, box, the largest
 * shell R, background (mean density removed) or not, G, and tol (relative to G Σ|m|/d²). Computes the
 * exact-cell list and, for far shells, the field coefficients of their local expansions.
 */
export function shellSetup(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  shape: ShellShape,
  shells: number,
  background: boolean,
  G: number,
  tol: number,
): ShellSetup {
  const n = masses.length;
  const L = [box.lx, box.ly, box.lz];
  const V = boxVolume(box);
  const d = Math.hypot(L[0], L[1], L[2]);
  const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
  let M = 0;
  for (let j = 0; j < n; j++) {
    x[j] = positions[3 * j];
    y[j] = positions[3 * j + 1];
    z[j] = positions[3 * j + 2];
    M += masses[j];
  }
  const meanDensity = M / V;
  const plan = shellPlan(box, shape, shells, d, tol);

  // Exact cells: every sign variant of the octant cells inside the exact radius, grouped by shell.
  const nearByShell: number[][] = Array.from({ length: shells + 1 }, () => []);
  let nearCells = 0, farCells = 0;
  for (let s = 0; s <= shells; s++) {
    if (shellInnerBound(box, shape, s) >= plan.nearRadius) continue;
    shellVisit(box, shape, s, (i, j, k, r) => {
      if (r >= plan.nearRadius) return;
      for (const si of i === 0 ? [1] : [1, -1]) {
        for (const sj of j === 0 ? [1] : [1, -1]) {
          for (const sk of k === 0 ? [1] : [1, -1]) {
            nearByShell[s].push(si * i * L[0], sj * j * L[1], sk * k * L[2]);
            nearCells++;
          }
        }
      }
    });
  }
  const nearShift = new Float64Array(3 * nearCells);
  const nearStart = new Int32Array(shells + 2);
  let off = 0;
  for (let s = 0; s <= shells; s++) {
    nearStart[s] = off / 3;
    nearShift.set(nearByShell[s], off);
    off += nearByShell[s].length;
  }
  nearStart[shells + 1] = off / 3;

  // Far shells: moments, shell lattice sums (octant cells, mirror weights, even indices only), local
  // expansions, field coefficients.
  let maxOrder = 2;
  for (let s = 0; s <= shells; s++) maxOrder = Math.max(maxOrder, plan.order[s]);
  const mi = multiIndexBuild(maxOrder);
  const farStart = new Int32Array(shells + 2);
  for (let s = 0; s <= shells; s++) {
    const p = plan.order[s];
    farStart[s + 1] = farStart[s] + (p > 0 ? 3 * multiIndexCount(p - 1) : 0);
  }
  const farCoef = new Float64Array(farStart[shells + 1]);
  const moments = new Float64Array(mi.count);
  const pow = new Float64Array(3 * (maxOrder + 1));
  const cx = L[0] / 2, cy = L[1] / 2, cz = L[2] / 2;
  for (let j = 0; j < n; j++) momentsAddPoint(mi, masses[j], x[j] - cx, y[j] - cy, z[j] - cz, moments, pow);
  if (background) momentsAddUniformBox(mi, -meanDensity, L[0], L[1], L[2], moments);
  const evens: number[] = [];
  for (let idx = 0; idx < mi.count; idx++) if (((mi.a[idx] | mi.b[idx] | mi.c[idx]) & 1) === 0) evens.push(idx);
  const deriv = new Float64Array(mi.count);
  const work = new Float64Array((maxOrder + 1) * mi.count);
  const sums = new Float64Array(mi.count);
  const local = new Float64Array(mi.count);
  for (let s = 0; s <= shells; s++) {
    const p = plan.order[s];
    if (p === 0) continue;
    const evenEnd = evens.findIndex((idx) => mi.a[idx] + mi.b[idx] + mi.c[idx] > p);
    const ne = evenEnd < 0 ? evens.length : evenEnd;
    sums.fill(0);
    shellVisit(box, shape, s, (i, j, k, r, w) => {
      if (r < plan.nearRadius) return;
      farCells += w;
      inverseDistanceDerivatives(mi, p, i * L[0], j * L[1], k * L[2], deriv, work);
      for (let e = 0; e < ne; e++) sums[evens[e]] += w * deriv[evens[e]];
    });
    localFromShell(mi, p, moments, sums, local);
    fieldCoefficients(mi, p, local, farCoef.subarray(farStart[s], farStart[s + 1]));
  }
  return {
    shape,
    shells,
    background,
    G,
    box,
    x,
    y,
    z,
    m: Float64Array.from(masses),
    meanDensity,
    nearRadius: plan.nearRadius,
    diagonal: d,
    nearShift,
    nearStart,
    farOrder: plan.order,
    farStart,
    farCoef,
    mi,
    maxOrder,
    nearCells,
    farCells,
  };
}

/**
 * Partial sums for targets[begin..end) (input rows): partial[(R·K + t)·3 + d] = acceleration (G·mass/length²)
 * of target t from all cells of shells 0..R, for R = 0..shells, K = targets.length.
 */
export function shellTargets(setup: ShellSetup, targets: Int32Array, begin: number, end: number, partial: Float64Array): void {
  const { x, y, z, m, box, shells, nearShift, nearStart, farOrder, farStart, farCoef, mi, G } = setup;
  const n = m.length;
  const K = targets.length;
  const L = [box.lx, box.ly, box.lz];
  const cx = L[0] / 2, cy = L[1] / 2, cz = L[2] / 2;
  const shellAcc = new Float64Array(3 * (shells + 1));
  const mono = new Float64Array(mi.count);
  const pow = new Float64Array(3 * (mi.order + 1));
  const bg = new Float64Array(3);
  const rhoBg = setup.background ? -setup.meanDensity : 0;
  for (let t = begin; t < end; t++) {
    const i = targets[t];
    const xi = x[i], yi = y[i], zi = z[i];
    shellAcc.fill(0);
    for (let s = 0; s <= shells; s++) {
      let ax = 0, ay = 0, az = 0;
      for (let c = nearStart[s]; c < nearStart[s + 1]; c++) {
        const sx = nearShift[3 * c], sy = nearShift[3 * c + 1], sz = nearShift[3 * c + 2];
        const home = sx === 0 && sy === 0 && sz === 0;
        const px = xi - sx, py = yi - sy, pz = zi - sz;
        for (let j = 0; j < n; j++) {
          if (home && j === i) continue;
          const dx = x[j] - px, dy = y[j] - py, dz = z[j] - pz;
          const r2 = dx * dx + dy * dy + dz * dz;
          const f = m[j] / (r2 * Math.sqrt(r2));
          ax += f * dx;
          ay += f * dy;
          az += f * dz;
        }
        if (rhoBg !== 0) {
          uniformBoxField(xi, yi, zi, sx, sx + L[0], sy, sy + L[1], sz, sz + L[2], bg);
          ax += rhoBg * bg[0];
          ay += rhoBg * bg[1];
          az += rhoBg * bg[2];
        }
      }
      shellAcc[3 * s] += ax;
      shellAcc[3 * s + 1] += ay;
      shellAcc[3 * s + 2] += az;
    }
    if (setup.farCells > 0) {
      localMonomials(mi, setup.maxOrder - 1, xi - cx, yi - cy, zi - cz, mono, pow);
      for (let s = 0; s <= shells; s++) {
        const p = farOrder[s];
        if (p === 0) continue;
        const nt = multiIndexCount(p - 1);
        const o = farStart[s];
        let ax = 0, ay = 0, az = 0;
        for (let g = 0; g < nt; g++) {
          const w = mono[g];
          ax += farCoef[o + 3 * g] * w;
          ay += farCoef[o + 3 * g + 1] * w;
          az += farCoef[o + 3 * g + 2] * w;
        }
        shellAcc[3 * s] += ax;
        shellAcc[3 * s + 1] += ay;
        shellAcc[3 * s + 2] += az;
      }
    }
    let ax = 0, ay = 0, az = 0;
    for (let s = 0; s <= shells; s++) {
      ax += shellAcc[3 * s];
      ay += shellAcc[3 * s + 1];
      az += shellAcc[3 * s + 2];
      const o = (s * K + t) * 3;
      partial[o] = G * ax;
      partial[o + 1] = G * ay;
      partial[o + 2] = G * az;
    }
  }
}
