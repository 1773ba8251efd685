import { describe, expect, test } from 'vitest';
import { relativeErrors, residualVectors, vectorNorms } from '../../../engine/stats/relativeError';
import { ERROR_PERCENTILES, errorSummary, largestIndices } from '../../../engine/stats/errorSummary';
import { errorReport } from '../../../engine/stats/errorReport';

describe('relativeErrors(accA, accB)', () => {
  test('is |a_A − a_B| / |a_B| per target (3-4-5 and 5-12-13 triangles worked by hand)', () => {
    const b = Float64Array.from([3, 4, 0, 0, 0, 13]);
    const a = Float64Array.from([3, 4, 1, 0, 5, 1]); // differences (0,0,1) and (0,5,−12): norms 1 and 13
    const r = relativeErrors(a, b);
    expect(r[0]).toBeCloseTo(1 / 5, 15);
    expect(r[1]).toBeCloseTo(1, 15);
    expect(Array.from(residualVectors(a, b))).toEqual([0, 0, 1, 0, 5, -12]);
    expect(Array.from(vectorNorms(b))).toEqual([5, 13]);
  });

  test('is 0 where both are zero, Infinity where only the reference is zero, NaN for non-finite input', () => {
    const b = Float64Array.from([0, 0, 0, 0, 0, 0, 1, 0, 0]);
    const a = Float64Array.from([0, 0, 0, 1e-300, 0, 0, NaN, 0, 0]);
    expect(Array.from(relativeErrors(a, b))).toEqual([0, Infinity, NaN]);
  });

  test('neither underflows nor overflows in the squares (1e-300 and 1e200 components)', () => {
    const r = relativeErrors(Float64Array.from([3e-300, 0, 0, 3e200, 0, 0]), Float64Array.from([2e-300, 0, 0, 2e200, 0, 0]));
    expect(r[0]).toBeCloseTo(0.5, 12);
    expect(r[1]).toBeCloseTo(0.5, 12);
  });

  test('rejects sets of different lengths with a message giving both', () => {
    expect(() => relativeErrors(new Float64Array(6), new Float64Array(3))).toThrow('acceleration sets differ: A holds 6 numbers, B holds 3');
    expect(() => relativeErrors(new Float64Array(4), new Float64Array(4))).toThrow(/3 per target/);
  });
});

describe('largestIndices(values, k)', () => {
  test('lists the k largest, largest first, NaN last, ties by lower index', () => {
    const v = Float64Array.from([0.1, 5, NaN, 5, 3, Infinity, 0]);
    expect(Array.from(largestIndices(v, 3))).toEqual([5, 1, 3]);
    expect(Array.from(largestIndices(v, 10))).toEqual([5, 1, 3, 4, 0, 6, 2]);
    expect(largestIndices(v, 0)).toHaveLength(0);
  });
});

describe('errorSummary(accA, accB, worst)', () => {
  test('reports percentiles by the linear rule, max, rms error, rms ratio and the worst targets', () => {
    // B: |a_B| = 1 along x for 10 targets; A differs by k·0.01 along y for target k (relative error 0.01k)
    const n = 10;
    const b = new Float64Array(3 * n), a = new Float64Array(3 * n);
    for (let k = 0; k < n; k++) {
      b[3 * k] = 1;
      a[3 * k] = 1;
      a[3 * k + 1] = 0.01 * k;
    }
    const s = errorSummary(a, b, 3);
    expect(s.count).toBe(10);
    expect(s.defined).toBe(10);
    // sorted errors 0, 0.01 … 0.09: median h = 4.5 → 0.045; 90 % h = 8.1 → 0.081; 99.9 % h = 8.991 → 0.08991
    expect(s.percentiles[0]).toBeCloseTo(0.045, 15);
    expect(s.percentiles[1]).toBeCloseTo(0.081, 15);
    expect(s.percentiles[3]).toBeCloseTo(0.08991, 15);
    expect(s.max).toBeCloseTo(0.09, 15);
    // rms of 0.01k over k = 0..9: √(Σk²/10)·0.01 = √28.5·0.01
    expect(s.rmsError).toBeCloseTo(Math.sqrt(28.5) * 0.01, 15);
    expect(s.rmsReference).toBe(1);
    expect(s.rmsRatio).toBeCloseTo(Math.sqrt(28.5) * 0.01, 15);
    expect(Array.from(s.worst)).toEqual([9, 8, 7]);
    expect(ERROR_PERCENTILES).toEqual([0.5, 0.9, 0.99, 0.999]);
  });

  test('counts zero references and non-finite targets apart and leaves them out of percentiles', () => {
    const b = Float64Array.from([1, 0, 0, 0, 0, 0, 1, 0, 0]);
    const a = Float64Array.from([1.5, 0, 0, 1, 0, 0, Infinity, 0, 0]);
    const s = errorSummary(a, b);
    expect(s.count).toBe(3);
    expect(s.defined).toBe(1);
    expect(s.zeroReference).toBe(1);
    expect(s.nonFinite).toBe(1);
    expect(s.median).toBe(0.5);
    expect(s.max).toBe(0.5);
    expect(Array.from(s.worst)).toEqual([1, 0, 2]);
  });

  test('gives NaN statistics for no targets (shown as missing)', () => {
    const s = errorSummary(new Float64Array(0), new Float64Array(0));
    expect(s.count).toBe(0);
    expect(s.median).toBeNaN();
    expect(s.max).toBeNaN();
    expect(s.rmsRatio).toBeNaN();
  });
});

describe('errorReport(accA, accB)', () => {
  test('holds relative errors, summary, histogram and cdf of the same comparison', () => {
    const b = Float64Array.from([1, 0, 0, 1, 0, 0, 1, 0, 0, 1, 0, 0]);
    const a = Float64Array.from([1, 0, 0, 1.001, 0, 0, 1.01, 0, 0, 1.1, 0, 0]);
    const r = errorReport(a, b);
    expect(r.relative[0]).toBe(0);
    expect(r.relative[3]).toBeCloseTo(0.1, 12);
    expect(r.summary.max).toBeCloseTo(0.1, 12);
    expect(r.histogram.zeros).toBe(1);
    expect(Array.from(r.histogram.counts).reduce((s, c) => s + c, 0)).toBe(3);
    expect(Array.from(r.cdf.f)).toEqual([0.25, 0.5, 0.75, 1]);
  });
});
