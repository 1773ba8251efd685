import { describe, expect, it } from 'vitest';
import { fftPlan, fftRows, fftSizeNext, fftSizeOk } from '../../../engine/pme/fftRows';
import {
  meshFftCreate,
  meshFftForward,
  meshFftInverse,
  meshFftLength,
  meshFftScratch,
  meshForwardColumns,
  meshColumnBlocks,
  meshInverseColumns,
  meshSlabCount,
  meshSlabsSolve,
} from '../../../engine/pme/fft3d';
import { randomSeeded } from '../../../engine/util/random';

// The reference throughout is the DFT written out term by term, X_k = Σ_j x_j e^{∓2πi jk/n} (definition;
// no fast algorithm involved), with angles reduced mod n so that the reference itself is accurate.

function dft1(re: Float64Array, im: Float64Array, inverse: boolean): [Float64Array, Float64Array] {
  const n = re.length;
  const or = new Float64Array(n), oi = new Float64Array(n);
  const sg = inverse ? 1 : -1;
  for (let k = 0; k < n; k++) {
    let sr = 0, si = 0;
    for (let j = 0; j < n; j++) {
      const a = (sg * 2 * Math.PI * ((j * k) % n)) / n;
      const c = Math.cos(a), s = Math.sin(a);
      sr += re[j] * c - im[j] * s;
      si += re[j] * s + im[j] * c;
    }
    or[k] = sr;
    oi[k] = si;
  }
  return [or, oi];
}

/** Direct 3D DFT of a real mesh at one wavevector (k0, k1, k2). */
function dft3At(x: Float64Array, n: [number, number, number], k: [number, number, number]): [number, number] {
  let sr = 0, si = 0;
  for (let a = 0; a < n[0]; a++) for (let b = 0; b < n[1]; b++) for (let c = 0; c < n[2]; c++) {
    const ph = ((a * k[0]) % n[0]) / n[0] + ((b * k[1]) % n[1]) / n[1] + ((c * k[2]) % n[2]) / n[2];
    const v = x[(a * n[1] + b) * n[2] + c];
    sr += v * Math.cos(-2 * Math.PI * ph);
    si += v * Math.sin(-2 * Math.PI * ph);
  }
  return [sr, si];
}

describe('fftSizeOk / fftSizeNext', () => {
  it('accepts exactly the integers with prime factors 2, 3, 5', () => {
    expect([1, 2, 3, 4, 5, 6, 8, 9, 10, 12, 15, 16, 30, 60, 64, 81, 96, 100, 120, 125, 160, 180].every(fftSizeOk)).toBe(true);
    expect([0, -4, 7, 11, 14, 21, 22, 49, 77, 2.5, NaN].some(fftSizeOk)).toBe(false);
  });
  it('fftSizeNext(n, even) is the smallest usable size at or above n', () => {
    expect(fftSizeNext(7)).toBe(8);
    expect(fftSizeNext(13)).toBe(15);
    expect(fftSizeNext(13, true)).toBe(16);
    expect(fftSizeNext(97, true)).toBe(100);
    expect(fftSizeNext(121, true)).toBe(128);
  });
  it('fftPlan(7) throws a RangeError that names the length', () => {
    expect(() => fftPlan(7)).toThrow(/prime factors 2, 3 and 5 only, got 7/);
  });
});

describe('fftRows(plan, a, b, w, inverse) matches the direct DFT', () => {
  for (const n of [1, 2, 3, 4, 5, 6, 8, 9, 10, 12, 15, 16, 20, 24, 25, 27, 30, 32, 40, 45, 48, 60, 64, 75, 80, 90, 96, 100, 120, 125, 128]) {
    it(`n = ${n}, 3 columns, forward and inverse, to 1e-13 of the largest coefficient`, () => {
      const rand = randomSeeded(1000 + n);
      const w = 3;
      const plan = fftPlan(n);
      for (const inverse of [false, true]) {
        const a = new Float64Array(2 * n * w).map(() => rand() - 0.5);
        const input = Float64Array.from(a);
        const out = fftRows(plan, a, new Float64Array(2 * n * w), w, inverse);
        for (let c = 0; c < w; c++) {
          const re = new Float64Array(n), im = new Float64Array(n);
          for (let j = 0; j < n; j++) {
            re[j] = input[j * w + c];
            im[j] = input[n * w + j * w + c];
          }
          const [rr, ri] = dft1(re, im, inverse);
          let scale = 0, err = 0;
          for (let k = 0; k < n; k++) {
            scale = Math.max(scale, Math.hypot(rr[k], ri[k]));
            err = Math.max(err, Math.hypot(out[k * w + c] - rr[k], out[n * w + k * w + c] - ri[k]));
          }
          expect(err).toBeLessThanOrEqual(1e-13 * scale);
        }
      }
    });
  }
});

