// AssemblyScript source of the real-space Ewald kernels (JavaScript twin and definitions:
// engine/ewald/realSpace.ts). Sorted particles in SoA arrays xs, ys, zs, ms; the kernel table holds 12
// f64 per interval: the degree-5 monomial coefficients in t ∈ [−1,1] of forceP and potQ, paired per
// power (P0, Q0, P1, Q1, …, P5, Q5) so that one 128-bit load serves both functions.
// Pair terms: F = f_short − α³P(u), Ψ = ψ_short − αQ(u) for r < rCut, f_short − 1/r³ beyond (softening only).

import { madd, nmadd } from './fma';

// Kernel parameters, set once per context by setKernel.
let gAlpha: f64 = 0;
let gAlpha3: f64 = 0;
let gRc2: f64 = 0;
let gRs2: f64 = 0;
let gRl2: f64 = 0;
let gUScale: f64 = 0;
let gUClamp: f64 = 0;
let gTable: usize = 0;
let gSoftKind: i32 = 0; // 0 none, 1 Plummer, 2 cubic spline
let gSoftLen: f64 = 0; // ε or h
// Scalar pair results.
let gF: f64 = 0;
let gP: f64 = 0;

export function setKernel(alpha: f64, rCut: f64, rSoft: f64, perUnit: f64, uMax: f64, table: usize, softKind: i32, softLen: f64): void {
  gAlpha = alpha;
  gAlpha3 = alpha * alpha * alpha;
  gRc2 = rCut * rCut;
  gRs2 = rSoft * rSoft;
  gRl2 = gRc2 > gRs2 ? gRc2 : gRs2;
  gUScale = alpha * alpha * perUnit;
  gUClamp = uMax * perUnit;
  gTable = table;
  gSoftKind = softKind;
  gSoftLen = softLen;
}

// forceP and potQ at t ∈ [−1,1] of the interval at o, as the lanes (P, Q) of one vector. Estrin's scheme
// (c0 + c1 t) + t²((c2 + c3 t) + t²(c4 + c5 t)): half the dependent steps of Horner's.
@inline function hornerPQ(o: usize, t: f64): v128 {
  const tv = f64x2.splat(t);
  const t2 = f64x2.mul(tv, tv);
  const a = madd(tv, v128.load(o, 16), v128.load(o));
  const b = madd(tv, v128.load(o, 48), v128.load(o, 32));
  const c = madd(tv, v128.load(o, 80), v128.load(o, 64));
  return madd(t2, madd(t2, c, b), a);
}

// Generic scalar pair (any r2 < gRl2, r2 > 0 or softened): sets gF, gP.
function pairScalar(r2: f64): void {
  let fs: f64, ps: f64;
  if (r2 < gRs2) {
    if (gSoftKind == 1) {
      const q = r2 + gSoftLen * gSoftLen;
      const iq = 1.0 / Math.sqrt(q);
      fs = iq * iq * iq;
      ps = iq;
    } else {
      const h = gSoftLen;
      const r = Math.sqrt(r2);
      const u = r / h;
      const u2 = u * u;
      const h3 = h * h * h;
      if (u < 0.5) {
        fs = (32.0 / 3.0 + u2 * (-192.0 / 5.0 + 32.0 * u)) / h3;
        ps = (14.0 / 5.0 + u2 * (-16.0 / 3.0 + u2 * (48.0 / 5.0 - (32.0 / 5.0) * u))) / h;
      } else {
        fs = (64.0 / 3.0 - 48.0 * u + (192.0 / 5.0) * u2 - (32.0 / 3.0) * u2 * u - 1.0 / (15.0 * u2 * u)) / h3;
        ps = (16.0 / 5.0 - 1.0 / (15.0 * u) + u2 * (-32.0 / 3.0 + u * (16.0 + u * (-48.0 / 5.0 + (32.0 / 15.0) * u)))) / h;
      }
    }
  } else {
    const ir = 1.0 / Math.sqrt(r2);
    fs = ir * ir * ir;
    ps = ir;
  }
  if (r2 < gRc2) {
    const s = r2 * gUScale;
    const iv = <i32>s;
    const t = 2.0 * (s - <f64>iv) - 1.0;
    const pq = hornerPQ(gTable + <usize>iv * 96, t);
    gF = fs - gAlpha3 * f64x2.extract_lane(pq, 0);
    gP = ps - gAlpha * f64x2.extract_lane(pq, 1);
  } else {
    const ir = 1.0 / Math.sqrt(r2);
    gF = fs - ir * ir * ir;
    gP = ps - ir;
  }
}

