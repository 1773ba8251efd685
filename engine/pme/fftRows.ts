/**
 * Batched complex FFT of length n along the rows of a split-complex block: element (row, col) has its
 * real part at row·w + col and its imaginary part at n·w + row·w + col (w columns transformed together).
 * Self-sorting mixed-radix (2, 3, 4, 5) Stockham passes, each a loop over contiguous memory with one set
 * of twiddles per butterfly group (Stockham 1966; the formulation of Van Loan 1992, "Computational
 * Frameworks for the Fast Fourier Transform", Sec. 1.7). Forward: X_k = Σ_j x_j e^{−2πijk/n}; inverse:
 * the same with e^{+…}, unnormalised.
 */

interface Stage {
  /** Radix of this pass. */
  readonly r: number;
  /** Number of sub-sequences already split off (product of earlier radices). */
  readonly s: number;
  /** Length of each remaining sub-sequence after this pass: n = r·m·s. */
  readonly m: number;
  /** Twiddles e^{−2πi pk/(rm)}, p < m, k = 1 … r−1: (cos, sin) pairs, index 2(p(r−1) + k − 1). */
  readonly tw: Float64Array;
}

export interface FftPlan {
  readonly n: number;
  readonly stages: readonly Stage[];
}

/** Largest prime factor the FFT handles. */
const RADICES = [4, 2, 3, 5];

/** True when n ≥ 1 has no prime factor other than 2, 3 and 5. */
export function fftSizeOk(n: number): boolean {
  if (!Number.isInteger(n) || n < 1) return false;
  for (const f of [2, 3, 5]) while (n % f === 0) n /= f;
  return n === 1;
}

/** Smallest n' ≥ n with prime factors 2, 3, 5 only (and even when `even`). */
export function fftSizeNext(n: number, even = false): number {
  let m = Math.max(1, Math.ceil(n));
  while (!fftSizeOk(m) || (even && m % 2 !== 0)) m++;
  return m;
}

/** Plan for length n (factors 2, 3, 5 only). */
export function fftPlan(n: number): FftPlan {
  if (!fftSizeOk(n)) throw new RangeError(`FFT length must be a positive integer with prime factors 2, 3 and 5 only, got ${n}`);
  const radices: number[] = [];
  let rest = n;
  for (const r of RADICES) {
    while (rest % r === 0) {
      radices.push(r);
      rest /= r;
    }
  }
  const stages: Stage[] = [];
  let s = 1;
  for (const r of radices) {
    const m = n / (r * s);
    const tw = new Float64Array(2 * m * (r - 1));
    for (let p = 0; p < m; p++) {
      for (let k = 1; k < r; k++) {
        const a = (-2 * Math.PI * p * k) / (r * m);
        tw[2 * (p * (r - 1) + k - 1)] = Math.cos(a);
        tw[2 * (p * (r - 1) + k - 1) + 1] = Math.sin(a);
      }
    }
    stages.push({ r, s, m, tw });
    s *= r;
  }
  return { n, stages };
}

/**
 * Transforms the n rows × w columns held in `a` (split layout, see above); `b` is scratch of the same
 * size. Returns the array that holds the result (a or b). inverse: e^{+2πi…}, unnormalised.
 */
export function fftRows(plan: FftPlan, a: Float64Array, b: Float64Array, w: number, inverse: boolean): Float64Array {
  let src = a, dst = b;
  const imOff = plan.n * w;
  for (const st of plan.stages) {
    const len = st.s * w;
    switch (st.r) {
      case 4: radix4(src, dst, imOff, len, st.m, st.tw, inverse); break;
      case 2: radix2(src, dst, imOff, len, st.m, st.tw, inverse); break;
      case 3: radix3(src, dst, imOff, len, st.m, st.tw, inverse); break;
      default: radix5(src, dst, imOff, len, st.m, st.tw, inverse); break;
    }
    const t = src;
    src = dst;
    dst = t;
  }
  return src;
}

// In each pass, input block k' of group p starts at (p + k'm)·len and output block k at (rp + k)·len;
// a block is `len` = s·w contiguous numbers (s rows of w columns).

