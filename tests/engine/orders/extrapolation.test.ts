import { describe, expect, it } from 'vitest';
import { extrapolateToZero } from '../../../engine/orders/extrapolation';

describe('extrapolateToZero(xs, rows, width)', () => {
  it('recovers p(0) exactly for a polynomial of degree < number of points, per column', () => {
    const xs = [1, 0.25, 0.0625, 0.015625];
    const rows = new Float64Array(8);
    xs.forEach((x, s) => {
      rows[2 * s] = 3 - 2 * x + 5 * x * x - x ** 3;
      rows[2 * s + 1] = -1 + 0.5 * x;
    });
    const v = extrapolateToZero(xs, rows, 2);
    expect(v[0]).toBeCloseTo(3, 13);
    expect(v[1]).toBeCloseTo(-1, 14);
  });

  it('with two points is Richardson’s rule (x₂f₁ − x₁f₂)/(x₂ − x₁)', () => {
    const v = extrapolateToZero([1 / 4, 1 / 16], Float64Array.from([7, 5]), 1);
    expect(v[0]).toBeCloseTo((7 / 16 - 5 / 4) / (1 / 16 - 1 / 4), 14);
  });
});