// Accumulators for the i particle of the current inner loop (vector lanes summed at the end).
let vAx: v128 = f64x2.splat(0);
let vAy: v128 = f64x2.splat(0);
let vAz: v128 = f64x2.splat(0);
let vPp: v128 = f64x2.splat(0);

/**
 * Pair terms of particle (px,py,pz) with sources j0..j1−1 (skipping `skip` when `checkSkip`), added into
 * vAx.. with sign −m_j F d (and Σ m_j Ψ). When `symmetric`, also adds +m_i F d, m_i Ψ into the sources'
 * accumulators. `soft`: a softening radius is set, so some lanes may need the scalar path. The flags are
 * compile-time constants at every call, so each combination is its own specialised loop.
 * Two sources per step; an odd last source runs as a vector step whose second lane is masked off: that
 * lane reads the slot j1 (the next cell's first particle, or the zero padding after the last one) and, when
 * `symmetric`, writes its accumulators back unchanged (m_i·0 added).
 */
@inline function pairRun(
  px: f64, py: f64, pz: f64, mi: f64, symmetric: bool, soft: bool, checkSkip: bool, j0: i32, j1: i32, skip: i32,
  xs: usize, ys: usize, zs: usize, ms: usize, ax: usize, ay: usize, az: usize, ph: usize,
): void {
  const pxv = f64x2.splat(px), pyv = f64x2.splat(py), pzv = f64x2.splat(pz);
  const rl2v = f64x2.splat(gRl2), rc2v = f64x2.splat(gRc2), rs2v = f64x2.splat(gRs2);
  const uScaleV = f64x2.splat(gUScale), uClampV = f64x2.splat(gUClamp);
  const a3v = f64x2.splat(gAlpha3), a1v = f64x2.splat(gAlpha);
  const one = f64x2.splat(1.0), two = f64x2.splat(2.0), magic = f64x2.splat(4503599627370496.0);
  const miv = f64x2.splat(mi);
  const both = i64x2.splat(-1), first = i64x2(-1, 0);
  const table = gTable;
  let sAx = f64x2.splat(0), sAy = f64x2.splat(0), sAz = f64x2.splat(0), sPp = f64x2.splat(0);
  for (let j = j0; j < j1; j += 2) {
    const jo = <usize>j << 3;
    const dx = f64x2.sub(pxv, v128.load(xs + jo));
    const dy = f64x2.sub(pyv, v128.load(ys + jo));
    const dz = f64x2.sub(pzv, v128.load(zs + jo));
    const r2 = madd(dz, dz, madd(dy, dy, f64x2.mul(dx, dx)));
    const inside = v128.and(f64x2.lt(r2, rl2v), select<v128>(both, first, j + 1 < j1));
    if (!v128.any_true(inside)) continue;
    // Lanes that need the scalar path: softened, beyond rCut (softening only), or the skipped self term.
    let scalar = false;
    if (soft) scalar = v128.any_true(v128.and(inside, v128.or(f64x2.lt(r2, rs2v), f64x2.ge(r2, rc2v))));
    if (checkSkip) scalar = scalar || j == skip || j + 1 == skip;
    if (scalar) {
      for (let l = 0; l < 2; l++) {
        const jj = j + l;
        if (jj >= j1 || (checkSkip && jj == skip)) continue;
        const ddx = px - load<f64>(xs + (<usize>jj << 3));
        const ddy = py - load<f64>(ys + (<usize>jj << 3));
        const ddz = pz - load<f64>(zs + (<usize>jj << 3));
        const rr = ddx * ddx + ddy * ddy + ddz * ddz;
        if (rr >= gRl2) continue;
        pairScalar(rr);
        const mj = load<f64>(ms + (<usize>jj << 3));
        const fx = gF * ddx, fy = gF * ddy, fz = gF * ddz;
        sAx = f64x2.sub(sAx, f64x2.replace_lane(f64x2.splat(0), 0, mj * fx));
        sAy = f64x2.sub(sAy, f64x2.replace_lane(f64x2.splat(0), 0, mj * fy));
        sAz = f64x2.sub(sAz, f64x2.replace_lane(f64x2.splat(0), 0, mj * fz));
        sPp = f64x2.add(sPp, f64x2.replace_lane(f64x2.splat(0), 0, mj * gP));
        if (symmetric) {
          const jo2 = <usize>jj << 3;
          store<f64>(ax + jo2, load<f64>(ax + jo2) + mi * fx);
          store<f64>(ay + jo2, load<f64>(ay + jo2) + mi * fy);
          store<f64>(az + jo2, load<f64>(az + jo2) + mi * fz);
          store<f64>(ph + jo2, load<f64>(ph + jo2) + mi * gP);
        }
      }
      continue;
    }
    const ir = f64x2.div(one, f64x2.sqrt(r2));
    // Interval index and local variable; pmin is a plain minimum (r2 is never NaN here). Adding 2^52 to
    // the floored index puts it in the low bits of the double.
    const s = f64x2.pmin(f64x2.mul(r2, uScaleV), uClampV);
    const fl = f64x2.floor(s);
    const t = f64x2.sub(f64x2.mul(two, f64x2.sub(s, fl)), one);
    const bits = f64x2.add(fl, magic);
    const pq0 = hornerPQ(table + <usize>i32x4.extract_lane(bits, 0) * 96, f64x2.extract_lane(t, 0));
    const pq1 = hornerPQ(table + <usize>i32x4.extract_lane(bits, 2) * 96, f64x2.extract_lane(t, 1));
    const P = f64x2.shuffle(pq0, pq1, 0, 2);
    const Q = f64x2.shuffle(pq0, pq1, 1, 3);
    // The mask clears every bit of a lane outside (also an infinity from a coincident masked-off lane).
    const F = v128.and(nmadd(a3v, P, f64x2.mul(f64x2.mul(ir, ir), ir)), inside);
    const Pot = v128.and(nmadd(a1v, Q, ir), inside);
    const mj = v128.load(ms + jo);
    const fx = f64x2.mul(F, dx), fy = f64x2.mul(F, dy), fz = f64x2.mul(F, dz);
    sAx = nmadd(mj, fx, sAx);
    sAy = nmadd(mj, fy, sAy);
    sAz = nmadd(mj, fz, sAz);
    sPp = madd(mj, Pot, sPp);
    if (symmetric) {
      v128.store(ax + jo, madd(miv, fx, v128.load(ax + jo)));
      v128.store(ay + jo, madd(miv, fy, v128.load(ay + jo)));
      v128.store(az + jo, madd(miv, fz, v128.load(az + jo)));
      v128.store(ph + jo, madd(miv, Pot, v128.load(ph + jo)));
    }
  }
  vAx = f64x2.add(vAx, sAx);
  vAy = f64x2.add(vAy, sAy);
  vAz = f64x2.add(vAz, sAz);
  vPp = f64x2.add(vPp, sPp);
}

