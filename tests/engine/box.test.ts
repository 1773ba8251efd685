import { describe, expect, it } from 'vitest';
import { boxMake, boxSides, boxVolume, minimumImage, positionsWrap, wrapCoordinate } from '../../engine/index';

describe('box helpers', () => {
  it('boxMake(L) is cubic, boxMake(lx, ly, lz) rectangular; boxVolume and boxSides follow', () => {
    expect(boxMake(2)).toEqual({ lx: 2, ly: 2, lz: 2 });
    const b = boxMake(1, 2.5, 4);
    expect(boxSides(b)).toEqual([1, 2.5, 4]);
    expect(boxVolume(b)).toBe(10);
  });

  it('wrapCoordinate(x, l) lands in [0, l) even for values a rounding error below 0 or at l', () => {
    expect(wrapCoordinate(2.25, 1)).toBe(0.25);
    expect(wrapCoordinate(-0.25, 1)).toBe(0.75);
    expect(wrapCoordinate(1, 1)).toBe(0);
    for (const x of [-1e-20, -Number.MIN_VALUE, -5e-17, 3 - 1e-16, 1e300 % 7]) {
      const w = wrapCoordinate(x, 0.7);
      expect(w).toBeGreaterThanOrEqual(0);
      expect(w).toBeLessThan(0.7);
    }
  });

  it('positionsWrap moves every coordinate into the home cell and counts the particles it moved', () => {
    const p = new Float64Array([0.5, 0.5, 0.5, -0.1, 0.5, 0.5, 1.2, 2.5, -3, 0, 0, 0.999]);
    const moved = positionsWrap(p, boxMake(1, 2, 1));
    expect(moved).toBe(2);
    expect(Array.from(p).map((v) => Math.round(v * 1e12) / 1e12)).toEqual([0.5, 0.5, 0.5, 0.9, 0.5, 0.5, 0.2, 0.5, 0, 0, 0, 0.999]);
  });

  it('minimumImage(d, l) wraps a separation into [−l/2, l/2]', () => {
    expect(minimumImage(0.7, 1)).toBeCloseTo(-0.3, 15);
    expect(minimumImage(-0.7, 1)).toBeCloseTo(0.3, 15);
    expect(minimumImage(0.2, 1)).toBe(0.2);
    expect(minimumImage(5.2, 2)).toBeCloseTo(-0.8, 14);
  });
});
