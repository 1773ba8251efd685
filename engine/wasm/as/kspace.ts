// AssemblyScript source of the Fourier-space Ewald kernels (compiled to WebAssembly with SIMD by
// scripts/build-wasm.mjs; the JavaScript twin and the definitions are in engine/ewald/kSpace.ts).
// All arrays live in linear memory; pointers are byte offsets; f64 arrays, i32 column tables.
// Within a column (hx, hy) of the half-space k-vectors, +h and −h along z have conjugate phases,
// z_{−h} = conj(z_h), so one phase a + ib serves both: the kernels run over slots of h ≥ 0 per column
// (h0..h1, padded to an even count so that two slots share a vector), each standing for the k-vectors
// hz = ±h of the column; per pair of slots a block of v128 values holds the sums of both lanes. Against
// one k-vector per step this halves the multiply-adds of the structure factor and, with 4 numbers per
// slot, keeps the evaluation's stream of weights as small as before (measured 2026-12-02, one thread,
// N = 16384, tol 1e-6: structure factor 80 → 65 ms, evaluation 122 → 96 ms).
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

// Scratch layout for phase tables: exr, exi (Hx+1), eyr, eyi (2Hy+1), ezr, ezi (Hz+1 used of 2Hz+1), each
// padded by 2. Bytes of one particle's phase tables in the scratch area (16-byte aligned):
@inline function phaseBytes(Hx: i32, Hy: i32, Hz: i32): usize {
  return ((<usize>(Hx + 3 + 2 * Hy + 3 + 2 * Hz + 3) << 4) + 15) & ~(<usize>15);
}

// Phase tables: x row 0..Hx, y symmetric −Hy..Hy, z row 0..Hz.
function phases(x: f64, y: f64, z: f64, tx: f64, ty: f64, tz: f64, Hx: i32, Hy: i32, Hz: i32, scratch: usize): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3;
  phaseRow(tx * x, Hx, scratch, scratch + nx, 0, 1);
  phaseSymmetric(ty * y, Hy, scratch + 2 * nx, scratch + 2 * nx + ny);
  phaseRow(tz * z, Hz, scratch + 2 * nx + 2 * ny, scratch + 2 * nx + 2 * ny + (<usize>(2 * Hz + 3) << 3), 0, 1);
}

/**
 * Adds, over particles [begin, end), with c = m e^{i(hx x + hy y)} = cr + i ci and z_h = a + ib:
 * U = Σ cr a, V = Σ ci b, X = Σ cr b, Y = Σ ci a per slot (blocks of 4 v128: U, V, X, Y at acc + 64·pair).
 * Then S(+h) = (U − V) + i(X + Y) and S(−h) = (U + V) + i(Y − X) (structurePairedAdd).
 */
export function structurePaired(
  pos: usize, mass: usize, begin: i32, end: i32,
  nCol: i32, colHx: usize, colHy: usize, colH0: usize, colH1: usize, colSlot: usize,
  Hx: i32, Hy: i32, Hz: i32, tx: f64, ty: f64, tz: f64, acc: usize, scratch: usize,
): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3, nz = <usize>(2 * Hz + 3) << 3;
  const exr = scratch, exi = scratch + nx, eyr = scratch + 2 * nx, eyi = eyr + ny, ezr = eyr + 2 * ny, ezi = ezr + nz;
  const second = phaseBytes(Hx, Hy, Hz);
  for (let i = begin; i < end; i += 2) {
    // Two particles per pass (each block of sums is loaded and stored once per two); a lone last particle
    // runs with a massless twin at its own place.
    const pair = i + 1 < end;
    const m0 = load<f64>(mass + (<usize>i << 3));
    const m1 = pair ? load<f64>(mass + (<usize>i << 3), 8) : 0.0;
    const p = pos + <usize>(3 * i) * 8;
    const q = pair ? p + 24 : p;
    phases(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), tx, ty, tz, Hx, Hy, Hz, scratch);
    phases(load<f64>(q), load<f64>(q, 8), load<f64>(q, 16), tx, ty, tz, Hx, Hy, Hz, scratch + second);
    for (let col = 0; col < nCol; col++) {
      const hxo = <usize>load<i32>(colHx + (<usize>col << 2)) << 3;
      const hyo = <usize>(load<i32>(colHy + (<usize>col << 2)) + Hy) << 3;
      const axr = load<f64>(exr + hxo), axi = load<f64>(exi + hxo);
      const byr = load<f64>(eyr + hyo), byi = load<f64>(eyi + hyo);
      const bxr = load<f64>(exr + second + hxo), bxi = load<f64>(exi + second + hxo);
      const cyr = load<f64>(eyr + second + hyo), cyi = load<f64>(eyi + second + hyo);
      const cr0 = f64x2.splat(m0 * (axr * byr - axi * byi)), ci0 = f64x2.splat(m0 * (axr * byi + axi * byr));
      const cr1 = f64x2.splat(m1 * (bxr * cyr - bxi * cyi)), ci1 = f64x2.splat(m1 * (bxr * cyi + bxi * cyr));
      const h1 = load<i32>(colH1 + (<usize>col << 2));
      let blk = acc + (<usize>(load<i32>(colSlot + (<usize>col << 2)) >> 1) << 6);
      for (let h = load<i32>(colH0 + (<usize>col << 2)); h <= h1; h += 2, blk += 64) {
        const zo = <usize>h << 3;
        const a0 = v128.load(ezr + zo), b0 = v128.load(ezi + zo);
        const a1 = v128.load(ezr + second + zo), b1 = v128.load(ezi + second + zo);
        v128.store(blk, madd(cr1, a1, madd(cr0, a0, v128.load(blk))));
        v128.store(blk, madd(ci1, b1, madd(ci0, b0, v128.load(blk, 16))), 16);
        v128.store(blk, madd(cr1, b1, madd(cr0, b0, v128.load(blk, 32))), 32);
        v128.store(blk, madd(ci1, a1, madd(ci0, a0, v128.load(blk, 48))), 48);
      }
    }
  }
}