@inline function hsum(v: v128): f64 {
  return f64x2.extract_lane(v, 0) + f64x2.extract_lane(v, 1);
}

// Squared distance from a coordinate to the interval [b, b+w].
@inline function gap2(x: f64, b: f64, w: f64): f64 {
  const d = max(0.0, max(b - x, x - b - w));
  return d * d;
}

@inline function floorDiv(a: i32, b: i32): i32 {
  return <i32>Math.floor(<f64>a / <f64>b);
}

// Widening (in cells) of a particle's z reach: cells are found by floor(z/w) in the sort and from z ± reach
// here; the margin keeps a rounding of either from dropping a cell that holds a pair inside the loop radius.
const REACH_MARGIN: f64 = 1e-9;

/**
 * Pair terms of particle slot i (position x, y, z) with one stencil column: the cells (ix, iy, iz') of the
 * unwrapped grid for iz' in [lo, hi], cut into runs by periodic image (cells of one column are consecutive
 * in the sorted order, so each image's cells form one run of sources). ix, iy are unwrapped; shifts follow.
 * `fromNext`: in the image holding cell `own`, the run starts after i (the half stencil's own column).
 */
@inline function columnRuns(
  i: i32, x: f64, y: f64, z: f64, mi: f64, ix: i32, iy: i32, lo: i32, hi: i32, own: i32, symmetric: bool, fromNext: bool, checkSkip: bool,
  nx: i32, ny: i32, nz: i32, lx: f64, ly: f64, lz: f64, start: usize,
  xs: usize, ys: usize, zs: usize, ms: usize, ax: usize, ay: usize, az: usize, ph: usize,
): void {
  const soft = gRs2 > 0;
  let px = x, py = y;
  if (ix < 0 || ix >= nx) { const f = floorDiv(ix, nx); ix -= f * nx; px -= <f64>f * lx; }
  if (iy < 0 || iy >= ny) { const f = floorDiv(iy, ny); iy -= f * ny; py -= <f64>f * ly; }
  const base = start + (<usize>((ix * ny + iy) * nz) << 2);
  let k = floorDiv(lo, nz);
  while (lo <= hi) {
    const kz = k * nz;
    const top = min(hi, kz + nz - 1);
    let j0 = load<i32>(base + (<usize>(lo - kz) << 2));
    const j1 = load<i32>(base + (<usize>(top - kz + 1) << 2));
    const pz = z - <f64>k * lz;
    const home = own >= lo && own <= top;
    if (fromNext && home) j0 = i + 1;
    if (j0 < j1) {
      if (checkSkip && home) pairRun(px, py, pz, mi, symmetric, true, true, j0, j1, i, xs, ys, zs, ms, ax, ay, az, ph);
      else if (soft) pairRun(px, py, pz, mi, symmetric, true, false, j0, j1, -1, xs, ys, zs, ms, ax, ay, az, ph);
      else pairRun(px, py, pz, mi, symmetric, false, false, j0, j1, -1, xs, ys, zs, ms, ax, ay, az, ph);
    }
    lo = top + 1;
    k++;
  }
}

