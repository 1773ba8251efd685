import { describe, expect, test } from 'vitest';
import { percentileLinear, sortedFinite } from '../../../engine/stats/percentile';

const sorted = (xs: number[]) => Float64Array.from(xs).sort();

describe('percentileLinear(sorted, q) — Hyndman & Fan 1996 definition 7 (NumPy "linear")', () => {
  test('matches the NumPy documentation example: percentile([[10,7,4],[3,2,1]], 50) = 3.5', () => {
    // numpy.org, numpy.percentile, Examples: a = [[10, 7, 4], [3, 2, 1]]; np.percentile(a, 50) → 3.5,
    // axis=0 → [6.5, 4.5, 2.5], axis=1 → [7, 2]
    expect(percentileLinear(sorted([10, 7, 4, 3, 2, 1]), 0.5)).toBe(3.5);
    expect([percentileLinear(sorted([10, 3]), 0.5), percentileLinear(sorted([7, 2]), 0.5), percentileLinear(sorted([4, 1]), 0.5)]).toEqual([6.5, 4.5, 2.5]);
    expect([percentileLinear(sorted([10, 7, 4]), 0.5), percentileLinear(sorted([3, 2, 1]), 0.5)]).toEqual([7, 2]);
  });

  test('interpolates between order statistics at h = (n − 1)q (values worked by hand)', () => {
    const x = sorted([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    // h = 9·0.9 = 8.1 → x[8] + 0.1(x[9] − x[8]) = 9.1; h = 9·0.99 = 8.91 → 9.91; h = 9·0.25 = 2.25 → 3.25
    expect(percentileLinear(x, 0.9)).toBeCloseTo(9.1, 14);
    expect(percentileLinear(x, 0.99)).toBeCloseTo(9.91, 14);
    expect(percentileLinear(x, 0.25)).toBeCloseTo(3.25, 14);
    expect(percentileLinear(x, 0)).toBe(1);
    expect(percentileLinear(x, 1)).toBe(10);
  });

  test('gives the only value for n = 1 and NaN for no values', () => {
    expect(percentileLinear(sorted([0.3]), 0.999)).toBe(0.3);
    expect(percentileLinear(new Float64Array(0), 0.5)).toBeNaN();
  });

  test.each([-0.1, 1.5, NaN])('rejects the fraction %s with a message naming q', (q) => {
    expect(() => percentileLinear(sorted([1, 2]), q)).toThrow(/fraction q must lie in \[0, 1\]/);
  });
});

describe('sortedFinite(values)', () => {
  test('drops NaN and ±Infinity and sorts ascending', () => {
    expect(Array.from(sortedFinite([3, NaN, -1, Infinity, 2, -Infinity, 0]))).toEqual([-1, 0, 2, 3]);
  });
});
