// AssemblyScript source of the particle passes of a direct-Ewald setup, for the WebAssembly path of
// engine/wasm/prepareWasm.ts. JavaScript twins (same operations in the same order, so the same bits):
// particlesValidate and cellListBuild's loops (engine/ewald/), positionsWrap (engine/box.ts), the
// clustering counts and the mass sums of engine/ewald/params.ts. A run makes each pass once, before any
// JavaScript is optimised; there every element read allocated a number, here nothing is allocated.

@inline function wrap(x: f64, l: f64): f64 {
  let w = x - Math.floor(x / l) * l;
  if (w >= l) w -= l; // rounding can land exactly on l
  if (w < 0) w = 0;
  return w;
}

/**
 * pos: 3n f64, wrapped into [0, l) per axis in place; mass: n f64; counts: gx·gy·gz i32, the particles per
 * cell of the clustering grid (zeroed here); out: 6 f64 = [particles moved, Σ counts², Σ m², Σ |m|^{3/2},
 * Σ |m|, Σ m]. Returns the first particle with a non-finite mass or coordinate (nothing is then done), else −1.
 */
export function particlesPrepare(
  pos: usize, mass: usize, n: i32, lx: f64, ly: f64, lz: f64, gx: i32, gy: i32, gz: i32, counts: usize, out: usize,
): i32 {
  for (let i = 0; i < n; i++) {
    const p = pos + <usize>i * 24;
    if (!isFinite(load<f64>(mass + (<usize>i << 3))) || !isFinite(load<f64>(p)) || !isFinite(load<f64>(p, 8)) || !isFinite(load<f64>(p, 16))) return i;
  }
  const cells = gx * gy * gz;
  memory.fill(counts, 0, <usize>cells << 2);
  let moved = 0;
  let q: f64 = 0, m32: f64 = 0, mAbs: f64 = 0, total: f64 = 0;
  for (let i = 0; i < n; i++) {
    const p = pos + <usize>i * 24;
    let x = load<f64>(p), y = load<f64>(p, 8), z = load<f64>(p, 16);
    let changed = false;
    if (x < 0 || x >= lx) {
      x = wrap(x, lx);
      store<f64>(p, x);
      changed = true;
    }
    if (y < 0 || y >= ly) {
      y = wrap(y, ly);
      store<f64>(p, y, 8);
      changed = true;
    }
    if (z < 0 || z >= lz) {
      z = wrap(z, lz);
      store<f64>(p, z, 16);
      changed = true;
    }
    if (changed) moved++;
    const cx = min(gx - 1, <i32>Math.floor((x / lx) * <f64>gx));
    const cy = min(gy - 1, <i32>Math.floor((y / ly) * <f64>gy));
    const cz = min(gz - 1, <i32>Math.floor((z / lz) * <f64>gz));
    const c = counts + (<usize>((cx * gy + cy) * gz + cz) << 2);
    store<i32>(c, load<i32>(c) + 1);
    const m = load<f64>(mass + (<usize>i << 3));
    q += m * m;
    const a = abs<f64>(m);
    m32 += a * Math.sqrt(a);
    mAbs += a;
    total += m;
  }
  let s: f64 = 0;
  for (let c = 0; c < cells; c++) {
    const k = <f64>load<i32>(counts + (<usize>c << 2));
    s += k * k;
  }
  store<f64>(out, <f64>moved);
  store<f64>(out, s, 8);
  store<f64>(out, q, 16);
  store<f64>(out, m32, 24);
  store<f64>(out, mAbs, 32);
  store<f64>(out, total, 40);
  return -1;
}

@inline function cellOf(x: f64, w: f64, n: i32): i32 {
  const c = Math.floor(x / w);
  return c < 0 ? 0 : c >= <f64>n ? n - 1 : <i32>c;
}

/**
 * The cell list of cellListBuild for wrapped positions pos (3n f64) and masses: start (nx·ny·nz + 1 i32,
 * zeroed here), order and slot (n i32), xyzm (4n f64); cellOfP (n i32) and fill (nx·ny·nz i32) are scratch.
 */
export function cellListFill(
  pos: usize, mass: usize, n: i32, nx: i32, ny: i32, nz: i32, wx: f64, wy: f64, wz: f64,
  start: usize, order: usize, slot: usize, xyzm: usize, cellOfP: usize, fill: usize,
): void {
  const cells = nx * ny * nz;
  memory.fill(start, 0, <usize>(cells + 1) << 2);
  for (let i = 0; i < n; i++) {
    const p = pos + <usize>i * 24;
    const c = (cellOf(load<f64>(p), wx, nx) * ny + cellOf(load<f64>(p, 8), wy, ny)) * nz + cellOf(load<f64>(p, 16), wz, nz);
    store<i32>(cellOfP + (<usize>i << 2), c);
    const sp = start + (<usize>(c + 1) << 2);
    store<i32>(sp, load<i32>(sp) + 1);
  }
  for (let c = 0; c < cells; c++) {
    const sp = start + (<usize>(c + 1) << 2);
    store<i32>(sp, load<i32>(sp) + load<i32>(sp - 4));
  }
  memory.copy(fill, start, <usize>cells << 2);
  for (let i = 0; i < n; i++) {
    const fp = fill + (<usize>load<i32>(cellOfP + (<usize>i << 2)) << 2);
    const s = load<i32>(fp);
    store<i32>(fp, s + 1);
    store<i32>(order + (<usize>s << 2), i);
    store<i32>(slot + (<usize>i << 2), s);
    const p = pos + <usize>i * 24, q = xyzm + (<usize>s << 5);
    store<f64>(q, load<f64>(p));
    store<f64>(q, load<f64>(p, 8), 8);
    store<f64>(q, load<f64>(p, 16), 16);
    store<f64>(q, load<f64>(mass + (<usize>i << 3)), 24);
  }
}

