import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { boxDipole, orderDepolarisation, prismDepolarisation } from '../../../engine/orders/predictedLimit';
import { uniformBoxField } from '../../../engine/orders/uniformBox';

describe('prismDepolarisation(a, b, c)', () => {
  it('a cube gives (4π/3)I, and every prism has trace 4π', () => {
    const n = prismDepolarisation(0.7, 0.7, 0.7);
    for (let k = 0; k < 9; k++) expect(n[k]).toBeCloseTo(k % 4 === 0 ? (4 * Math.PI) / 3 : 0, 14);
    for (const [a, b, c] of [[1, 2, 3], [0.1, 5, 1], [4, 0.3, 0.3]]) {
      const p = prismDepolarisation(a, b, c);
      expect(Math.abs(p[0] + p[4] + p[8] - 4 * Math.PI)).toBeLessThan(1e-13);
    }
  });

  it('tends to the slab (4π along the thin axis) and needle (2π across) tensors (PHYSICS.md)', () => {
    const slab = prismDepolarisation(1, 1, 1e-7);
    expect(Math.abs(slab[8] - 4 * Math.PI)).toBeLessThan(1e-5);
    const needle = prismDepolarisation(1, 1, 1e7);
    expect(Math.abs(needle[0] - 2 * Math.PI)).toBeLessThan(1e-5);
    expect(Math.abs(needle[4] - 2 * Math.PI)).toBeLessThan(1e-5);
  });

  it('equals −∂_b g_a at the centre of a homogeneous prism (field of a uniformly polarised prism; numerical derivative of the closed-form box field)', () => {
    const [a, b, c] = [0.5, 0.8, 1.7];
    const N = prismDepolarisation(a, b, c);
    const h = 1e-4;
    const g = (p: number[]) => {
      const o = new Float64Array(3);
      uniformBoxField(p[0], p[1], p[2], -a, a, -b, b, -c, c, o);
      return o;
    };
    for (let col = 0; col < 3; col++) {
      const up = [0, 0, 0], dn = [0, 0, 0];
      up[col] = h;
      dn[col] = -h;
      const gu = g(up), gd = g(dn);
      for (let row = 0; row < 3; row++) expect(Math.abs(-(gu[row] - gd[row]) / (2 * h) - N[3 * row + col])).toBeLessThan(1e-7);
    }
  });
});

describe('orderDepolarisation and boxDipole', () => {
  it('cube order in a rectangular box uses the prism of the box sides; slabs 4π êê; screened 0', () => {
    const box = boxMake(1, 2, 3);
    expect(Array.from(orderDepolarisation('cube', box))).toEqual(Array.from(prismDepolarisation(1, 2, 3)));
    expect(orderDepolarisation('slab-y', box)[4]).toBe(4 * Math.PI);
    expect(orderDepolarisation('sphere', box)[8]).toBe((4 * Math.PI) / 3);
    expect(Array.from(orderDepolarisation('screened', box)).every((v) => v === 0)).toBe(true);
  });

  it('D = Σ m (r − c) about the box centre', () => {
    const d = boxDipole(new Float64Array([0, 0, 0, 1, 2, 3]), new Float64Array([2, 1]), boxMake(2, 4, 6));
    expect(Array.from(d)).toEqual([2 * -1 + 1 * 0, 2 * -2 + 0, 2 * -3 + 0]);
  });
});
