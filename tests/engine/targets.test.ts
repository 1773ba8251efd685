import { describe, expect, it } from 'vitest';
import { targetsResolve } from '../../engine/index';

describe('targetsResolve(spec, n)', () => {
  it("'all' gives 0..n−1 and 'first' the first k rows (capped at n)", () => {
    expect(Array.from(targetsResolve({ kind: 'all' }, 4))).toEqual([0, 1, 2, 3]);
    expect(Array.from(targetsResolve({ kind: 'first', count: 2 }, 4))).toEqual([0, 1]);
    expect(Array.from(targetsResolve({ kind: 'first', count: 9 }, 4))).toEqual([0, 1, 2, 3]);
  });

  it("'sample' draws k distinct rows in 0..n−1, sorted, the same for the same seed and different for another", () => {
    const a = targetsResolve({ kind: 'sample', count: 300, seed: 7 }, 5000);
    expect(a).toHaveLength(300);
    expect(new Set(a).size).toBe(300);
    for (let i = 1; i < a.length; i++) expect(a[i]).toBeGreaterThan(a[i - 1]);
    expect(a[0]).toBeGreaterThanOrEqual(0);
    expect(a[299]).toBeLessThan(5000);
    expect(Array.from(targetsResolve({ kind: 'sample', count: 300, seed: 7 }, 5000))).toEqual(Array.from(a));
    expect(Array.from(targetsResolve({ kind: 'sample', count: 300, seed: 8 }, 5000))).not.toEqual(Array.from(a));
  });

  it("'sample' is roughly uniform: each half of the rows gets 50 % ± 5σ of 2000 draws", () => {
    const a = targetsResolve({ kind: 'sample', count: 2000, seed: 3 }, 100000);
    const low = Array.from(a).filter((i) => i < 50000).length;
    expect(Math.abs(low - 1000)).toBeLessThan(5 * Math.sqrt(2000 * 0.25));
  });

  it("'sample' with k ≥ n gives every row", () => {
    expect(Array.from(targetsResolve({ kind: 'sample', count: 10, seed: 1 }, 6))).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('a count that is not a positive integer is a RangeError naming the target count', () => {
    for (const count of [0, -3, 2.5, NaN]) {
      expect(() => targetsResolve({ kind: 'first', count }, 10)).toThrow(/target count/);
      expect(() => targetsResolve({ kind: 'sample', count, seed: 1 }, 10)).toThrow(RangeError);
    }
  });
});
