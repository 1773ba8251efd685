import { describe, expect, test } from 'vitest';
import { accelerationSummary } from '../../app/web/state/summary';

describe('accelerationSummary(acc)', () => {
  test('gives count, rms, max and min of |a| (values worked by hand)', () => {
    // |a| = 5 (3-4-0 triangle), 0, 13 (5-12-0 triangle): rms = √((25 + 0 + 169)/3) = √(194/3)
    const s = accelerationSummary(Float64Array.from([3, 4, 0, 0, 0, 0, 0, -5, 12]));
    expect(s.count).toBe(3);
    expect(s.rms).toBeCloseTo(Math.sqrt(194 / 3), 14);
    expect(s.max).toBe(13);
    expect(s.min).toBe(0);
  });

  test('gives NaN statistics for no particles (shown as missing)', () => {
    const s = accelerationSummary(new Float64Array(0));
    expect(s.count).toBe(0);
    expect(s.rms).toBeNaN();
    expect(s.max).toBeNaN();
    expect(s.min).toBeNaN();
  });
});
