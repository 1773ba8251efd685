/**
 * Pure helpers of the 3D view (no three.js): world coordinates of particles, the slab filter, residual
 * arrows as line segments, and screen-space picking. World space: the box scaled so that its longest
 * side is 1, home cell [0, Lx/ℓ) × [0, Ly/ℓ) × [0, Lz/ℓ).
 */
import type { Box } from '../../../engine/box';
import { wrapCoordinate } from '../../../engine/box';

/** Longest box side ℓ (world unit). */
export function worldUnit(box: Box): number {
  return Math.max(box.lx, box.ly, box.lz);
}

/** World positions (Float32, xyz) of `rows` (all particles when null), wrapped into the box. */
export function worldPositions(positions: Float64Array, box: Box, rows: Int32Array | null, order?: Uint32Array): Float32Array {
  const n = rows ? rows.length : positions.length / 3;
  const out = new Float32Array(3 * n);
  worldPositionsInto(out, positions, box, rows, order, 0, n);
  return out;
}

/** Fills draw slots [begin, end) of `out` as worldPositions does (for building large clouds in pieces). */
export function worldPositionsInto(out: Float32Array, positions: Float64Array, box: Box, rows: Int32Array | null, order: Uint32Array | undefined, begin: number, end: number): void {
  const l = worldUnit(box);
  const L = [box.lx, box.ly, box.lz];
  for (let s = begin; s < end; s++) {
    const k = order ? order[s] : s;
    const i = rows ? rows[k] : k;
    for (let d = 0; d < 3; d++) {
      const x = positions[3 * i + d];
      out[3 * s + d] = (x >= 0 && x < L[d] ? x : wrapCoordinate(x, L[d])) / l;
    }
  }
}

/** A seeded permutation of 0..n−1 (drawing order; lets a prefix stand for all while the view moves). */
export function drawOrder(n: number, seed = 12345): Uint32Array {
  const p = new Uint32Array(n);
  for (let i = 0; i < n; i++) p[i] = i;
  let s = seed >>> 0;
  for (let i = n - 1; i > 0; i--) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    const j = s % (i + 1);
    const t = p[i];
    p[i] = p[j];
    p[j] = t;
  }
  return p;
}

/** A seeded random choice of `m` of the rows 0..n−1, made in steps (see shuffleStart, shuffleSteps). */
export interface Shuffle {
  /** After the last step, p[0..m) are the chosen rows in random order (p is a permutation throughout). */
  readonly p: Uint32Array;
  readonly m: number;
  /** Rows chosen so far, and the generator's state. */
  i: number;
  s: number;
}

/** Starts a partial shuffle choosing m ≤ n rows (a prefix of the draw order, made in steps across tasks). */
export function shuffleStart(n: number, m: number, seed = 12345): Shuffle {
  const p = new Uint32Array(n);
  for (let i = 0; i < n; i++) p[i] = i;
  return { p, m: Math.max(0, Math.min(n, m)), i: 0, s: seed >>> 0 };
}

/** Chooses up to `steps` more rows (front-to-back Fisher–Yates); true when all m are chosen. */
export function shuffleSteps(sh: Shuffle, steps: number): boolean {
  const { p, m } = sh;
  const n = p.length;
  const end = Math.min(m, sh.i + steps);
  let s = sh.s;
  for (let i = sh.i; i < end; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    const j = i + (s % (n - i));
    const t = p[i];
    p[i] = p[j];
    p[j] = t;
  }
  sh.i = end;
  sh.s = s;
  return end >= m;
}

export interface Slab {
  /** 0, 1, 2 for x, y, z; −1 for no slab. */
  readonly axis: number;
  /** World-space bounds along the axis (periodic: min may exceed max when the slab wraps). */
  readonly min: number;
  readonly max: number;
  /** World-space side along the axis (for wrapping). */
  readonly side: number;
}

export const NO_SLAB: Slab = { axis: -1, min: 0, max: 0, side: 1 };

/** The slab of fractional centre and thickness along an axis ('none' gives NO_SLAB). */
export function slabMake(axis: 'none' | 'x' | 'y' | 'z', center: number, thickness: number, box: Box): Slab {
  if (axis === 'none' || !(thickness > 0) || thickness >= 1 || !Number.isFinite(center)) return NO_SLAB;
  const a = 'xyz'.indexOf(axis);
  const side = [box.lx, box.ly, box.lz][a] / worldUnit(box);
  const c = center - Math.floor(center);
  let min = (c - thickness / 2) * side, max = (c + thickness / 2) * side;
  if (min < 0) min += side;
  if (max > side) max -= side;
  return { axis: a, min, max, side };
}

