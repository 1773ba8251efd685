/**
 * Complex fast Fourier transforms of power-of-two length: iterative radix-2 decimation in time
 * (Cooley & Tukey 1965, Math. Comp. 19, 297) with bit-reversed input order, and the 3D transform as 1D
 * transforms along each axis. Convention: forward X_k = Σ_j x_j e^{−2πi jk/n}; inverse
 * x_j = (1/n) Σ_k X_k e^{+2πi jk/n} (the 3D inverse divides by nx·ny·nz). Data are separate real and
 * imaginary Float64Arrays, transformed in place.
 */

/** Whether n is a power of two ≥ 1. */
export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0;
}

export interface FftPlan {
  readonly n: number;
  /** cos and sin of 2πk/n for k < n/2. */
  readonly cos: Float64Array;
  readonly sin: Float64Array;
  /** Bit-reversal permutation. */
  readonly rev: Uint32Array;
}

/** Twiddle factors and bit reversal for length n (a power of two). */
export function fftPlan(n: number): FftPlan {
  if (!isPowerOfTwo(n)) throw new RangeError(`fft: length must be a power of two, got ${n}`);
  const half = n >> 1;
  const cos = new Float64Array(half), sin = new Float64Array(half);
  for (let k = 0; k < half; k++) {
    cos[k] = Math.cos((2 * Math.PI * k) / n);
    sin[k] = Math.sin((2 * Math.PI * k) / n);
  }
  const bits = Math.log2(n);
  const rev = new Uint32Array(n);
  for (let i = 0; i < n; i++) {
    let r = 0;
    for (let b = 0; b < bits; b++) r |= ((i >> b) & 1) << (bits - 1 - b);
    rev[i] = r;
  }
  return { n, cos, sin, rev };
}

/** In-place 1D transform of re, im (length plan.n); `inverse` uses e^{+} and divides by n. */
export function fft1d(plan: FftPlan, re: Float64Array, im: Float64Array, inverse = false): void {
  const { n, cos, sin, rev } = plan;
  for (let i = 0; i < n; i++) {
    const j = rev[i];
    if (j > i) {
      let t = re[i]; re[i] = re[j]; re[j] = t;
      t = im[i]; im[i] = im[j]; im[j] = t;
    }
  }
  const sign = inverse ? 1 : -1;
  for (let size = 2; size <= n; size <<= 1) {
    const half = size >> 1;
    const step = n / size;
    for (let start = 0; start < n; start += size) {
      for (let k = 0; k < half; k++) {
        const wr = cos[k * step], wi = sign * sin[k * step];
        const a = start + k, b = a + half;
        const xr = re[b] * wr - im[b] * wi;
        const xi = re[b] * wi + im[b] * wr;
        re[b] = re[a] - xr;
        im[b] = im[a] - xi;
        re[a] += xr;
        im[a] += xi;
      }
    }
  }
  if (inverse) {
    const s = 1 / n;
    for (let i = 0; i < n; i++) {
      re[i] *= s;
      im[i] *= s;
    }
  }
}

/**
 * In-place 3D transform of a complex field stored x-major: index (ix·ny + iy)·nz + iz. Each size must
 * be a power of two; `inverse` divides by nx·ny·nz.
 */
export function fft3d(re: Float64Array, im: Float64Array, nx: number, ny: number, nz: number, inverse = false): void {
  if (re.length !== nx * ny * nz || im.length !== re.length) {
    throw new RangeError(`fft3d: arrays hold ${re.length} and ${im.length} values, expected ${nx}·${ny}·${nz} = ${nx * ny * nz}`);
  }
  const dims = [nx, ny, nz];
  const strides = [ny * nz, nz, 1];
  for (let axis = 0; axis < 3; axis++) {
    const n = dims[axis];
    if (n === 1) continue;
    const plan = fftPlan(n);
    const stride = strides[axis];
    const br = new Float64Array(n), bi = new Float64Array(n);
    // every line along `axis`: base offsets run over the other two axes
    const [a1, a2] = [0, 1, 2].filter((d) => d !== axis);
    for (let i1 = 0; i1 < dims[a1]; i1++) {
      for (let i2 = 0; i2 < dims[a2]; i2++) {
        const base = i1 * strides[a1] + i2 * strides[a2];
        for (let k = 0; k < n; k++) {
          br[k] = re[base + k * stride];
          bi[k] = im[base + k * stride];
        }
        fft1d(plan, br, bi, inverse);
        for (let k = 0; k < n; k++) {
          re[base + k * stride] = br[k];
          im[base + k * stride] = bi[k];
        }
      }
    }
  }
}
