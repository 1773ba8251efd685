/**
 * Mass assignment to the mesh and interpolation back, with order-p B-spline weights (Essmann et al. 1995,
 * J. Chem. Phys. 103, 8577, Sec. III): a particle at mesh coordinate u = x·n/L = k + w puts m·M_p(w + s)
 * on grid point k − s (s = 0 … p−1, per axis, periodic). Interpolation returns the mesh potential
 * Σ_g W(u − g)Φ(g) and its analytic gradient (n/L)·Σ_g W'(u − g)Φ(g). Particles are read from the
 * cell list's sorted [x, y, z, m] array, whose spatial order keeps the mesh accesses local.
 */

export interface MeshGeometry {
  /** Mesh points per side. */
  readonly n: [number, number, number];
  /** n_d / L_d (mesh units per length unit). */
  readonly inv: [number, number, number];
  /** B-spline order. */
  readonly p: number;
}

/** Largest order with the unrolled innermost loops (higher orders take the plain loops). */
const UNROLLED = 8;

/** Weights of one axis into w[o + s] = M_p(frac + s) (and d[o + s] = M_p'), s = 0 … p−1. */
function axisWeights(p: number, frac: number, w: Float64Array, d: Float64Array | null, o: number): void {
  w[o] = 1;
  for (let k = 2; k <= p; k++) {
    if (k === p && d !== null) {
      d[o] = w[o];
      for (let s = 1; s < p - 1; s++) d[o + s] = w[o + s] - w[o + s - 1];
      d[o + p - 1] = -w[o + p - 2];
    }
    const inv = 1 / (k - 1);
    w[o + k - 1] = (1 - frac) * w[o + k - 2] * inv;
    for (let s = k - 2; s >= 1; s--) w[o + s] = ((frac + s) * w[o + s] + (k - frac - s) * w[o + s - 1]) * inv;
    w[o] = frac * w[o] * inv;
  }
}

/** Grid offsets of the p points (first point g0 = k − p + 1, periodic) times stride. */
function fillIndices(idx: Int32Array, g0: number, n: number, stride: number, p: number): void {
  for (let s = 0; s < p; s++) {
    let g = g0 + s;
    if (g < 0) g += n;
    else if (g >= n) g -= n;
    idx[s] = g * stride;
  }
}

/**
 * Adds the masses of sorted particles [begin, end) (xyzm: x, y, z, m per particle, positions in the home
 * cell) to the real mesh grid[(i0·n1 + i1)·n2 + i2]. Not safe to run concurrently on one mesh unless the
 * particle ranges write to disjoint planes.
 */
export function meshSpread(geo: MeshGeometry, xyzm: Float64Array, begin: number, end: number, grid: Float64Array): void {
  const [n0, n1, n2] = geo.n;
  const [s0, s1, s2] = geo.inv;
  const p = geo.p;
  if (p > UNROLLED) {
    meshSpreadLoops(geo, xyzm, begin, end, grid);
    return;
  }
  // Weights of axis d at W[8d + s]; the grid point g0 + j of an axis takes weight W[8d + p − 1 − j].
  const W = new Float64Array(24);
  const ix = new Int32Array(p), iy = new Int32Array(p), iz = new Int32Array(UNROLLED);
  const B = n1 * n2;
  const q = 16 + p - 1;
  for (let i = begin; i < end; i++) {
    const ux = xyzm[4 * i] * s0, uy = xyzm[4 * i + 1] * s1, uz = xyzm[4 * i + 2] * s2;
    const m = xyzm[4 * i + 3];
    const fx = Math.floor(ux), fy = Math.floor(uy), fz = Math.floor(uz);
    axisWeights(p, ux - fx, W, null, 0);
    axisWeights(p, uy - fy, W, null, 8);
    axisWeights(p, uz - fz, W, null, 16);
    const gz = fz - p + 1;
    fillIndices(ix, fx - p + 1, n0, B, p);
    fillIndices(iy, fy - p + 1, n1, n2, p);
    fillIndices(iz, gz, n2, 1, p);
    const z0 = W[q], z1 = W[q - 1], z2 = W[q - 2], z3 = p > 3 ? W[q - 3] : 0;
    const z4 = p > 4 ? W[q - 4] : 0, z5 = p > 5 ? W[q - 5] : 0, z6 = p > 6 ? W[q - 6] : 0, z7 = p > 7 ? W[q - 7] : 0;
    const contiguous = gz >= 0 && gz + p <= n2;
    for (let a = 0; a < p; a++) {
      const ma = m * W[p - 1 - a];
      const ra = ix[a];
      for (let b = 0; b < p; b++) {
        const mab = ma * W[8 + p - 1 - b];
        const row = ra + iy[b];
        if (contiguous) {
          const o = row + gz;
          if (p >= 8) grid[o + 7] += mab * z7;
          if (p >= 7) grid[o + 6] += mab * z6;
          if (p >= 6) grid[o + 5] += mab * z5;
          if (p >= 5) grid[o + 4] += mab * z4;
          if (p >= 4) grid[o + 3] += mab * z3;
          if (p >= 3) grid[o + 2] += mab * z2;
          grid[o + 1] += mab * z1; grid[o] += mab * z0;
        } else {
          if (p >= 8) grid[row + iz[7]] += mab * z7;
          if (p >= 7) grid[row + iz[6]] += mab * z6;
          if (p >= 6) grid[row + iz[5]] += mab * z5;
          if (p >= 5) grid[row + iz[4]] += mab * z4;
          if (p >= 4) grid[row + iz[3]] += mab * z3;
          if (p >= 3) grid[row + iz[2]] += mab * z2;
          grid[row + iz[1]] += mab * z1; grid[row + iz[0]] += mab * z0;
        }
      }
    }
  }
}

