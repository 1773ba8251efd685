import { describe, expect, it } from 'vitest';
import { bsplineValue } from '../../../engine/pme/bspline';
import { type MeshGeometry, meshInterpolate, meshInterpolateLoops, meshSpread, meshSpreadLoops } from '../../../engine/pme/spread';
import { randomSeeded } from '../../../engine/util/random';

function particles(n: number, seed: number, sides: [number, number, number]): Float64Array {
  const r = randomSeeded(seed);
  const xyzm = new Float64Array(4 * n);
  for (let i = 0; i < n; i++) {
    for (let d = 0; d < 3; d++) xyzm[4 * i + d] = r() * sides[d];
    xyzm[4 * i + 3] = 0.5 + r();
  }
  // include points on the edges of the periodic cell and near its end (wrap-around paths)
  xyzm.set([0, 0, 0, 1, sides[0] * (1 - 1e-16), sides[1] * 0.999, sides[2] * 0.9999999, 2], 0);
  return xyzm;
}

describe('meshSpread / meshInterpolate (order-p B-spline assignment)', () => {
  const sides: [number, number, number] = [1, 1.3, 0.7];
  const n: [number, number, number] = [10, 12, 9];
  const geoOf = (p: number): MeshGeometry => ({ n, inv: [n[0] / sides[0], n[1] / sides[1], n[2] / sides[2]], p });

  it('the unrolled kernels equal the plain-loop kernels for p = 2 … 8 (to rounding)', () => {
    const xyzm = particles(200, 3, sides);
    for (let p = 2; p <= 8; p++) {
      const geo = geoOf(p);
      const a = new Float64Array(n[0] * n[1] * n[2]), b = new Float64Array(a.length);
      meshSpread(geo, xyzm, 0, 200, a);
      meshSpreadLoops(geo, xyzm, 0, 200, b);
      for (let k = 0; k < a.length; k++) expect(Math.abs(a[k] - b[k])).toBeLessThan(1e-13);
      const acc1 = new Float64Array(600), acc2 = new Float64Array(600), p1 = new Float64Array(200), p2 = new Float64Array(200);
      meshInterpolate(geo, xyzm, 0, 200, a, acc1, p1);
      meshInterpolateLoops(geo, xyzm, 0, 200, a, acc2, p2);
      for (let k = 0; k < 600; k++) expect(Math.abs(acc1[k] - acc2[k])).toBeLessThan(1e-10);
      for (let k = 0; k < 200; k++) expect(Math.abs(p1[k] - p2[k])).toBeLessThan(1e-12);
    }
  });

  it('conserves mass: the mesh sums to Σm (partition of unity), chunks add up to the whole', () => {
    const xyzm = particles(500, 4, sides);
    let total = 0;
    for (let i = 0; i < 500; i++) total += xyzm[4 * i + 3];
    for (const p of [2, 4, 5, 7, 9]) {
      const whole = new Float64Array(n[0] * n[1] * n[2]), parts = new Float64Array(whole.length);
      meshSpread(geoOf(p), xyzm, 0, 500, whole);
      meshSpread(geoOf(p), xyzm, 0, 173, parts);
      meshSpread(geoOf(p), xyzm, 173, 500, parts);
      expect(Math.abs(whole.reduce((s, x) => s + x, 0) - total)).toBeLessThan(1e-12 * total);
      for (let k = 0; k < whole.length; k++) expect(Math.abs(whole[k] - parts[k])).toBeLessThan(1e-13);
    }
  });

  it('puts weight M_p(u_x − g_x)·M_p(u_y − g_y)·M_p(u_z − g_z)·m on every grid point (periodic), as defined', () => {
    const p = 5;
    const geo = geoOf(p);
    const xyzm = new Float64Array([0.97, 0.05, 0.33, 1.5]);
    const grid = new Float64Array(n[0] * n[1] * n[2]);
    meshSpread(geo, xyzm, 0, 1, grid);
    const u = [0, 1, 2].map((d) => xyzm[d] * geo.inv[d]);
    for (let a = 0; a < n[0]; a++) for (let b = 0; b < n[1]; b++) for (let c = 0; c < n[2]; c++) {
      const w = [a, b, c].map((g, d) => {
        let s = 0;
        for (const shift of [-n[d], 0, n[d]]) s += bsplineValue(p, u[d] - g - shift);
        return s;
      });
      expect(Math.abs(grid[(a * n[1] + b) * n[2] + c] - 1.5 * w[0] * w[1] * w[2])).toBeLessThan(1e-15);
    }
  });

  it('interpolating a mesh that is linear in the x index returns x·n/L − p/2 and gradient n/L (linear reproduction)', () => {
    for (const p of [4, 6, 7]) {
      const geo = geoOf(p);
      const grid = new Float64Array(n[0] * n[1] * n[2]);
      // Φ(g) = g_x, only valid away from the periodic seam: keep particles where the p points do not wrap.
      for (let a = 0; a < n[0]; a++) for (let b = 0; b < n[1] * n[2]; b++) grid[a * n[1] * n[2] + b] = a;
      const xyzm = new Float64Array([0.8, 0.4, 0.3, 1, 0.75, 1.1, 0.05, 1]);
      const acc = new Float64Array(6), phi = new Float64Array(2);
      meshInterpolate(geo, xyzm, 0, 2, grid, acc, phi);
      for (let i = 0; i < 2; i++) {
        expect(Math.abs(phi[i] - (xyzm[4 * i] * geo.inv[0] - p / 2))).toBeLessThan(1e-12);
        expect(Math.abs(acc[3 * i] - geo.inv[0])).toBeLessThan(1e-11);
        expect(Math.abs(acc[3 * i + 1])).toBeLessThan(1e-11);
        expect(Math.abs(acc[3 * i + 2])).toBeLessThan(1e-11);
      }
    }
  });
});
