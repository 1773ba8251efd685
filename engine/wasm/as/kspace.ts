// AssemblyScript source of the Fourier-space Ewald kernels (compiled to WebAssembly with SIMD by
// scripts/build-wasm.mjs; the JavaScript twin and the definitions are in engine/ewald/kSpace.ts).
// All arrays live in linear memory; pointers are byte offsets; f64 arrays, i32 column tables.
import { madd, nmadd } from './fma';

// Phase table: re/im of e^{i h θ}, h = 0..H, written at re[off + sign·h], by complex recurrence with an
// exact reset every 32 steps.
function phaseRow(theta: f64, H: i32, re: usize, im: usize, off: i32, sign: i32): void {
  const c1 = Math.cos(theta), s1 = Math.sin(theta);
  let c: f64 = 1, s: f64 = 0;
  store<f64>(re + (<usize>off << 3), 1);
  store<f64>(im + (<usize>off << 3), 0);
  for (let h = 1; h <= H; h++) {
    if ((h & 31) == 0) {
      c = Math.cos(<f64>h * theta);
      s = Math.sin(<f64>h * theta);
    } else {
      const cn = c * c1 - s * s1;
      s = s * c1 + c * s1;
      c = cn;
    }
    const idx = <usize>(off + sign * h) << 3;
    store<f64>(re + idx, c);
    store<f64>(im + idx, s);
  }
}

function phaseSymmetric(theta: f64, H: i32, re: usize, im: usize): void {
  phaseRow(theta, H, re, im, H, 1);
  for (let h = 1; h <= H; h++) {
    store<f64>(re + (<usize>(H - h) << 3), load<f64>(re + (<usize>(H + h) << 3)));
    store<f64>(im + (<usize>(H - h) << 3), -load<f64>(im + (<usize>(H + h) << 3)));
  }
}

// Scratch layout for phase tables: exr, exi (Hx+1), eyr, eyi (2Hy+1), ezr, ezi (2Hz+1), each padded by 2.
function phases(x: f64, y: f64, z: f64, tx: f64, ty: f64, tz: f64, Hx: i32, Hy: i32, Hz: i32, scratch: usize): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3;
  phaseRow(tx * x, Hx, scratch, scratch + nx, 0, 1);
  phaseSymmetric(ty * y, Hy, scratch + 2 * nx, scratch + 2 * nx + ny);
  phaseSymmetric(tz * z, Hz, scratch + 2 * nx + 2 * ny, scratch + 2 * nx + 2 * ny + (<usize>(2 * Hz + 3) << 3));
}

// Bytes of one particle's phase tables in the scratch area (16-byte aligned).
@inline function phaseBytes(Hx: i32, Hy: i32, Hz: i32): usize {
  return ((<usize>(Hx + 3 + 2 * Hy + 3 + 2 * Hz + 3) << 4) + 15) & ~(<usize>15);
}

/**
 * Adds Σ_j m_j e^{ik·r_j} over particles [begin, end) into sr, si (one f64 each per half-space k).
 * Particles go two at a time (phase tables at scratch and scratch + phaseBytes), so each S(k) is loaded
 * and stored once per pair of particles.
 */