/** Plain-loop assignment for any order (reference path, and orders above UNROLLED). */
export function meshSpreadLoops(geo: MeshGeometry, xyzm: Float64Array, begin: number, end: number, grid: Float64Array): void {
  const [n0, n1, n2] = geo.n;
  const [s0, s1, s2] = geo.inv;
  const p = geo.p;
  const W = new Float64Array(3 * p);
  const ix = new Int32Array(p), iy = new Int32Array(p), iz = new Int32Array(p);
  const B = n1 * n2;
  for (let i = begin; i < end; i++) {
    const ux = xyzm[4 * i] * s0, uy = xyzm[4 * i + 1] * s1, uz = xyzm[4 * i + 2] * s2;
    const m = xyzm[4 * i + 3];
    const fx = Math.floor(ux), fy = Math.floor(uy), fz = Math.floor(uz);
    axisWeights(p, ux - fx, W, null, 0);
    axisWeights(p, uy - fy, W, null, p);
    axisWeights(p, uz - fz, W, null, 2 * p);
    fillIndices(ix, fx - p + 1, n0, B, p);
    fillIndices(iy, fy - p + 1, n1, n2, p);
    fillIndices(iz, fz - p + 1, n2, 1, p);
    for (let a = 0; a < p; a++) {
      const ma = m * W[p - 1 - a];
      for (let b = 0; b < p; b++) {
        const mab = ma * W[2 * p - 1 - b];
        const row = ix[a] + iy[b];
        for (let c = 0; c < p; c++) grid[row + iz[c]] += mab * W[3 * p - 1 - c];
      }
    }
  }
}

/**
 * For sorted particles [begin, end): adds the interpolated mesh potential to phiSorted[i] and its gradient
 * (length⁻¹ units: ∂/∂x = (n0/L_x) ∂/∂u) to accSorted[3i..3i+2]. Read-only on the mesh: chunks may run
 * concurrently.
 */
