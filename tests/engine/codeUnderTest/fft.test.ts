import { describe, expect, test } from 'vitest';
import { fft1d, fft3d, fftPlan, isPowerOfTwo } from '../../../engine/codeUnderTest/fft';
import { randomSeeded } from '../../../engine/util/random';

/** Direct DFT X_k = Σ_j x_j e^{∓2πi jk/n} over a 3D field, x-major (independent O(n²) definition). */
function dft3d(re: Float64Array, im: Float64Array, dims: number[], inverse: boolean): [Float64Array, Float64Array] {
  const [nx, ny, nz] = dims;
  const N = nx * ny * nz;
  const or = new Float64Array(N), oi = new Float64Array(N);
  const sign = inverse ? 1 : -1;
  for (let a = 0; a < nx; a++) for (let b = 0; b < ny; b++) for (let c = 0; c < nz; c++) {
    let sr = 0, si = 0;
    for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) for (let k = 0; k < nz; k++) {
      const ph = sign * 2 * Math.PI * ((a * i) / nx + (b * j) / ny + (c * k) / nz);
      const x = re[(i * ny + j) * nz + k], y = im[(i * ny + j) * nz + k];
      sr += x * Math.cos(ph) - y * Math.sin(ph);
      si += x * Math.sin(ph) + y * Math.cos(ph);
    }
    or[(a * ny + b) * nz + c] = inverse ? sr / N : sr;
    oi[(a * ny + b) * nz + c] = inverse ? si / N : si;
  }
  return [or, oi];
}

function randomField(n: number, seed: number): [Float64Array, Float64Array] {
  const r = randomSeeded(seed);
  return [Float64Array.from({ length: n }, () => r() - 0.5), Float64Array.from({ length: n }, () => r() - 0.5)];
}

describe('fft1d(plan, re, im, inverse)', () => {
  test.each([1, 2, 4, 8, 64])('equals the direct DFT for length %i (forward and inverse)', (n) => {
    for (const inverse of [false, true]) {
      const [re, im] = randomField(n, n);
      const [er, ei] = dft3d(re, im, [1, 1, n], inverse);
      fft1d(fftPlan(n), re, im, inverse);
      for (let k = 0; k < n; k++) {
        expect(re[k]).toBeCloseTo(er[k], 12);
        expect(im[k]).toBeCloseTo(ei[k], 12);
      }
    }
  });

  test('transforms a unit impulse at j = 1 to e^{−2πik/n} (by definition)', () => {
    const n = 16;
    const re = new Float64Array(n), im = new Float64Array(n);
    re[1] = 1;
    fft1d(fftPlan(n), re, im);
    for (let k = 0; k < n; k++) {
      expect(re[k]).toBeCloseTo(Math.cos((2 * Math.PI * k) / n), 14);
      expect(im[k]).toBeCloseTo(-Math.sin((2 * Math.PI * k) / n), 14);
    }
  });

  test('rejects a length that is not a power of two', () => {
    expect(() => fftPlan(12)).toThrow('fft: length must be a power of two, got 12');
    expect(isPowerOfTwo(0)).toBe(false);
    expect(isPowerOfTwo(256)).toBe(true);
  });
});

describe('fft3d(re, im, nx, ny, nz, inverse)', () => {
  test('equals the direct 3D DFT on an 8 × 4 × 2 field (forward and inverse)', () => {
    for (const inverse of [false, true]) {
      const [re, im] = randomField(64, inverse ? 2 : 1);
      const [er, ei] = dft3d(re, im, [8, 4, 2], inverse);
      fft3d(re, im, 8, 4, 2, inverse);
      for (let k = 0; k < 64; k++) {
        expect(re[k]).toBeCloseTo(er[k], 12);
        expect(im[k]).toBeCloseTo(ei[k], 12);
      }
    }
  });

  test('inverse undoes forward, and Parseval holds: Σ|x|² = Σ|X|²/N', () => {
    const [re, im] = randomField(16 * 16 * 16, 5);
    const r0 = re.slice(), i0 = im.slice();
    fft3d(re, im, 16, 16, 16);
    let sx = 0, sX = 0;
    for (let k = 0; k < re.length; k++) {
      sx += r0[k] ** 2 + i0[k] ** 2;
      sX += re[k] ** 2 + im[k] ** 2;
    }
    expect(sX / re.length).toBeCloseTo(sx, 9);
    fft3d(re, im, 16, 16, 16, true);
    for (let k = 0; k < re.length; k++) {
      expect(re[k]).toBeCloseTo(r0[k], 13);
      expect(im[k]).toBeCloseTo(i0[k], 13);
    }
  });

  test('rejects arrays whose length does not match the sizes', () => {
    expect(() => fft3d(new Float64Array(8), new Float64Array(8), 4, 4, 1)).toThrow('fft3d: arrays hold 8 and 8 values, expected 4·4·1 = 16');
  });
});