export function structureFactor(
  pos: usize, mass: usize, begin: i32, end: i32,
  nCol: i32, colHx: usize, colHy: usize, colHz0: usize, colHz1: usize, colK0: usize,
  Hx: i32, Hy: i32, Hz: i32, tx: f64, ty: f64, tz: f64,
  sr: usize, si: usize, scratch: usize,
): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3, nz = <usize>(2 * Hz + 3) << 3;
  const exr = scratch, exi = scratch + nx, eyr = scratch + 2 * nx, eyi = eyr + ny, ezr = eyr + 2 * ny, ezi = ezr + nz;
  const second = phaseBytes(Hx, Hy, Hz);
  let i = begin;
  for (; i + 1 < end; i += 2) {
    const m0 = load<f64>(mass + (<usize>i << 3)), m1 = load<f64>(mass + (<usize>i << 3), 8);
    const p = pos + <usize>(3 * i) * 8;
    phases(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), tx, ty, tz, Hx, Hy, Hz, scratch);
    phases(load<f64>(p, 24), load<f64>(p, 32), load<f64>(p, 40), tx, ty, tz, Hx, Hy, Hz, scratch + second);
    for (let col = 0; col < nCol; col++) {
      const hxo = <usize>load<i32>(colHx + (<usize>col << 2)) << 3;
      const hyo = <usize>(load<i32>(colHy + (<usize>col << 2)) + Hy) << 3;
      const axr = load<f64>(exr + hxo), axi = load<f64>(exi + hxo);
      const byr = load<f64>(eyr + hyo), byi = load<f64>(eyi + hyo);
      const bxr = load<f64>(exr + second + hxo), bxi = load<f64>(exi + second + hxo);
      const cyr = load<f64>(eyr + second + hyo), cyi = load<f64>(eyi + second + hyo);
      const cr0 = m0 * (axr * byr - axi * byi), ci0 = m0 * (axr * byi + axi * byr);
      const cr1 = m1 * (bxr * cyr - bxi * cyi), ci1 = m1 * (bxr * cyi + bxi * cyr);
      const crv0 = f64x2.splat(cr0), civ0 = f64x2.splat(ci0), crv1 = f64x2.splat(cr1), civ1 = f64x2.splat(ci1);
      let hz = load<i32>(colHz0 + (<usize>col << 2)) + Hz;
      const z1 = load<i32>(colHz1 + (<usize>col << 2)) + Hz;
      let k = load<i32>(colK0 + (<usize>col << 2));
      for (; hz < z1; hz += 2, k += 2) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr0 = v128.load(ezr + zo), zi0 = v128.load(ezi + zo);
        const zr1 = v128.load(ezr + second + zo), zi1 = v128.load(ezi + second + zo);
        // Two independent chains per part (particle 0 onto S, particle 1 apart), joined by one add.
        const re0 = nmadd(civ0, zi0, madd(crv0, zr0, v128.load(sr + ko)));
        const re1 = nmadd(civ1, zi1, f64x2.mul(crv1, zr1));
        const im0 = madd(civ0, zr0, madd(crv0, zi0, v128.load(si + ko)));
        const im1 = madd(civ1, zr1, f64x2.mul(crv1, zi1));
        v128.store(sr + ko, f64x2.add(re0, re1));
        v128.store(si + ko, f64x2.add(im0, im1));
      }
      if (hz == z1) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr0 = load<f64>(ezr + zo), zi0 = load<f64>(ezi + zo);
        const zr1 = load<f64>(ezr + second + zo), zi1 = load<f64>(ezi + second + zo);
        store<f64>(sr + ko, load<f64>(sr + ko) + ((cr0 * zr0 - ci0 * zi0) + (cr1 * zr1 - ci1 * zi1)));
        store<f64>(si + ko, load<f64>(si + ko) + ((cr0 * zi0 + ci0 * zr0) + (cr1 * zi1 + ci1 * zr1)));
      }
    }
  }
  for (; i < end; i++) {
    const m = load<f64>(mass + (<usize>i << 3));
    if (m == 0) continue;
    const p = pos + <usize>(3 * i) * 8;
    phases(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), tx, ty, tz, Hx, Hy, Hz, scratch);
    for (let col = 0; col < nCol; col++) {
      const hx = load<i32>(colHx + (<usize>col << 2));
      const hy = load<i32>(colHy + (<usize>col << 2)) + Hy;
      const axr = load<f64>(exr + (<usize>hx << 3)), axi = load<f64>(exi + (<usize>hx << 3));
      const byr = load<f64>(eyr + (<usize>hy << 3)), byi = load<f64>(eyi + (<usize>hy << 3));
      const cr = m * (axr * byr - axi * byi), ci = m * (axr * byi + axi * byr);
      const crv = f64x2.splat(cr), civ = f64x2.splat(ci);
      let hz = load<i32>(colHz0 + (<usize>col << 2)) + Hz;
      const z1 = load<i32>(colHz1 + (<usize>col << 2)) + Hz;
      let k = load<i32>(colK0 + (<usize>col << 2));
      for (; hz < z1; hz += 2, k += 2) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = v128.load(ezr + zo), zi = v128.load(ezi + zo);
        v128.store(sr + ko, nmadd(civ, zi, madd(crv, zr, v128.load(sr + ko))));
        v128.store(si + ko, madd(civ, zr, madd(crv, zi, v128.load(si + ko))));
      }
      if (hz == z1) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = load<f64>(ezr + zo), zi = load<f64>(ezi + zo);
        store<f64>(sr + ko, load<f64>(sr + ko) + (cr * zr - ci * zi));
        store<f64>(si + ko, load<f64>(si + ko) + (cr * zi + ci * zr));
      }
    }
  }
}

/**
 * For targets[begin..end): adds Σ_half −k·Im[e^{ik·r} conj(W)] (per unit 2π/L) into acc (3 per target)
 * and Σ_half Re[e^{ik·r} conj(W)] into phi; wr, wi = 2W_k·S(k). Per column of constant (hx, hy) the
 * phase splits as e^{ik·r} = c·z_hz, so the column sums Σ z conj(W) and Σ hz·z conj(W) are formed first
 * and multiplied by c once.
 */
