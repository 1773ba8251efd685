/**
 * Fourier part of the Ewald sum. k = 2π(hx/Lx, hy/Ly, hz/Lz), |k| ≤ kCut, over the half space
 * (hx > 0, or hx = 0 and hy > 0, or hx = hy = 0 and hz > 0), each k standing for ±k. With
 * W_k = (4π/V) e^{−k²/4α²}/k² and S(k) = Σ_j m_j e^{ik·r_j} (structure factor, computed once):
 *   Σ_j m_j ψ_k(r_i − r_j)     = Σ_half 2 W_k Re[e^{ik·r_i} S*(k)]
 *   Σ_j m_j ∇ψ_k(r_i − r_j)    = −Σ_half 2 W_k k Im[e^{ik·r_i} S*(k)]
 * Phases e^{ik·r} come from per-particle tables e^{i2πh x/L} built by recurrence (one cos/sin pair per
 * axis per particle, none per k-vector).
 */
import { type Box } from '../box';

export interface KSpace {
  readonly kCut: number;
  /** Largest |h| per axis. */
  readonly hMax: [number, number, number];
  /** Number of half-space k-vectors. */
  readonly count: number;
  /** Columns of constant (hx, hy): hx, hy, hz first, hz last, offset of the first k in the column. */
  readonly colHx: Int32Array;
  readonly colHy: Int32Array;
  readonly colHz0: Int32Array;
  readonly colHz1: Int32Array;
  readonly colK0: Int32Array;
  /** 2 W_k for each half-space k (length units²/volume). */
  readonly weight: Float64Array;
}

/** Enumerates the half-space k-vectors with |k| ≤ kCut (kCut in 1/length) and their weights 2W_k. */
export function kSpaceBuild(box: Box, alpha: number, kCut: number): KSpace {
  const L = [box.lx, box.ly, box.lz];
  const V = box.lx * box.ly * box.lz;
  const unit = L.map((l) => (2 * Math.PI) / l);
  const hMax = unit.map((u) => Math.floor(kCut / u + 1e-12)) as [number, number, number];
  const cols: number[][] = [[], [], [], [], []];
  const weights: number[] = [];
  const k2max = kCut * kCut * (1 + 1e-12);
  let count = 0;
  for (let hx = 0; hx <= hMax[0]; hx++) {
    const kx = hx * unit[0];
    for (let hy = -hMax[1]; hy <= hMax[1]; hy++) {
      if (hx === 0 && hy < 0) continue;
      const ky = hy * unit[1];
      const rest = k2max - kx * kx - ky * ky;
      if (rest < 0) continue;
      const hzTop = Math.min(hMax[2], Math.floor(Math.sqrt(rest) / unit[2]));
      const hz0 = hx === 0 && hy === 0 ? 1 : -hzTop;
      if (hz0 > hzTop) continue;
      cols[0].push(hx);
      cols[1].push(hy);
      cols[2].push(hz0);
      cols[3].push(hzTop);
      cols[4].push(count);
      for (let hz = hz0; hz <= hzTop; hz++) {
        const kz = hz * unit[2];
        const k2 = kx * kx + ky * ky + kz * kz;
        weights.push((2 * 4 * Math.PI * Math.exp(-k2 / (4 * alpha * alpha))) / (V * k2));
        count++;
      }
    }
  }
  return {
    kCut,
    hMax,
    count,
    colHx: Int32Array.from(cols[0]),
    colHy: Int32Array.from(cols[1]),
    colHz0: Int32Array.from(cols[2]),
    colHz1: Int32Array.from(cols[3]),
    colK0: Int32Array.from(cols[4]),
    weight: Float64Array.from(weights),
  };
}

/** Fills tab[2h], tab[2h+1] = cos, sin of h·θ for h = 0..hMax by complex recurrence (reset every 32). */
function phaseRow(theta: number, hMax: number, tab: Float64Array): void {
  const c1 = Math.cos(theta), s1 = Math.sin(theta);
  let c = 1, s = 0;
  tab[0] = 1;
  tab[1] = 0;
  for (let h = 1; h <= hMax; h++) {
    if ((h & 31) === 0) {
      c = Math.cos(h * theta);
      s = Math.sin(h * theta);
    } else {
      const cn = c * c1 - s * s1;
      s = s * c1 + c * s1;
      c = cn;
    }
    tab[2 * h] = c;
    tab[2 * h + 1] = s;
  }
}

export interface PhaseScratch {
  ex: Float64Array;
  ey: Float64Array; // index hy + hMaxY, covers −hMax..hMax
  ez: Float64Array;
  tmp: Float64Array;
}

/** Scratch arrays for the per-particle phase tables. */
export function phaseScratch(ks: KSpace): PhaseScratch {
  const m = Math.max(...ks.hMax) + 1;
  return {
    ex: new Float64Array(2 * (ks.hMax[0] + 1)),
    ey: new Float64Array(2 * (2 * ks.hMax[1] + 1)),
    ez: new Float64Array(2 * (2 * ks.hMax[2] + 1)),
    tmp: new Float64Array(2 * m),
  };
}

/** Symmetric phase table: out[2(h+H)], out[2(h+H)+1] = cos, sin(hθ) for h = −H..H. */
function phaseRowSymmetric(theta: number, H: number, tmp: Float64Array, out: Float64Array): void {
  phaseRow(theta, H, tmp);
  for (let h = 0; h <= H; h++) {
    out[2 * (H + h)] = tmp[2 * h];
    out[2 * (H + h) + 1] = tmp[2 * h + 1];
    out[2 * (H - h)] = tmp[2 * h];
    out[2 * (H - h) + 1] = -tmp[2 * h + 1];
  }
}