export function meshInterpolate(
  geo: MeshGeometry,
  xyzm: Float64Array,
  begin: number,
  end: number,
  grid: Float64Array,
  accSorted: Float64Array,
  phiSorted: Float64Array,
): void {
  const [n0, n1, n2] = geo.n;
  const [s0, s1, s2] = geo.inv;
  const p = geo.p;
  if (p > UNROLLED) {
    meshInterpolateLoops(geo, xyzm, begin, end, grid, accSorted, phiSorted);
    return;
  }
  const W = new Float64Array(24), D = new Float64Array(24);
  const ix = new Int32Array(p), iy = new Int32Array(p), iz = new Int32Array(UNROLLED);
  const B = n1 * n2;
  const q = 16 + p - 1;
  for (let i = begin; i < end; i++) {
    const ux = xyzm[4 * i] * s0, uy = xyzm[4 * i + 1] * s1, uz = xyzm[4 * i + 2] * s2;
    const fx = Math.floor(ux), fy = Math.floor(uy), fz = Math.floor(uz);
    axisWeights(p, ux - fx, W, D, 0);
    axisWeights(p, uy - fy, W, D, 8);
    axisWeights(p, uz - fz, W, D, 16);
    const gz = fz - p + 1;
    fillIndices(ix, fx - p + 1, n0, B, p);
    fillIndices(iy, fy - p + 1, n1, n2, p);
    fillIndices(iz, gz, n2, 1, p);
    const z0 = W[q], z1 = W[q - 1], z2 = W[q - 2], z3 = p > 3 ? W[q - 3] : 0;
    const z4 = p > 4 ? W[q - 4] : 0, z5 = p > 5 ? W[q - 5] : 0, z6 = p > 6 ? W[q - 6] : 0, z7 = p > 7 ? W[q - 7] : 0;
    const d0 = D[q], d1 = D[q - 1], d2 = D[q - 2], d3 = p > 3 ? D[q - 3] : 0;
    const d4 = p > 4 ? D[q - 4] : 0, d5 = p > 5 ? D[q - 5] : 0, d6 = p > 6 ? D[q - 6] : 0, d7 = p > 7 ? D[q - 7] : 0;
    const contiguous = gz >= 0 && gz + p <= n2;
    let phi = 0, gx = 0, gy = 0, gzz = 0;
    for (let a = 0; a < p; a++) {
      const ra = ix[a];
      const va = W[p - 1 - a], da = D[p - 1 - a];
      for (let b = 0; b < p; b++) {
        const row = ra + iy[b];
        let t0 = 0, t1 = 0, g: number;
        if (contiguous) {
          const o = row + gz;
          if (p >= 8) { g = grid[o + 7]; t0 += z7 * g; t1 += d7 * g; }
          if (p >= 7) { g = grid[o + 6]; t0 += z6 * g; t1 += d6 * g; }
          if (p >= 6) { g = grid[o + 5]; t0 += z5 * g; t1 += d5 * g; }
          if (p >= 5) { g = grid[o + 4]; t0 += z4 * g; t1 += d4 * g; }
          if (p >= 4) { g = grid[o + 3]; t0 += z3 * g; t1 += d3 * g; }
          if (p >= 3) { g = grid[o + 2]; t0 += z2 * g; t1 += d2 * g; }
          g = grid[o + 1]; t0 += z1 * g; t1 += d1 * g;
          g = grid[o]; t0 += z0 * g; t1 += d0 * g;
        } else {
          if (p >= 8) { g = grid[row + iz[7]]; t0 += z7 * g; t1 += d7 * g; }
          if (p >= 7) { g = grid[row + iz[6]]; t0 += z6 * g; t1 += d6 * g; }
          if (p >= 6) { g = grid[row + iz[5]]; t0 += z5 * g; t1 += d5 * g; }
          if (p >= 5) { g = grid[row + iz[4]]; t0 += z4 * g; t1 += d4 * g; }
          if (p >= 4) { g = grid[row + iz[3]]; t0 += z3 * g; t1 += d3 * g; }
          if (p >= 3) { g = grid[row + iz[2]]; t0 += z2 * g; t1 += d2 * g; }
          g = grid[row + iz[1]]; t0 += z1 * g; t1 += d1 * g;
          g = grid[row + iz[0]]; t0 += z0 * g; t1 += d0 * g;
        }
        const vb = W[8 + p - 1 - b];
        const w = va * vb;
        phi += w * t0;
        gzz += w * t1;
        gx += da * vb * t0;
        gy += va * D[8 + p - 1 - b] * t0;
      }
    }
    accSorted[3 * i] += gx * s0;
    accSorted[3 * i + 1] += gy * s1;
    accSorted[3 * i + 2] += gzz * s2;
    phiSorted[i] += phi;
  }
}

/** Plain-loop interpolation for any order (reference path, and orders above UNROLLED). */
export function meshInterpolateLoops(
  geo: MeshGeometry,
  xyzm: Float64Array,
  begin: number,
  end: number,
  grid: Float64Array,
  accSorted: Float64Array,
  phiSorted: Float64Array,
): void {
  const [n0, n1, n2] = geo.n;
  const [s0, s1, s2] = geo.inv;
  const p = geo.p;
  const W = new Float64Array(3 * p), D = new Float64Array(3 * p);
  const ix = new Int32Array(p), iy = new Int32Array(p), iz = new Int32Array(p);
  const B = n1 * n2;
  for (let i = begin; i < end; i++) {
    const ux = xyzm[4 * i] * s0, uy = xyzm[4 * i + 1] * s1, uz = xyzm[4 * i + 2] * s2;
    const fx = Math.floor(ux), fy = Math.floor(uy), fz = Math.floor(uz);
    axisWeights(p, ux - fx, W, D, 0);
    axisWeights(p, uy - fy, W, D, p);
    axisWeights(p, uz - fz, W, D, 2 * p);
    fillIndices(ix, fx - p + 1, n0, B, p);
    fillIndices(iy, fy - p + 1, n1, n2, p);
    fillIndices(iz, fz - p + 1, n2, 1, p);
    let phi = 0, gx = 0, gy = 0, gz = 0;
    for (let a = 0; a < p; a++) {
      const va = W[p - 1 - a], da = D[p - 1 - a];
      for (let b = 0; b < p; b++) {
        const vb = W[2 * p - 1 - b], db = D[2 * p - 1 - b];
        const row = ix[a] + iy[b];
        let t0 = 0, t1 = 0;
        for (let c = 0; c < p; c++) {
          const g = grid[row + iz[c]];
          t0 += W[3 * p - 1 - c] * g;
          t1 += D[3 * p - 1 - c] * g;
        }
        phi += va * vb * t0;
        gz += va * vb * t1;
        gx += da * vb * t0;
        gy += va * db * t0;
      }
    }
    accSorted[3 * i] += gx * s0;
    accSorted[3 * i + 1] += gy * s1;
    accSorted[3 * i + 2] += gz * s2;
    phiSorted[i] += phi;
  }
}