// Column c's slot of h (lane address of the first of a block's v128 values).
@inline function slotAddress(blocks: usize, slot: i32, bytesPerPair: i32): usize {
  return blocks + <usize>((slot >> 1) * bytesPerPair + ((slot & 1) << 3));
}

/**
 * Adds the paired sums (blocks of structurePaired) into dst, interleaved (re, im) per half-space k-vector
 * in the column order of the k-vector list (column c holds hz = colHz0..colHz1 from index colK0).
 */
export function structurePairedAdd(
  nCol: i32, colH0: usize, colH1: usize, colSlot: usize, colHz0: usize, colHz1: usize, colK0: usize, acc: usize, dst: usize,
): void {
  for (let col = 0; col < nCol; col++) {
    const h0 = load<i32>(colH0 + (<usize>col << 2)), h1 = load<i32>(colH1 + (<usize>col << 2));
    const hz0 = load<i32>(colHz0 + (<usize>col << 2)), hz1 = load<i32>(colHz1 + (<usize>col << 2));
    const k0 = load<i32>(colK0 + (<usize>col << 2)), s0 = load<i32>(colSlot + (<usize>col << 2));
    for (let h = h0; h <= h1; h++) {
      const o = slotAddress(acc, s0 + h - h0, 64);
      const U = load<f64>(o), V = load<f64>(o, 16), X = load<f64>(o, 32), Y = load<f64>(o, 48);
      if (h <= hz1) {
        const d = dst + (<usize>(k0 + h - hz0) << 4);
        store<f64>(d, load<f64>(d) + (U - V));
        store<f64>(d, load<f64>(d, 8) + (X + Y), 8);
      }
      if (h > 0 && -h >= hz0) {
        const d = dst + (<usize>(k0 - h - hz0) << 4);
        store<f64>(d, load<f64>(d) + (U + V));
        store<f64>(d, load<f64>(d, 8) + (Y - X), 8);
      }
    }
  }
}

/**
 * Lays the weighted structure factor ws (interleaved, 2W_k S(k) per half-space k) out for fourierPaired:
 * per slot, with W(+h) = p + iq and W(−h) = r + is (zero where the column lacks that k-vector, and for
 * h = 0 the single k-vector counts once), P = p + r, Q = q − s, R = p − r, S = q + s, in blocks of 4 v128
 * (64 bytes per pair of slots). Padding slots are zero.
 */
export function fourierPairedLoad(
  nCol: i32, colH0: usize, colH1: usize, colSlot: usize, colHz0: usize, colHz1: usize, colK0: usize, ws: usize, blocks: usize, nSlots: i32,
): void {
  memory.fill(blocks, 0, <usize>(nSlots >> 1) << 6);
  for (let col = 0; col < nCol; col++) {
    const h0 = load<i32>(colH0 + (<usize>col << 2)), h1 = load<i32>(colH1 + (<usize>col << 2));
    const hz0 = load<i32>(colHz0 + (<usize>col << 2)), hz1 = load<i32>(colHz1 + (<usize>col << 2));
    const k0 = load<i32>(colK0 + (<usize>col << 2)), s0 = load<i32>(colSlot + (<usize>col << 2));
    for (let h = h0; h <= h1; h++) {
      let p: f64 = 0, q: f64 = 0, r: f64 = 0, s: f64 = 0;
      if (h <= hz1) {
        const w = ws + (<usize>(k0 + h - hz0) << 4);
        p = load<f64>(w);
        q = load<f64>(w, 8);
      }
      if (h > 0 && -h >= hz0) {
        const w = ws + (<usize>(k0 - h - hz0) << 4);
        r = load<f64>(w);
        s = load<f64>(w, 8);
      }
      const o = slotAddress(blocks, s0 + h - h0, 64);
      store<f64>(o, p + r);
      store<f64>(o, q - s, 16);
      store<f64>(o, p - r, 32);
      store<f64>(o, q + s, 48);
    }
  }
}

