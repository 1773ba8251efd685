import { describe, expect, test } from 'vitest';
import { cdfPoints, histogramLog } from '../../../engine/stats/bins';

describe('histogramLog(values, binsPerDecade)', () => {
  test('puts values into bins on the decade grid, a grid value in the bin above its edge', () => {
    const h = histogramLog([1e-3, 2e-3, 0.05, 0.0999, 0.1, 0.5], 1);
    expect(Array.from(h.edges).map((e) => Number(e.toPrecision(12)))).toEqual([1e-3, 1e-2, 1e-1, 1]);
    expect(Array.from(h.counts)).toEqual([2, 2, 2]);
    expect(h.zeros).toBe(0);
    expect(h.excluded).toBe(0);
  });

  test('counts zeros and excluded values (negative, NaN, Infinity) apart', () => {
    const h = histogramLog([0, 0, -1, NaN, Infinity, 3], 5);
    expect(h.zeros).toBe(2);
    expect(h.excluded).toBe(3);
    expect(Array.from(h.counts).reduce((a, b) => a + b, 0)).toBe(1);
    // 3 = 10^0.477: bin floor(5·0.477) = 2, edges 10^0.4 and 10^0.6
    expect(h.edges[0]).toBeCloseTo(10 ** 0.4, 12);
    expect(h.edges[1]).toBeCloseTo(10 ** 0.6, 12);
  });

  test('gives one empty bin when no value is positive', () => {
    const h = histogramLog([0, NaN], 2);
    expect(h.counts).toHaveLength(1);
    expect(h.counts[0]).toBe(0);
  });

  test('rejects a bad binsPerDecade naming it', () => {
    expect(() => histogramLog([1], 0)).toThrow(/binsPerDecade must be a whole number from 1 to 100, got 0/);
  });
});

describe('cdfPoints(sorted, maxPoints)', () => {
  test('keeps every point of a short list with f = (rank + 1)/n', () => {
    const c = cdfPoints(Float64Array.from([1, 2, 4, 8]));
    expect(Array.from(c.x)).toEqual([1, 2, 4, 8]);
    expect(Array.from(c.f)).toEqual([0.25, 0.5, 0.75, 1]);
  });

  test('thins a long list to at most maxPoints, keeping first, last and ranks near the top', () => {
    const n = 100_000;
    const sorted = Float64Array.from({ length: n }, (_, i) => i);
    const c = cdfPoints(sorted, 200);
    expect(c.x.length).toBeLessThanOrEqual(200);
    expect(c.x[0]).toBe(0);
    expect(c.x[c.x.length - 1]).toBe(n - 1);
    expect(c.f[c.f.length - 1]).toBe(1);
    // the tail is resolved: some point lies in the top 0.01 % but below the maximum
    expect(Array.from(c.f).some((f) => f > 0.9999 && f < 1)).toBe(true);
    for (let k = 1; k < c.x.length; k++) expect(c.x[k]).toBeGreaterThan(c.x[k - 1]);
  });
});