function radix2(x: Float64Array, y: Float64Array, io: number, len: number, m: number, tw: Float64Array, inv: boolean): void {
  for (let p = 0; p < m; p++) {
    const c1 = tw[2 * p], s1 = inv ? -tw[2 * p + 1] : tw[2 * p + 1];
    const i0 = p * len, i1 = (p + m) * len;
    const o0 = 2 * p * len, o1 = o0 + len;
    for (let j = 0; j < len; j++) {
      const ar = x[i0 + j], ai = x[io + i0 + j];
      const br = x[i1 + j], bi = x[io + i1 + j];
      y[o0 + j] = ar + br;
      y[io + o0 + j] = ai + bi;
      const dr = ar - br, di = ai - bi;
      y[o1 + j] = dr * c1 - di * s1;
      y[io + o1 + j] = dr * s1 + di * c1;
    }
  }
}

function radix4(x: Float64Array, y: Float64Array, io: number, len: number, m: number, tw: Float64Array, inv: boolean): void {
  // Forward DFT_4 uses ω = −i; the inverse ω = +i (sg = ∓1 multiplies the ±i rotation).
  const sg = inv ? -1 : 1;
  for (let p = 0; p < m; p++) {
    const t = 6 * p;
    const c1 = tw[t], s1 = sg * tw[t + 1], c2 = tw[t + 2], s2 = sg * tw[t + 3], c3 = tw[t + 4], s3 = sg * tw[t + 5];
    const i0 = p * len, i1 = (p + m) * len, i2 = (p + 2 * m) * len, i3 = (p + 3 * m) * len;
    const o0 = 4 * p * len, o1 = o0 + len, o2 = o1 + len, o3 = o2 + len;
    for (let j = 0; j < len; j++) {
      const ar = x[i0 + j], ai = x[io + i0 + j];
      const br = x[i1 + j], bi = x[io + i1 + j];
      const cr = x[i2 + j], ci = x[io + i2 + j];
      const dr = x[i3 + j], di = x[io + i3 + j];
      const t0r = ar + cr, t0i = ai + ci;
      const t1r = ar - cr, t1i = ai - ci;
      const t2r = br + dr, t2i = bi + di;
      // t3 = (b − d)·(−i·sg): forward −i(x + iy) = y − ix
      const t3r = sg * (bi - di), t3i = -sg * (br - dr);
      y[o0 + j] = t0r + t2r;
      y[io + o0 + j] = t0i + t2i;
      const y1r = t1r + t3r, y1i = t1i + t3i;
      const y2r = t0r - t2r, y2i = t0i - t2i;
      const y3r = t1r - t3r, y3i = t1i - t3i;
      y[o1 + j] = y1r * c1 - y1i * s1;
      y[io + o1 + j] = y1r * s1 + y1i * c1;
      y[o2 + j] = y2r * c2 - y2i * s2;
      y[io + o2 + j] = y2r * s2 + y2i * c2;
      y[o3 + j] = y3r * c3 - y3i * s3;
      y[io + o3 + j] = y3r * s3 + y3i * c3;
    }
  }
}

const SIN60 = Math.sqrt(3) / 2;

function radix3(x: Float64Array, y: Float64Array, io: number, len: number, m: number, tw: Float64Array, inv: boolean): void {
  // ω = e^{∓2πi/3} = −1/2 ∓ i√3/2
  const sg = inv ? -1 : 1;
  const sn = sg * SIN60;
  for (let p = 0; p < m; p++) {
    const t = 4 * p;
    const c1 = tw[t], s1 = sg * tw[t + 1], c2 = tw[t + 2], s2 = sg * tw[t + 3];
    const i0 = p * len, i1 = (p + m) * len, i2 = (p + 2 * m) * len;
    const o0 = 3 * p * len, o1 = o0 + len, o2 = o1 + len;
    for (let j = 0; j < len; j++) {
      const ar = x[i0 + j], ai = x[io + i0 + j];
      const br = x[i1 + j], bi = x[io + i1 + j];
      const cr = x[i2 + j], ci = x[io + i2 + j];
      const sr = br + cr, si = bi + ci;
      const dr = br - cr, di = bi - ci;
      y[o0 + j] = ar + sr;
      y[io + o0 + j] = ai + si;
      const mr = ar - 0.5 * sr, mi = ai - 0.5 * si;
      // y1 = m − i·sn·d, y2 = m + i·sn·d   (forward: ω = −1/2 − i√3/2)
      const y1r = mr + sn * di, y1i = mi - sn * dr;
      const y2r = mr - sn * di, y2i = mi + sn * dr;
      y[o1 + j] = y1r * c1 - y1i * s1;
      y[io + o1 + j] = y1r * s1 + y1i * c1;
      y[o2 + j] = y2r * c2 - y2i * s2;
      y[io + o2 + j] = y2r * s2 + y2i * c2;
    }
  }
}

