import { describe, expect, it } from 'vitest';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { imageSumOrder } from '../../../engine/orders/index';
import { slabSetup, slabTargets } from '../../../engine/orders/slab';
import { configCorner, configNoDipole, maxErrorOverRms, partialRow } from './fixtures';

// Slab order (layers |n_axis| ≤ R, each summed over its plane) tends to a(Ewald) + (4πG/V) D_axis ê_axis
// (de Leeuw, Perram & Smith 1980; Smith 1981: depolarisation tensor 4π ê ê of a slab); without background
// to a(Ewald) − 4πGρ̄ (r_i − x_com)_axis ê_axis (PHYSICS.md).

const G = 4.30091e-6;
const SIDES: [number, number, number] = [1, 1.3, 0.8];
const V = SIDES[0] * SIDES[1] * SIDES[2];
const AXES = ['slab-x', 'slab-y', 'slab-z'] as const;

describe('imageSumOrder slab-x, slab-y, slab-z', () => {
  const c = configCorner(14, 31, SIDES, 0.55);
  const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
  const M = c.masses.reduce((a, b) => a + b, 0);

  AXES.forEach((order, axis) => {
    it(`${order} with background converges (exponentially in R) to Ewald + (4πG/V)·D_axis along the axis`, () => {
      const r = imageSumOrder(c.positions, c.masses, c.box, null, { order, shells: 12, G, tol: 1e-12 });
      const limit = ew.map((a, k) => a + (k % 3 === axis ? (4 * Math.PI * G * r.dipole[axis]) / V : 0));
      expect(maxErrorOverRms(r.limit!, limit)).toBeLessThan(1e-12);
      expect(maxErrorOverRms(r.acc, limit)).toBeLessThan(1e-9);
      // layer by layer the error shrinks at least 5× per layer until it reaches round-off
      const e = Array.from({ length: 4 }, (_, R) => maxErrorOverRms(partialRow(r.partial.acc, R, 14), limit));
      for (let R = 1; R < 4; R++) expect(e[R]).toBeLessThan(Math.max(e[R - 1] / 5, 1e-9));
      expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1);
    });

    it(`${order} without background converges to Ewald − 4πGρ̄(r_i − x_com) along the axis`, () => {
      const r = imageSumOrder(c.positions, c.masses, c.box, null, { order, shells: 12, background: false, G, tol: 1e-12 });
      const com = c.masses.reduce((s, m, j) => s + m * c.positions[3 * j + axis], 0) / M;
      const limit = ew.map((a, k) => a - (k % 3 === axis ? (4 * Math.PI * G * M * (c.positions[k] - com)) / V : 0));
      expect(maxErrorOverRms(r.acc, limit)).toBeLessThan(1e-9);
      expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1);
    });
  });

  it('for a configuration without dipole, every slab order gives the Ewald force', () => {
    const z = configNoDipole(6, 32, SIDES);
    const ewz = ewaldForces(z.positions, z.masses, z.box, null, { G, tol: 1e-13 }).acc;
    for (const order of AXES) {
      const r = imageSumOrder(z.positions, z.masses, z.box, null, { order, shells: 12, G, tol: 1e-12 });
      expect(maxErrorOverRms(r.acc, ewz)).toBeLessThan(1e-9);
    }
  });

  it('does not depend on the 2D Ewald splitting (real-space cutoff 1.5, 2 or 3 in-plane sides: 1e-11 of rms)', () => {
    const targets = Int32Array.from([0, 5, 13]);
    const rows = [1.5, 2, 3].map((f) => {
      const st = slabSetup(c.positions, c.masses, c.box, 2, 3, true, G, 1e-13, f);
      const out = new Float64Array(4 * 3 * 3);
      slabTargets(st, targets, 0, 3, out);
      return out;
    });
    for (let R = 0; R <= 3; R++) {
      expect(maxErrorOverRms(partialRow(rows[1], R, 3), partialRow(rows[0], R, 3))).toBeLessThan(1e-11);
      expect(maxErrorOverRms(partialRow(rows[2], R, 3), partialRow(rows[0], R, 3))).toBeLessThan(1e-11);
    }
  });
});