/** Whether a world coordinate along the slab axis lies in the slab. */
export function slabContains(s: Slab, v: number): boolean {
  if (s.axis < 0) return true;
  return s.min <= s.max ? v >= s.min && v <= s.max : v >= s.min || v <= s.max;
}

export interface ArrowOptions {
  /** Longest arrow in world units (before the user's scale). */
  readonly maxLength: number;
  /** Length ∝ log(1 + |r|/r_min) instead of |r|. */
  readonly log: boolean;
}

/**
 * Line segments (Float32, 6 numbers per segment, 3 segments per arrow: shaft and two head strokes) for
 * residual vectors `res` (3 per target) at world positions `world` (3 per target), for the targets
 * listed in `which`. Lengths scale with |r| (or log) so the longest is maxLength.
 */
export function arrowSegments(world: Float32Array, res: Float64Array, which: ArrayLike<number>, o: ArrowOptions): Float32Array {
  const m = which.length;
  const out = new Float32Array(m * 18);
  let rMax = 0, rMin = Infinity;
  for (let k = 0; k < m; k++) {
    const t = which[k];
    const r = Math.hypot(res[3 * t], res[3 * t + 1], res[3 * t + 2]);
    if (r > rMax) rMax = r;
    if (r > 0 && r < rMin) rMin = r;
  }
  if (!(rMax > 0)) return new Float32Array(0);
  const floor = Math.max(rMin, rMax * 1e-6);
  const lengthOf = (r: number) => (o.log ? (Math.log1p(r / floor) / Math.log1p(rMax / floor)) * o.maxLength : (r / rMax) * o.maxLength);
  let w = 0;
  for (let k = 0; k < m; k++) {
    const t = which[k];
    const rx = res[3 * t], ry = res[3 * t + 1], rz = res[3 * t + 2];
    const r = Math.hypot(rx, ry, rz);
    if (!(r > 0) || !Number.isFinite(r)) continue;
    const len = lengthOf(r);
    const ux = rx / r, uy = ry / r, uz = rz / r;
    const x0 = world[3 * t], y0 = world[3 * t + 1], z0 = world[3 * t + 2];
    const x1 = x0 + ux * len, y1 = y0 + uy * len, z1 = z0 + uz * len;
    // a unit vector across the shaft: u × (the axis least aligned with u)
    const ax = Math.abs(ux) < 0.6 ? [1, 0, 0] : Math.abs(uy) < 0.6 ? [0, 1, 0] : [0, 0, 1];
    let px = uy * ax[2] - uz * ax[1], py = uz * ax[0] - ux * ax[2], pz = ux * ax[1] - uy * ax[0];
    const pn = Math.hypot(px, py, pz);
    px /= pn; py /= pn; pz /= pn;
    const h = 0.28 * len;
    const bx = x1 - ux * h, by = y1 - uy * h, bz = z1 - uz * h;
    const seg = [x0, y0, z0, x1, y1, z1, x1, y1, z1, bx + px * h * 0.45, by + py * h * 0.45, bz + pz * h * 0.45, x1, y1, z1, bx - px * h * 0.45, by - py * h * 0.45, bz - pz * h * 0.45];
    out.set(seg, w);
    w += 18;
  }
  return out.subarray(0, w);
}

/**
 * The point nearest to the pixel (px, py) within `radius` pixels, among world points projected by the
 * column-major 4×4 matrix `viewProjection` onto a canvas of width × height; −1 when none. Points behind
 * the camera or rejected by `visible` are skipped; among points within the radius the nearest to the
 * camera wins ties of screen distance.
 */
export function pickNearest(
  world: Float32Array,
  viewProjection: ArrayLike<number>,
  width: number,
  height: number,
  px: number,
  py: number,
  radius: number,
  visible: (slot: number) => boolean = () => true,
): number {
  const m = viewProjection;
  let best = -1, bestD2 = radius * radius, bestDepth = Infinity;
  const n = world.length / 3;
  for (let s = 0; s < n; s++) {
    const x = world[3 * s], y = world[3 * s + 1], z = world[3 * s + 2];
    const w = m[3] * x + m[7] * y + m[11] * z + m[15];
    if (w <= 0) continue;
    const sx = ((m[0] * x + m[4] * y + m[8] * z + m[12]) / w + 1) * 0.5 * width;
    const sy = (1 - (m[1] * x + m[5] * y + m[9] * z + m[13]) / w) * 0.5 * height;
    const dx = sx - px, dy = sy - py;
    const d2 = dx * dx + dy * dy;
    if (d2 > bestD2 + 1e-9 || (Math.abs(d2 - bestD2) <= 1e-9 && w >= bestDepth)) continue;
    if (!visible(s)) continue;
    best = s;
    bestD2 = d2;
    bestDepth = w;
  }
  return best;
}