const C5_1 = Math.cos((2 * Math.PI) / 5);
const C5_2 = Math.cos((4 * Math.PI) / 5);
const S5_1 = Math.sin((2 * Math.PI) / 5);
const S5_2 = Math.sin((4 * Math.PI) / 5);

function radix5(x: Float64Array, y: Float64Array, io: number, len: number, m: number, tw: Float64Array, inv: boolean): void {
  const sg = inv ? -1 : 1;
  const s1c = sg * S5_1, s2c = sg * S5_2;
  for (let p = 0; p < m; p++) {
    const t = 8 * p;
    const c1 = tw[t], w1 = sg * tw[t + 1], c2 = tw[t + 2], w2 = sg * tw[t + 3];
    const c3 = tw[t + 4], w3 = sg * tw[t + 5], c4 = tw[t + 6], w4 = sg * tw[t + 7];
    const i0 = p * len, i1 = (p + m) * len, i2 = (p + 2 * m) * len, i3 = (p + 3 * m) * len, i4 = (p + 4 * m) * len;
    const o0 = 5 * p * len, o1 = o0 + len, o2 = o1 + len, o3 = o2 + len, o4 = o3 + len;
    for (let j = 0; j < len; j++) {
      const ar = x[i0 + j], ai = x[io + i0 + j];
      const br = x[i1 + j], bi = x[io + i1 + j];
      const cr = x[i2 + j], ci = x[io + i2 + j];
      const dr = x[i3 + j], di = x[io + i3 + j];
      const er = x[i4 + j], ei = x[io + i4 + j];
      const s14r = br + er, s14i = bi + ei, d14r = br - er, d14i = bi - ei;
      const s23r = cr + dr, s23i = ci + di, d23r = cr - dr, d23i = ci - di;
      y[o0 + j] = ar + s14r + s23r;
      y[io + o0 + j] = ai + s14i + s23i;
      // Forward ω^k = cos(2πk/5) − i sin(2πk/5); y_k = a + Σ cos·sums − i Σ sin·differences.
      const m1r = ar + C5_1 * s14r + C5_2 * s23r, m1i = ai + C5_1 * s14i + C5_2 * s23i;
      const m2r = ar + C5_2 * s14r + C5_1 * s23r, m2i = ai + C5_2 * s14i + C5_1 * s23i;
      const n1r = s1c * d14r + s2c * d23r, n1i = s1c * d14i + s2c * d23i;
      const n2r = s2c * d14r - s1c * d23r, n2i = s2c * d14i - s1c * d23i;
      // y1 = m1 − i n1, y4 = m1 + i n1, y2 = m2 − i n2, y3 = m2 + i n2
      const y1r = m1r + n1i, y1i = m1i - n1r;
      const y4r = m1r - n1i, y4i = m1i + n1r;
      const y2r = m2r + n2i, y2i = m2i - n2r;
      const y3r = m2r - n2i, y3i = m2i + n2r;
      y[o1 + j] = y1r * c1 - y1i * w1;
      y[io + o1 + j] = y1r * w1 + y1i * c1;
      y[o2 + j] = y2r * c2 - y2i * w2;
      y[io + o2 + j] = y2r * w2 + y2i * c2;
      y[o3 + j] = y3r * c3 - y3i * w3;
      y[io + o3 + j] = y3r * w3 + y3i * c3;
      y[o4 + j] = y4r * c4 - y4i * w4;
      y[io + o4 + j] = y4r * w4 + y4i * c4;
    }
  }
}