export function fourierTargets(
  pos: usize, targets: usize, begin: i32, end: i32,
  nCol: i32, colHx: usize, colHy: usize, colHz0: usize, colHz1: usize, colK0: usize,
  Hx: i32, Hy: i32, Hz: i32, tx: f64, ty: f64, tz: f64,
  wr: usize, wi: usize, acc: usize, phi: usize, scratch: usize,
): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3, nz = <usize>(2 * Hz + 3) << 3;
  const exr = scratch, exi = scratch + nx, eyr = scratch + 2 * nx, eyi = eyr + ny, ezr = eyr + 2 * ny, ezi = ezr + nz;
  const two = f64x2.splat(2);
  for (let t = begin; t < end; t++) {
    const i = load<i32>(targets + (<usize>t << 2));
    const p = pos + <usize>(3 * i) * 8;
    phases(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), tx, ty, tz, Hx, Hy, Hz, scratch);
    let gx: f64 = 0, gy: f64 = 0, gz: f64 = 0, pot: f64 = 0;
    for (let col = 0; col < nCol; col++) {
      const hxRaw = load<i32>(colHx + (<usize>col << 2));
      const hyRaw = load<i32>(colHy + (<usize>col << 2));
      const hy = hyRaw + Hy;
      const axr = load<f64>(exr + (<usize>hxRaw << 3)), axi = load<f64>(exi + (<usize>hxRaw << 3));
      const byr = load<f64>(eyr + (<usize>hy << 3)), byi = load<f64>(eyi + (<usize>hy << 3));
      const cr = axr * byr - axi * byi, ci = axr * byi + axi * byr;
      const hz0 = load<i32>(colHz0 + (<usize>col << 2));
      let hz = hz0 + Hz;
      const z1 = load<i32>(colHz1 + (<usize>col << 2)) + Hz;
      let k = load<i32>(colK0 + (<usize>col << 2));
      // w = z·conj(W): a0 = Σ w, a1 = Σ hz·w (re and im parts)
      let a0r = f64x2.splat(0), a0i = f64x2.splat(0), a1r = f64x2.splat(0), a1i = f64x2.splat(0);
      let hzv = f64x2.replace_lane(f64x2.splat(<f64>hz0), 1, <f64>(hz0 + 1));
      for (; hz < z1; hz += 2, k += 2) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = v128.load(ezr + zo), zi = v128.load(ezi + zo);
        const sr = v128.load(wr + ko), si = v128.load(wi + ko);
        const w_r = madd(zi, si, f64x2.mul(zr, sr));
        const w_i = nmadd(zr, si, f64x2.mul(zi, sr));
        a0r = f64x2.add(a0r, w_r);
        a0i = f64x2.add(a0i, w_i);
        a1r = madd(hzv, w_r, a1r);
        a1i = madd(hzv, w_i, a1i);
        hzv = f64x2.add(hzv, two);
      }
      let s0r = f64x2.extract_lane(a0r, 0) + f64x2.extract_lane(a0r, 1);
      let s0i = f64x2.extract_lane(a0i, 0) + f64x2.extract_lane(a0i, 1);
      let s1r = f64x2.extract_lane(a1r, 0) + f64x2.extract_lane(a1r, 1);
      let s1i = f64x2.extract_lane(a1i, 0) + f64x2.extract_lane(a1i, 1);
      if (hz == z1) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = load<f64>(ezr + zo), zi = load<f64>(ezi + zo);
        const sr = load<f64>(wr + ko), si = load<f64>(wi + ko);
        const w_r = zr * sr + zi * si, w_i = zi * sr - zr * si;
        const h = <f64>(hz - Hz);
        s0r += w_r;
        s0i += w_i;
        s1r += h * w_r;
        s1i += h * w_i;
      }
      // e·conj(W) summed = c·(s0r + i s0i); the hz-weighted imaginary part = Im(c·s1)
      const ims = cr * s0i + ci * s0r;
      gx -= <f64>hxRaw * ims;
      gy -= <f64>hyRaw * ims;
      gz -= cr * s1i + ci * s1r;
      pot += cr * s0r - ci * s0i;
    }
    const a = acc + <usize>(3 * t) * 8;
    store<f64>(a, load<f64>(a) + gx * tx);
    store<f64>(a, load<f64>(a, 8) + gy * ty, 8);
    store<f64>(a, load<f64>(a, 16) + gz * tz, 16);
    store<f64>(phi + (<usize>t << 3), load<f64>(phi + (<usize>t << 3)) + pot);
  }
}
