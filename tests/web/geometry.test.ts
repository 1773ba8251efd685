import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { NO_SLAB, arrowSegments, drawOrder, pickNearest, slabContains, slabMake, worldPositions } from '../../app/web/view3d/geometry';

describe('worldPositions(positions, box, rows, order)', () => {
  test('scales by the longest side, wraps outside positions, follows rows and draw order', () => {
    const pos = Float64Array.from([1, 0.5, 0.25, -0.5, 2.5, 0.9, 0.2, 0.2, 0.2]);
    const box = boxMake(2, 1, 1);
    expect(Array.from(worldPositions(pos, box, null))).toEqual([0.5, 0.25, 0.125, 0.75, 0.25, 0.45, 0.1, 0.1, 0.1].map(Math.fround));
    expect(Array.from(worldPositions(pos, box, Int32Array.from([2, 0]), Uint32Array.from([1, 0])))).toEqual([0.5, 0.25, 0.125, 0.1, 0.1, 0.1].map(Math.fround));
  });
});

describe('drawOrder(n, seed)', () => {
  test('is a permutation, the same for the same seed', () => {
    const p = drawOrder(1000, 3);
    expect([...p].sort((a, b) => a - b)).toEqual(Array.from({ length: 1000 }, (_, i) => i));
    expect(Array.from(drawOrder(1000, 3))).toEqual(Array.from(p));
    expect(Array.from(p.subarray(0, 10))).not.toEqual(Array.from({ length: 10 }, (_, i) => i));
  });
});

describe('slabMake / slabContains', () => {
  test('a slab around the centre holds what lies within half the thickness', () => {
    const s = slabMake('z', 0.5, 0.2, boxMake(1));
    expect(s.axis).toBe(2);
    expect(slabContains(s, 0.45)).toBe(true);
    expect(slabContains(s, 0.61)).toBe(false);
  });

  test('a slab across the periodic boundary wraps (centre 0.05, thickness 0.2 of a side that is 1 in world units)', () => {
    // box 2 × 1 × 1: world unit = 2, so x spans [0, 1) in world units and the slab is [0.95, 1) ∪ [0, 0.15]
    const s = slabMake('x', 0.05, 0.2, boxMake(2, 1, 1));
    expect(s.min).toBeCloseTo(0.95, 12);
    expect(s.max).toBeCloseTo(0.15, 12);
    expect(slabContains(s, 0.98)).toBe(true);
    expect(slabContains(s, 0.1)).toBe(true);
    expect(slabContains(s, 0.5)).toBe(false);
    // along y the side is 0.5 in world units
    expect(slabMake('y', 0.5, 0.2, boxMake(2, 1, 1)).max).toBeCloseTo(0.3, 12);
  });

  test('"none", a zero or full thickness give no slab', () => {
    expect(slabMake('none', 0.5, 0.2, boxMake(1))).toBe(NO_SLAB);
    expect(slabMake('y', 0.5, 0, boxMake(1))).toBe(NO_SLAB);
    expect(slabMake('y', 0.5, 1, boxMake(1))).toBe(NO_SLAB);
    expect(slabContains(NO_SLAB, 123)).toBe(true);
  });
});

describe('arrowSegments(world, residuals, which, options)', () => {
  const world = new Float32Array([0, 0, 0, 1, 1, 1]);
  const res = Float64Array.from([2, 0, 0, 0, 0.5, 0]);

  test('draws shaft and two head strokes per arrow, the longest maxLength long, along the residual', () => {
    const seg = arrowSegments(world, res, [0, 1], { maxLength: 0.1, log: false });
    expect(seg).toHaveLength(36);
    expect(Array.from(seg.subarray(0, 6)).map((v) => Number(v.toFixed(6)))).toEqual([0, 0, 0, 0.1, 0, 0]);
    // the second residual is a quarter as long: shaft 0.025 along +y
    expect(seg[18 + 4] - seg[18 + 1]).toBeCloseTo(0.025, 6);
    // head strokes start at the tip and go back along the shaft
    expect(seg[6]).toBeCloseTo(0.1, 6);
    expect(seg[9]).toBeLessThan(0.1);
  });

  test('the log option compresses the range: the short arrow gets longer than its linear share', () => {
    const lin = arrowSegments(world, res, [0, 1], { maxLength: 0.1, log: false });
    const log = arrowSegments(world, res, [0, 1], { maxLength: 0.1, log: true });
    expect(log[18 + 4] - log[18 + 1]).toBeGreaterThan(lin[18 + 4] - lin[18 + 1]);
  });

  test('skips zero and non-finite residuals; no residual at all gives no segments', () => {
    expect(arrowSegments(world, Float64Array.from([0, 0, 0, NaN, 0, 0]), [0, 1], { maxLength: 0.1, log: false })).toHaveLength(0);
    expect(arrowSegments(world, Float64Array.from([1, 0, 0, 0, 0, 0]), [0, 1], { maxLength: 0.1, log: false })).toHaveLength(18);
  });
});

describe('pickNearest(world, viewProjection, w, h, x, y, radius)', () => {
  // identity view-projection: clip = world, screen x = (x+1)/2·w, y = (1−y)/2·h
  const I = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
  const pts = new Float32Array([0, 0, 0, 0.5, 0.5, 0, -0.5, 0, 0]);

  test('finds the point under the pixel within the radius, else −1', () => {
    expect(pickNearest(pts, I, 200, 200, 100, 100, 5)).toBe(0);
    expect(pickNearest(pts, I, 200, 200, 150, 50, 5)).toBe(1);
    expect(pickNearest(pts, I, 200, 200, 53, 101, 5)).toBe(2);
    expect(pickNearest(pts, I, 200, 200, 10, 190, 5)).toBe(-1);
  });

  test('skips points the filter hides (the slab)', () => {
    expect(pickNearest(pts, I, 200, 200, 100, 100, 5, (s) => s !== 0)).toBe(-1);
  });

  test('skips points behind the camera (w ≤ 0)', () => {
    const flip = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, -1];
    expect(pickNearest(pts, flip, 200, 200, 100, 100, 5)).toBe(-1);
  });
});
