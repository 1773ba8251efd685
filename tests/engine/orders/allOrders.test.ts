import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { IMAGE_SUM_ORDERS, imageSumOrder } from '../../../engine/orders/index';
import { configNoDipole, maxErrorOverRms } from './fixtures';

describe('imageSumOrder: every order on one configuration', () => {
  it('with zero dipole, sphere, cube (1/R² tail estimate), slabs and screened all give the Ewald force', () => {
    const c = configNoDipole(4, 61, [1, 1, 1]);
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { tol: 1e-13 }).acc;
    const cases: [string, Float64Array, number][] = [];
    for (const order of ['sphere', 'cube', 'slab-x', 'slab-y', 'slab-z', 'screened'] as const) {
      const shells = order === 'sphere' || order === 'cube' ? 40 : order === 'screened' ? undefined : 10;
      const r = imageSumOrder(c.positions, c.masses, c.box, null, { order, shells });
      expect(Math.hypot(...r.dipole)).toBeLessThan(1e-14);
      cases.push([order, order === 'cube' ? r.extrapolated! : r.acc, order === 'sphere' ? 1e-6 : order === 'cube' ? 1e-5 : 1e-9]);
    }
    for (const [order, acc, tol] of cases) expect(maxErrorOverRms(acc, ew), order).toBeLessThan(tol);
    // the nearest image is not a periodic sum and differs
    const near = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'nearest' });
    expect(maxErrorOverRms(near.acc, ew)).toBeGreaterThan(1e-3);
  });

  it('one particle: every order gives its own images’ pull, the surface term (4πG/3V)·m(r − c) for sphere and cube, 0 for Ewald', () => {
    const box = boxMake(2);
    const p = new Float64Array([0.3, 1.1, 1.7]);
    const m = new Float64Array([3]);
    const want = [0.3 - 1, 1.1 - 1, 1.7 - 1].map((v) => (((4 * Math.PI) / 3) * 3 * v) / 8);
    const s = imageSumOrder(p, m, box, null, { order: 'sphere', shells: 40 });
    for (let d = 0; d < 3; d++) {
      expect(Math.abs(s.ewald[d])).toBeLessThan(1e-12);
      expect(Math.abs(s.acc[d] - want[d])).toBeLessThan(1e-6 * Math.hypot(...want));
    }
    const nearest = imageSumOrder(p, m, box, null, { order: 'nearest' });
    expect(Array.from(nearest.acc)).toEqual([0, 0, 0]);
  });

  it('wraps positions outside the box (and counts them); the result equals that of the wrapped input', () => {
    const c = configNoDipole(3, 62, [1, 1, 1]);
    const shifted = c.positions.map((x, k) => x + (k % 2 === 0 ? 3 : -2));
    for (const order of IMAGE_SUM_ORDERS) {
      const opts = { order, ...(order === 'screened' || order === 'nearest' ? {} : { shells: 4 }) };
      const a = imageSumOrder(c.positions, c.masses, c.box, null, opts);
      const b = imageSumOrder(shifted, c.masses, c.box, null, opts);
      expect(b.wrapped).toBe(6);
      expect(maxErrorOverRms(b.acc, a.acc), order).toBeLessThan(1e-12);
    }
  });

  it('no targets: empty arrays, no work', () => {
    const c = configNoDipole(2, 63, [1, 1, 1]);
    const r = imageSumOrder(c.positions, c.masses, c.box, new Int32Array(0), { order: 'sphere', shells: 3 });
    expect(r.acc.length).toBe(0);
    expect(r.partial.acc.length).toBe(0);
    expect(r.partial.shell.length).toBe(4);
  });
});