/** Splits n records of 4 f64 at src into four arrays d0..d3 (the real-space kernels' SoA layout). */
export function deinterleave4(src: usize, n: i32, d0: usize, d1: usize, d2: usize, d3: usize): void {
  for (let i = 0; i < n; i++) {
    const s = src + (<usize>i << 5), o = <usize>i << 3;
    store<f64>(d0 + o, load<f64>(s));
    store<f64>(d1 + o, load<f64>(s, 8));
    store<f64>(d2 + o, load<f64>(s, 16));
    store<f64>(d3 + o, load<f64>(s, 24));
  }
}

// Glue between the kernels' layouts and the callers' arrays (callers copy their arrays in and out with
// typed-array set, so that no JavaScript loop touches the elements one by one).

/**
 * Adds sorted-order SoA sums (ax, ay, az, ph; n each) into input order: acc[3·order[s] + d] += a_d[s],
 * phi[order[s]] += ph[s] (acc 3n f64, phi n f64, order n i32).
 */
export function addSoaUnsorted(ax: usize, ay: usize, az: usize, ph: usize, order: usize, n: i32, acc: usize, phi: usize): void {
  for (let s = 0; s < n; s++) {
    const i = <usize>load<i32>(order + (<usize>s << 2)), o = <usize>s << 3;
    const a = acc + i * 24;
    store<f64>(a, load<f64>(a) + load<f64>(ax + o));
    store<f64>(a, load<f64>(a, 8) + load<f64>(ay + o), 8);
    store<f64>(a, load<f64>(a, 16) + load<f64>(az + o), 16);
    const p = phi + (i << 3);
    store<f64>(p, load<f64>(p) + load<f64>(ph + o));
  }
}

/** dst[k] += src[k] for k < count (f64). */
export function addInto(src: usize, count: i32, dst: usize): void {
  for (let k = 0; k < count; k++) {
    const o = <usize>k << 3;
    store<f64>(dst + o, load<f64>(dst + o) + load<f64>(src + o));
  }
}

/**
 * ewaldFinalize for all particles in input order, in place: acc ← G·acc (3n); phi[i] ← −G(phi[i] −
 * m_i·selfCoef − background), with m_i = ms[s] for i = order[s] (the sorted masses of a real-space context).
 */
export function finalizeAll(acc: usize, phi: usize, ms: usize, order: usize, n: i32, G: f64, selfCoef: f64, background: f64): void {
  for (let k = 0; k < 3 * n; k++) {
    const o = <usize>k << 3;
    store<f64>(acc + o, G * load<f64>(acc + o));
  }
  for (let s = 0; s < n; s++) {
    const i = <usize>load<i32>(order + (<usize>s << 2));
    const p = phi + (i << 3);
    store<f64>(p, -G * (load<f64>(p) - load<f64>(ms + (<usize>s << 3)) * selfCoef - background));
  }
}

/**
 * Whether two of the n positions (3 f64 each at pos) are exactly equal, −0 counting as +0: one pass with
 * open addressing (linear probing) on a table of `size` i32 slots (a power of two, at least 2n; filled
 * here), comparing the coordinates whenever two positions meet in a slot's chain. Returns 1 or 0.
 */
export function positionsRepeat(pos: usize, n: i32, table: usize, size: i32): i32 {
  memory.fill(table, 0xff, <usize>size << 2);
  const mask = size - 1;
  for (let i = 0; i < n; i++) {
    const p = pos + <usize>(24 * i);
    const x = load<f64>(p) + 0.0, y = load<f64>(p, 8) + 0.0, z = load<f64>(p, 16) + 0.0;
    let h = reinterpret<u64>(x) * 0x9e3779b97f4a7c15;
    h = (h ^ (h >> 29) ^ reinterpret<u64>(y)) * 0xc2b2ae3d27d4eb4f;
    h = (h ^ (h >> 32) ^ reinterpret<u64>(z)) * 0x165667b19e3779f9;
    let s = <i32>(h >> 40) & mask;
    while (true) {
      const o = table + (<usize>s << 2);
      const j = load<i32>(o);
      if (j < 0) {
        store<i32>(o, i);
        break;
      }
      const q = pos + <usize>(24 * j);
      if (load<f64>(q) == x && load<f64>(q, 8) == y && load<f64>(q, 16) == z) return 1;
      s = (s + 1) & mask;
    }
  }
  return 0;
}