/**
 * The Fourier raw sums at targets[begin..end) (blocks from fourierPairedLoad): per column, with z_h = a + ib,
 * Σ z conj(W) = Σ (aP + bQ) + i Σ (bR − aS) and Σ hz z conj(W) = Σ h(aR + bS) + i Σ h(bP − aQ),
 * then multiplied by c = e^{i(hx x + hy y)} once per column (the hz-weighted sum gives the z force).
 * Adds −Σ k·Im[…] (per unit 2π/L: times tx, ty, tz) into acc (3 per target) and Σ Re[…] into phi.
 */
export function fourierPaired(
  pos: usize, targets: usize, begin: i32, end: i32,
  nCol: i32, colHx: usize, colHy: usize, colH0: usize, colH1: usize, colSlot: usize,
  Hx: i32, Hy: i32, Hz: i32, tx: f64, ty: f64, tz: f64,
  blocks: usize, acc: usize, phi: usize, scratch: usize,
): void {
  const nx = <usize>(Hx + 3) << 3, ny = <usize>(2 * Hy + 3) << 3, nz = <usize>(2 * Hz + 3) << 3;
  const exr = scratch, exi = scratch + nx, eyr = scratch + 2 * nx, eyi = eyr + ny, ezr = eyr + 2 * ny, ezi = ezr + nz;
  const two = f64x2.splat(2);
  for (let t = begin; t < end; t++) {
    const p = pos + <usize>(3 * load<i32>(targets + (<usize>t << 2))) * 8;
    phases(load<f64>(p), load<f64>(p, 8), load<f64>(p, 16), tx, ty, tz, Hx, Hy, Hz, scratch);
    let gx: f64 = 0, gy: f64 = 0, gz: f64 = 0, pot: f64 = 0;
    for (let col = 0; col < nCol; col++) {
      const hxRaw = load<i32>(colHx + (<usize>col << 2));
      const hyRaw = load<i32>(colHy + (<usize>col << 2));
      const hyo = <usize>(hyRaw + Hy) << 3, hxo = <usize>hxRaw << 3;
      const axr = load<f64>(exr + hxo), axi = load<f64>(exi + hxo);
      const byr = load<f64>(eyr + hyo), byi = load<f64>(eyi + hyo);
      const cr = axr * byr - axi * byi, ci = axr * byi + axi * byr;
      const h1 = load<i32>(colH1 + (<usize>col << 2));
      let blk = blocks + (<usize>(load<i32>(colSlot + (<usize>col << 2)) >> 1) << 6);
      let x0 = f64x2.splat(0), x1 = f64x2.splat(0), y0 = f64x2.splat(0), y1 = f64x2.splat(0);
      let u = f64x2.splat(0), v = f64x2.splat(0);
      const hStart = load<i32>(colH0 + (<usize>col << 2));
      let hv = f64x2.replace_lane(f64x2.splat(<f64>hStart), 1, <f64>(hStart + 1));
      for (let h = hStart; h <= h1; h += 2, blk += 64) {
        const zo = <usize>h << 3;
        const a = v128.load(ezr + zo), b = v128.load(ezi + zo);
        const P = v128.load(blk), Q = v128.load(blk, 16), R = v128.load(blk, 32), S = v128.load(blk, 48);
        x0 = madd(a, P, x0);
        x1 = madd(b, Q, x1);
        y0 = madd(b, R, y0);
        y1 = nmadd(a, S, y1);
        u = madd(hv, madd(b, S, f64x2.mul(a, R)), u);
        v = madd(hv, nmadd(a, Q, f64x2.mul(b, P)), v);
        hv = f64x2.add(hv, two);
      }
      const x = f64x2.add(x0, x1), y = f64x2.add(y0, y1);
      const s0r = f64x2.extract_lane(x, 0) + f64x2.extract_lane(x, 1);
      const s0i = f64x2.extract_lane(y, 0) + f64x2.extract_lane(y, 1);
      const s1r = f64x2.extract_lane(u, 0) + f64x2.extract_lane(u, 1);
      const s1i = f64x2.extract_lane(v, 0) + f64x2.extract_lane(v, 1);
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