/**
 * All particles, each pair once (half stencil): cells [cellBegin, cellEnd) of an nx×ny×nz grid;
 * start: i32 cell offsets (nCells+1); columns: 4 i32 per stencil column (ox, oy, ozLow, ozHigh), the half
 * stencil's (cellColumns in engine/ewald/cellList.ts), the own column (0,0) first with ozLow = 0.
 * Each particle meets a column in one run per periodic image, over the cells its loop sphere reaches.
 * Adds into the SoA sorted accumulators ax, ay, az, ph.
 */
export function realSpaceAll(
  cellBegin: i32, cellEnd: i32, nx: i32, ny: i32, nz: i32, lx: f64, ly: f64, lz: f64,
  wx: f64, wy: f64, wz: f64, start: usize, columns: usize, nColumns: i32,
  xs: usize, ys: usize, zs: usize, ms: usize, ax: usize, ay: usize, az: usize, ph: usize,
): void {
  const rl2 = gRl2;
  const izw = 1.0 / wz;
  for (let cell0 = cellBegin; cell0 < cellEnd; cell0++) {
    const i0 = load<i32>(start + (<usize>cell0 << 2)), i1 = load<i32>(start + (<usize>cell0 << 2), 4);
    if (i0 == i1) continue;
    const cz = cell0 % nz;
    const cy = ((cell0 - cz) / nz) % ny;
    const cx = (cell0 - cz - cy * nz) / (ny * nz);
    for (let q = 0; q < nColumns; q++) {
      const co = columns + <usize>(16 * q);
      const ix = cx + load<i32>(co), iy = cy + load<i32>(co, 4);
      const zLow = cz + load<i32>(co, 8), zHigh = cz + load<i32>(co, 12);
      const own = q == 0;
      // Column's lower corner in the unwrapped frame (for per-particle pruning).
      const bx = <f64>ix * wx, by = <f64>iy * wy;
      for (let i = i0; i < i1; i++) {
        const io = <usize>i << 3;
        const x = load<f64>(xs + io), y = load<f64>(ys + io), z = load<f64>(zs + io);
        const d2 = own ? 0.0 : gap2(x, bx, wx) + gap2(y, by, wy);
        if (d2 >= rl2) continue;
        const reach = Math.sqrt(rl2 - d2);
        const lo = own ? cz : <i32>max(<f64>zLow, Math.floor((z - reach) * izw - REACH_MARGIN));
        const hi = <i32>min(<f64>zHigh, Math.floor((z + reach) * izw + REACH_MARGIN));
        if (lo > hi) continue;
        vAx = f64x2.splat(0); vAy = f64x2.splat(0); vAz = f64x2.splat(0); vPp = f64x2.splat(0);
        columnRuns(i, x, y, z, load<f64>(ms + io), ix, iy, lo, hi, cz, true, own, false, nx, ny, nz, lx, ly, lz, start, xs, ys, zs, ms, ax, ay, az, ph);
        store<f64>(ax + io, load<f64>(ax + io) + hsum(vAx));
        store<f64>(ay + io, load<f64>(ay + io) + hsum(vAy));
        store<f64>(az + io, load<f64>(az + io) + hsum(vAz));
        store<f64>(ph + io, load<f64>(ph + io) + hsum(vPp));
      }
    }
  }
}

