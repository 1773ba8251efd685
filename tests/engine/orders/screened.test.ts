import { describe, expect, it } from 'vitest';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { imageSumOrder } from '../../../engine/orders/index';
import { configCorner, maxErrorOverRms, partialRow } from './fixtures';

const G = 4.30091e-6;

describe('imageSumOrder screened (kernel e^{−λr}/r over all images)', () => {
  const c = configCorner(10, 41, [1, 1.2, 0.9], 0.6);

  it('equals the plain screened image sum, added cell by cell until e^{−λr} < 1e-17, at λ = 3 (1e-13 of rms)', () => {
    const lam = 3;
    const r = imageSumOrder(c.positions, c.masses, c.box, Int32Array.from([0, 7]), { order: 'screened', lambdas: [lam, 2], G, tol: 1e-13 });
    const L = [c.box.lx, c.box.ly, c.box.lz];
    const rMax = 40 / lam; // e^{−40} ≈ 4e-18
    const brute = new Float64Array(6);
    [0, 7].forEach((i, t) => {
      const nMax = L.map((l) => Math.ceil(rMax / l) + 1);
      for (let a = -nMax[0]; a <= nMax[0]; a++) for (let b = -nMax[1]; b <= nMax[1]; b++) for (let e = -nMax[2]; e <= nMax[2]; e++) {
        for (let j = 0; j < 10; j++) {
          if (a === 0 && b === 0 && e === 0 && j === i) continue;
          const d = [c.positions[3 * j] + a * L[0] - c.positions[3 * i], c.positions[3 * j + 1] + b * L[1] - c.positions[3 * i + 1], c.positions[3 * j + 2] + e * L[2] - c.positions[3 * i + 2]];
          const rr = Math.hypot(...d);
          if (rr > rMax) continue;
          // a = −G m ∇(e^{−λr}/r) at the target = G m e^{−λr}(1 + λr)/r² toward the source
          const f = (G * c.masses[j] * Math.exp(-lam * rr) * (1 + lam * rr)) / rr ** 3;
          for (let q = 0; q < 3; q++) brute[3 * t + q] += f * d[q];
        }
      }
    });
    expect(maxErrorOverRms(partialRow(r.partial.acc, 0, 2), brute)).toBeLessThan(1e-13);
  });

  it('tends to the Ewald force with an error falling like λ² (ratio 4 ± 0.2 per halving of λ), and the λ → 0 extrapolation agrees to 1e-10', () => {
    const lambdas = [1, 0.5, 0.25, 0.125, 0.0625];
    const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'screened', lambdas, G });
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
    const errs = lambdas.map((_, l) => maxErrorOverRms(partialRow(r.partial.acc, l, 10), ew));
    for (let l = 1; l < lambdas.length; l++) {
      expect(errs[l - 1] / errs[l]).toBeGreaterThan(3.8);
      expect(errs[l - 1] / errs[l]).toBeLessThan(4.2);
    }
    expect(errs[0]).toBeGreaterThan(1e-3); // the screening does change the force
    expect(maxErrorOverRms(r.acc, ew)).toBeLessThan(1e-10);
    expect(Array.from(r.limit!)).toEqual(Array.from(r.ewald));
    expect(Array.from(r.depolarisation!)).toEqual(new Array(9).fill(0));
  });

  it('is the same with and without background (the background summed over all images is a uniform medium)', () => {
    const a = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'screened', background: true, G });
    const b = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'screened', background: false, G });
    expect(Array.from(b.partial.acc)).toEqual(Array.from(a.partial.acc));
  });
});