describe('meshFftForward / meshFftInverse (real-to-complex 3D) against the direct 3D DFT', () => {
  for (const n of [[2, 3, 5], [4, 4, 4], [6, 10, 9], [10, 8, 12], [16, 6, 15], [12, 25, 8]] as [number, number, number][]) {
    it(`${n.join('×')}: every half-spectrum coefficient to 1e-12 of the largest; inverse∘forward = N·identity to 1e-13`, () => {
      const f = meshFftCreate(n);
      const total = n[0] * n[1] * n[2];
      const rand = randomSeeded(n[0] * 1000 + n[1] * 10 + n[2]);
      const x = new Float64Array(total).map(() => rand() - 0.5);
      const data = new Float64Array(meshFftLength(f));
      data.set(x);
      meshFftForward(f, data);
      const B = n[1] * n[2];
      let scale = 0, err = 0;
      for (let k0 = 0; k0 <= n[0] / 2; k0++) for (let k1 = 0; k1 < n[1]; k1++) for (let k2 = 0; k2 < n[2]; k2++) {
        const [r, i] = dft3At(x, n, [k0, k1, k2]);
        const at = 2 * k0 * B + k2 * n[1] + k1;
        scale = Math.max(scale, Math.hypot(r, i));
        err = Math.max(err, Math.hypot(data[at] - r, data[at + B] - i));
      }
      expect(err).toBeLessThanOrEqual(1e-12 * scale);
      meshFftInverse(f, data);
      let e2 = 0;
      for (let j = 0; j < total; j++) e2 = Math.max(e2, Math.abs(data[j] / total - x[j]));
      expect(e2).toBeLessThan(1e-13);
    });
  }

  it('the fused slab pass with a multiplier convolves: multiplying by e^{−2πi k·s/n} shifts the mesh by s', () => {
    const n: [number, number, number] = [8, 6, 10];
    const shift = [3, 1, 7];
    const f = meshFftCreate(n);
    const B = n[1] * n[2];
    const rand = randomSeeded(5);
    const x = new Float64Array(n[0] * B).map(() => rand());
    const data = new Float64Array(meshFftLength(f));
    data.set(x);
    const sc = meshFftScratch(f);
    meshForwardColumns(f, data, 0, meshColumnBlocks(f), sc);
    meshSlabsSolve(f, data, 0, meshSlabCount(f), sc, (k0, s) => {
      for (let k2 = 0; k2 < n[2]; k2++) for (let k1 = 0; k1 < n[1]; k1++) {
        const a = -2 * Math.PI * ((k0 * shift[0]) / n[0] + (k1 * shift[1]) / n[1] + (k2 * shift[2]) / n[2]);
        const j = k2 * n[1] + k1;
        const re = s[j], im = s[B + j];
        s[j] = re * Math.cos(a) - im * Math.sin(a);
        s[B + j] = re * Math.sin(a) + im * Math.cos(a);
      }
    });
    meshInverseColumns(f, data, 0, meshColumnBlocks(f), sc);
    let err = 0;
    for (let a = 0; a < n[0]; a++) for (let b = 0; b < n[1]; b++) for (let c = 0; c < n[2]; c++) {
      const src = (((a - shift[0] + n[0]) % n[0]) * n[1] + ((b - shift[1] + n[1]) % n[1])) * n[2] + ((c - shift[2] + n[2]) % n[2]);
      err = Math.max(err, Math.abs(data[(a * n[1] + b) * n[2] + c] / (n[0] * B) - x[src]));
    }
    expect(err).toBeLessThan(1e-13);
  });

  it('meshFftCreate rejects an odd first side and sides with other prime factors, naming the side', () => {
    expect(() => meshFftCreate([9, 8, 8])).toThrow(/mesh side 0 must be even/);
    expect(() => meshFftCreate([8, 14, 8])).toThrow(/mesh side 1 .* got 14/);
  });
});