/**
 * Per-target real-space sums (full stencil): targets are sorted slots tslot[begin..end) with wrapped
 * positions; columns: the full stencil's (4 i32 each, as realSpaceAll). Writes (adds) acc[3(t−begin)..] and
 * phi[t−begin] (AoS, chunk-relative).
 */
export function realSpaceTargets(
  tslot: usize, begin: i32, end: i32, nx: i32, ny: i32, nz: i32, lx: f64, ly: f64, lz: f64,
  wx: f64, wy: f64, wz: f64, start: usize, columns: usize, nColumns: i32,
  xs: usize, ys: usize, zs: usize, ms: usize, acc: usize, phi: usize,
): void {
  const rl2 = gRl2;
  const izw = 1.0 / wz;
  for (let t = begin; t < end; t++) {
    const si = load<i32>(tslot + (<usize>t << 2));
    const io = <usize>si << 3;
    const x = load<f64>(xs + io), y = load<f64>(ys + io), z = load<f64>(zs + io);
    let cx = <i32>Math.floor(x / wx), cy = <i32>Math.floor(y / wy), cz = <i32>Math.floor(z / wz);
    if (cx >= nx) cx = nx - 1;
    if (cy >= ny) cy = ny - 1;
    if (cz >= nz) cz = nz - 1;
    if (cx < 0) cx = 0;
    if (cy < 0) cy = 0;
    if (cz < 0) cz = 0;
    vAx = f64x2.splat(0); vAy = f64x2.splat(0); vAz = f64x2.splat(0); vPp = f64x2.splat(0);
    for (let q = 0; q < nColumns; q++) {
      const co = columns + <usize>(16 * q);
      const ix = cx + load<i32>(co), iy = cy + load<i32>(co, 4);
      const d2 = gap2(x, <f64>ix * wx, wx) + gap2(y, <f64>iy * wy, wy);
      if (d2 >= rl2) continue;
      const reach = Math.sqrt(rl2 - d2);
      const lo = <i32>max(<f64>(cz + load<i32>(co, 8)), Math.floor((z - reach) * izw - REACH_MARGIN));
      const hi = <i32>min(<f64>(cz + load<i32>(co, 12)), Math.floor((z + reach) * izw + REACH_MARGIN));
      if (lo > hi) continue;
      // The target's own cell (zero shift) is met in the column (0, 0); its own slot is skipped there.
      const own = load<i32>(co) == 0 && load<i32>(co, 4) == 0 ? cz : -0x7fffffff;
      columnRuns(si, x, y, z, 0, ix, iy, lo, hi, own, false, false, true, nx, ny, nz, lx, ly, lz, start, xs, ys, zs, ms, 0, 0, 0, 0);
    }
    const a = acc + <usize>(24 * (t - begin));
    store<f64>(a, load<f64>(a) + hsum(vAx));
    store<f64>(a, load<f64>(a, 8) + hsum(vAy), 8);
    store<f64>(a, load<f64>(a, 16) + hsum(vAz), 16);
    const p = phi + (<usize>(t - begin) << 3);
    store<f64>(p, load<f64>(p) + hsum(vPp));
  }
}
