// AssemblyScript source of the Fourier-space Ewald kernels (compiled to WebAssembly with SIMD by
// scripts/build-wasm.mjs; the JavaScript twin and the definitions are in engine/ewald/kSpace.ts).
// All arrays live in linear memory; pointers are byte offsets; f64 arrays, i32 column tables.

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

/** Adds Σ_j m_j e^{ik·r_j} over particles [begin, end) into sr, si (one f64 each per half-space k). */
export function structureFactor(
  pos: usize, mass: usize, begin: i32, end: i32,
  nCol: i32, colHx: usize, colHy: usize, colHz0: usize, colHz1: usize, colK0: usize,
  Hx: i32, Hy: i32, Hz: i32, tx: f64, ty: f64, tz: f64,
  sr: usize, si: usize, scratch: usize,
): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3, nz = <usize>(2 * Hz + 3) << 3;
  const exr = scratch, exi = scratch + nx, eyr = scratch + 2 * nx, eyi = eyr + ny, ezr = eyr + 2 * ny, ezi = ezr + nz;
  for (let i = begin; i < end; i++) {
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
        v128.store(sr + ko, f64x2.add(v128.load(sr + ko), f64x2.sub(f64x2.mul(crv, zr), f64x2.mul(civ, zi))));
        v128.store(si + ko, f64x2.add(v128.load(si + ko), f64x2.add(f64x2.mul(crv, zi), f64x2.mul(civ, zr))));
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
 * and Σ_half Re[e^{ik·r} conj(W)] into phi; wr, wi = 2W_k·S(k).
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
      const crv = f64x2.splat(cr), civ = f64x2.splat(ci);
      const hz0 = load<i32>(colHz0 + (<usize>col << 2));
      let hz = hz0 + Hz;
      const z1 = load<i32>(colHz1 + (<usize>col << 2)) + Hz;
      let k = load<i32>(colK0 + (<usize>col << 2));
      let im = f64x2.splat(0), imz = f64x2.splat(0), re = f64x2.splat(0);
      let hzv = f64x2.replace_lane(f64x2.splat(<f64>hz0), 1, <f64>(hz0 + 1));
      for (; hz < z1; hz += 2, k += 2) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = v128.load(ezr + zo), zi = v128.load(ezi + zo);
        const er = f64x2.sub(f64x2.mul(crv, zr), f64x2.mul(civ, zi));
        const ei = f64x2.add(f64x2.mul(crv, zi), f64x2.mul(civ, zr));
        const sr = v128.load(wr + ko), si = v128.load(wi + ko);
        const v = f64x2.sub(f64x2.mul(ei, sr), f64x2.mul(er, si));
        im = f64x2.add(im, v);
        imz = f64x2.add(imz, f64x2.mul(hzv, v));
        re = f64x2.add(re, f64x2.add(f64x2.mul(er, sr), f64x2.mul(ei, si)));
        hzv = f64x2.add(hzv, two);
      }
      let ims = f64x2.extract_lane(im, 0) + f64x2.extract_lane(im, 1);
      let imzs = f64x2.extract_lane(imz, 0) + f64x2.extract_lane(imz, 1);
      let res = f64x2.extract_lane(re, 0) + f64x2.extract_lane(re, 1);
      if (hz == z1) {
        const zo = <usize>hz << 3, ko = <usize>k << 3;
        const zr = load<f64>(ezr + zo), zi = load<f64>(ezi + zo);
        const er = cr * zr - ci * zi, ei = cr * zi + ci * zr;
        const sr = load<f64>(wr + ko), si = load<f64>(wi + ko);
        const v = ei * sr - er * si;
        ims += v;
        imzs += <f64>(hz - Hz) * v;
        res += er * sr + ei * si;
      }
      gx -= <f64>hxRaw * ims;
      gy -= <f64>hyRaw * ims;
      gz -= imzs;
      pot += res;
    }
    const a = acc + <usize>(3 * t) * 8;
    store<f64>(a, load<f64>(a) + gx * tx);
    store<f64>(a, load<f64>(a, 8) + gy * ty, 8);
    store<f64>(a, load<f64>(a, 16) + gz * tz, 16);
    store<f64>(phi + (<usize>t << 3), load<f64>(phi + (<usize>t << 3)) + pot);
  }
}