function phasesFor(ks: KSpace, box: Box, x: number, y: number, z: number, ps: PhaseScratch): void {
  phaseRow((2 * Math.PI * x) / box.lx, ks.hMax[0], ps.ex);
  phaseRowSymmetric((2 * Math.PI * y) / box.ly, ks.hMax[1], ps.tmp, ps.ey);
  phaseRowSymmetric((2 * Math.PI * z) / box.lz, ks.hMax[2], ps.tmp, ps.ez);
}

/**
 * Adds Σ_j m_j e^{ik·r_j} over particles [begin, end) into s (interleaved re, im; length 2·count).
 * positions: flat xyz (length units); masses in mass units.
 */
export function kSpaceStructureFactor(
  ks: KSpace,
  box: Box,
  positions: Float64Array,
  masses: Float64Array,
  begin: number,
  end: number,
  s: Float64Array,
): void {
  const ps = phaseScratch(ks);
  const { ex, ey, ez } = ps;
  const Hy = ks.hMax[1], Hz = ks.hMax[2];
  const nCol = ks.colHx.length;
  for (let i = begin; i < end; i++) {
    const m = masses[i];
    if (m === 0) continue;
    phasesFor(ks, box, positions[3 * i], positions[3 * i + 1], positions[3 * i + 2], ps);
    for (let col = 0; col < nCol; col++) {
      const hx = ks.colHx[col], hy = ks.colHy[col] + Hy;
      const axr = ex[2 * hx], axi = ex[2 * hx + 1];
      const byr = ey[2 * hy], byi = ey[2 * hy + 1];
      const cr = m * (axr * byr - axi * byi), ci = m * (axr * byi + axi * byr);
      const hz1 = ks.colHz1[col] + Hz;
      let o = 2 * ks.colK0[col];
      for (let hz = ks.colHz0[col] + Hz; hz <= hz1; hz++, o += 2) {
        const zr = ez[2 * hz], zi = ez[2 * hz + 1];
        s[o] += cr * zr - ci * zi;
        s[o + 1] += cr * zi + ci * zr;
      }
    }
  }
}

/** Multiplies the summed structure factor by the weights 2W_k, in place; returns it. */
export function kSpaceWeigh(ks: KSpace, s: Float64Array): Float64Array {
  for (let k = 0; k < ks.count; k++) {
    s[2 * k] *= ks.weight[k];
    s[2 * k + 1] *= ks.weight[k];
  }
  return s;
}

/**
 * Adds the Fourier raw sums for targets[begin..end) into acc[3t..] (Σ m_j ∇ψ_k) and phi[t] (Σ m_j ψ_k).
 * ws: the weighted structure factor from kSpaceWeigh.
 */
export function kSpaceTargets(
  ks: KSpace,
  box: Box,
  ws: Float64Array,
  positions: Float64Array,
  targets: Int32Array,
  begin: number,
  end: number,
  acc: Float64Array,
  phi: Float64Array,
): void {
  const ps = phaseScratch(ks);
  const { ex, ey, ez } = ps;
  const Hy = ks.hMax[1], Hz = ks.hMax[2];
  const ux = (2 * Math.PI) / box.lx, uy = (2 * Math.PI) / box.ly, uz = (2 * Math.PI) / box.lz;
  const nCol = ks.colHx.length;
  for (let t = begin; t < end; t++) {
    const i = targets[t];
    phasesFor(ks, box, positions[3 * i], positions[3 * i + 1], positions[3 * i + 2], ps);
    let gx = 0, gy = 0, gz = 0, pot = 0;
    for (let col = 0; col < nCol; col++) {
      const hx = ks.colHx[col], hyRaw = ks.colHy[col], hy = hyRaw + Hy;
      const axr = ex[2 * hx], axi = ex[2 * hx + 1];
      const byr = ey[2 * hy], byi = ey[2 * hy + 1];
      const cr = axr * byr - axi * byi, ci = axr * byi + axi * byr;
      const hz0 = ks.colHz0[col];
      const hz1 = ks.colHz1[col] + Hz;
      let o = 2 * ks.colK0[col];
      // e = c·z: sum w = z·conj(S) and hz·w over the column, then multiply by c once.
      let s0r = 0, s0i = 0, s1r = 0, s1i = 0;
      let hzv = hz0;
      for (let hz = hz0 + Hz; hz <= hz1; hz++, o += 2, hzv++) {
        const zr = ez[2 * hz], zi = ez[2 * hz + 1];
        const sr = ws[o], si = ws[o + 1];
        const wr = zr * sr + zi * si, wi = zi * sr - zr * si;
        s0r += wr;
        s0i += wi;
        s1r += hzv * wr;
        s1i += hzv * wi;
      }
      // Σ Im(e conj S) = Im(c s0), Σ hz Im(e conj S) = Im(c s1), Σ Re(e conj S) = Re(c s0)
      const im = cr * s0i + ci * s0r;
      gx -= hx * im;
      gy -= hyRaw * im;
      gz -= cr * s1i + ci * s1r;
      pot += cr * s0r - ci * s0i;
    }
    acc[3 * t] += gx * ux;
    acc[3 * t + 1] += gy * uy;
    acc[3 * t + 2] += gz * uz;
    phi[t] += pot;
  }
}
