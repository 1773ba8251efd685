import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { imageSumOrder } from '../../../engine/orders/index';
import { configCorner, maxErrorOverRms } from './fixtures';

describe('imageSumOrder nearest (minimum image)', () => {
  it('for particles within L/4 of each other it is the plain Newtonian sum, wherever the cluster sits across the boundary', () => {
    const L = 2;
    const offsets = [0.05, -0.2, 0.3, 0.1, 0.25, -0.15, -0.3, 0.2, 0.0, 0.12, -0.07, -0.22];
    const centre = [1.95, 0.02, 1.0]; // straddles two faces
    const n = 4;
    const positions = Float64Array.from({ length: 3 * n }, (_, k) => centre[k % 3] + offsets[k]);
    const masses = Float64Array.from([1, 2, 0.5, 1.5]);
    const r = imageSumOrder(positions, masses, boxMake(L), null, { order: 'nearest', G: 2 });
    const plain = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const d = [0, 1, 2].map((q) => positions[3 * j + q] - positions[3 * i + q]);
      const r3 = Math.hypot(...d) ** 3;
      for (let q = 0; q < 3; q++) plain[3 * i + q] += (2 * masses[j] * d[q]) / r3;
    }
    expect(maxErrorOverRms(r.acc, plain)).toBeLessThan(1e-14);
    expect(r.wrapped).toBeGreaterThan(0);
    expect(r.limit).toBeNull();
    expect(Array.from(r.partial.shell)).toEqual([0]);
  });

  it('is the same with and without background (the target-centred background box pulls nowhere at its centre)', () => {
    const c = configCorner(9, 51, [1, 1.4, 0.7]);
    const a = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'nearest' });
    const b = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'nearest', background: false });
    expect(Array.from(b.acc)).toEqual(Array.from(a.acc));
  });
});
