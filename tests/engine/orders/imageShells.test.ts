import { describe, expect, it } from 'vitest';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { imageSumOrder, imageSumPartialAlloc, imageSumSetup, imageSumTargetsChunk } from '../../../engine/orders/index';
import { bruteShellPartials, configCorner, configNoDipole, maxErrorOverRms, partialRow } from './fixtures';

// Sources of the limits: de Leeuw, Perram & Smith 1980 (Proc. R. Soc. Lond. A 373, 27) and Smith 1981
// (Proc. R. Soc. Lond. A 375, 475): whole neutral cells added in spheres or cubes tend to
// a(Ewald) + (4πG/3V) D; PHYSICS.md gives the background-free form a(Ewald) − (4π/3) G ρ̄ (r_i − x_com).

const G = 4.30091e-6; // kpc (km/s)² / M☉ — any G ≠ 1 exercises the scaling
const FOUR_PI_3 = (4 * Math.PI) / 3;

function surfaceLimit(ewald: Float64Array, D: Float64Array, V: number): Float64Array {
  return ewald.map((a, k) => a + (FOUR_PI_3 * G * D[k % 3]) / V);
}

describe('imageSumOrder sphere and cube: the fast sums equal brute-force cell sums', () => {
  // Multipoles start beyond 2.5 box diagonals (shell 5 in a cube); R = 9 has several far shells.
  for (const [name, c, targets] of [
    ['random, cube box', configCorner(10, 21, [1, 1, 1]), [0, 4, 9]],
    // worst placement for the expansions: mass in one corner, a target in the opposite one
    ['mass at a corner, target at the opposite corner', (() => {
      const k = configCorner(9, 22, [1, 1, 1], 0.05);
      k.positions.set([0.999, 0.998, 0.999], 0);
      return k;
    })(), [0, 3]],
    ['random, rectangular 1 × 1.25 × 0.8 box', configCorner(10, 23, [1, 1.25, 0.8]), [1, 7]],
  ] as const) {
    for (const order of ['sphere', 'cube'] as const) {
      for (const background of [true, false]) {
        it(`${order}, ${name}, background ${background}: every partial sum R = 0…9 agrees to tol·GΣ|m|/d² (tol 1e-10)`, () => {
          const R = 9;
          const tg = Int32Array.from(targets);
          const r = imageSumOrder(c.positions, c.masses, c.box, tg, { order, shells: R, background, G, tol: 1e-10 });
          const ref = bruteShellPartials(c, order, R, [...targets], background, G);
          const M = c.masses.reduce((a, b) => a + b, 0) * (background ? 2 : 1);
          const d2 = c.box.lx ** 2 + c.box.ly ** 2 + c.box.lz ** 2;
          let worst = 0;
          for (let q = 0; q < ref.length; q++) worst = Math.max(worst, Math.abs(r.partial.acc[q] - ref[q]));
          expect(r.params.farCells).toBeGreaterThan(0);
          expect(worst).toBeLessThan((1e-10 * G * M) / d2);
        });
      }
    }
  }
});

describe('imageSumOrder sphere: converges to Ewald + (4πG/3V)·D', () => {
  for (const [name, c] of [
    ['a large dipole (16 particles in one octant)', configCorner(16, 1, [1, 1, 1], 0.5)],
    ['no dipole (mirror pairs)', configNoDipole(8, 2, [1, 1, 1])],
  ] as const) {
    it(`${name}: error shrinks ≥ 8× from R = 20 to 40 and is < 1e-6 of rms at R = 40`, () => {
      const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'sphere', shells: 40, G });
      const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
      const limit = surfaceLimit(ew, r.dipole, 1);
      expect(maxErrorOverRms(r.limit!, limit)).toBeLessThan(1e-12);
      const e20 = maxErrorOverRms(partialRow(r.partial.acc, 20, 16), limit);
      const e40 = maxErrorOverRms(r.acc, limit);
      expect(e40).toBeLessThan(e20 / 8);
      expect(e40).toBeLessThan(1e-6);
      if (name.startsWith('a large')) expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1); // the surface term is real
    });
  }

  it('in a rectangular 1 × 1.25 × 0.8 box (spheres in physical distance) it tends to the same sphere term', () => {
    const c = configCorner(16, 3, [1, 1.25, 0.8], 0.6);
    const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'sphere', shells: 40, G });
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
    const limit = surfaceLimit(ew, r.dipole, 1.25 * 0.8);
    const e10 = maxErrorOverRms(partialRow(r.partial.acc, 10, 16), limit);
    const e40 = maxErrorOverRms(r.acc, limit);
    expect(e40).toBeLessThan(e10 / 10);
    expect(e40).toBeLessThan(1e-4);
    expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1);
  });

  it('without background: Ewald − (4π/3)Gρ̄(r_i − x_com), the homologous term', () => {
    const c = configCorner(16, 5, [1, 1, 1], 0.7);
    const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'sphere', shells: 40, background: false, G });
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
    const M = c.masses.reduce((a, b) => a + b, 0);
    const com = [0, 1, 2].map((d) => c.masses.reduce((s, m, j) => s + m * c.positions[3 * j + d], 0) / M);
    const limit = ew.map((a, k) => a - FOUR_PI_3 * G * M * (c.positions[k] - com[k % 3]));
    expect(maxErrorOverRms(r.limit!, limit)).toBeLessThan(1e-12);
    expect(maxErrorOverRms(r.acc, limit)).toBeLessThan(2e-7);
    expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1);
  });
});

describe('imageSumOrder cube: converges to the same limit, like 1/R²', () => {
  it('large dipole: the error falls 4× per doubling of R, and the 1/R² tail estimate agrees to 2e-6 of rms', () => {
    const c = configCorner(16, 1, [1, 1, 1], 0.5);
    const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'cube', shells: 40, G });
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
    const limit = surfaceLimit(ew, r.dipole, 1);
    const e20 = maxErrorOverRms(partialRow(r.partial.acc, 20, 16), limit);
    const e40 = maxErrorOverRms(r.acc, limit);
    expect(e20 / e40).toBeGreaterThan(3.6);
    expect(e20 / e40).toBeLessThan(4.4);
    expect(maxErrorOverRms(r.extrapolated!, limit)).toBeLessThan(2e-6);
    expect(maxErrorOverRms(ew, limit)).toBeGreaterThan(0.1);
  });

  it('in a rectangular box the cubes max|n_i| ≤ R are prisms: the limit uses the prism tensor, not 4π/3', () => {
    const c = configCorner(16, 3, [1, 1.25, 0.8], 0.6);
    const r = imageSumOrder(c.positions, c.masses, c.box, null, { order: 'cube', shells: 32, G });
    const ew = ewaldForces(c.positions, c.masses, c.box, null, { G, tol: 1e-13 }).acc;
    expect(maxErrorOverRms(r.extrapolated!, r.limit!)).toBeLessThan(5e-6);
    // the sphere term would be clearly wrong here
    expect(maxErrorOverRms(r.extrapolated!, surfaceLimit(ew, r.dipole, 1.25 * 0.8))).toBeGreaterThan(1e-2);
  });
});

describe('imageSumSetup sphere and cube: the shells hold every cell once', () => {
  it('cube R = 30 counts (2R+1)³ cells; sphere R = 20 in a 1 × 1.25 × 0.8 box counts the lattice points |s_n| ≤ 20·1.25', () => {
    const c = configCorner(4, 12, [1, 1.25, 0.8]);
    const cube = imageSumSetup(c.positions, c.masses, c.box, { order: 'cube', shells: 30 }).params;
    expect(cube.nearCells! + cube.farCells!).toBe(61 ** 3);
    const sphere = imageSumSetup(c.positions, c.masses, c.box, { order: 'sphere', shells: 20 }).params;
    let count = 0;
    const rMax = 20 * 1.25;
    for (let i = -25; i <= 25; i++) for (let j = -20; j <= 20; j++) for (let k = -32; k <= 32; k++) {
      if (Math.hypot(i, 1.25 * j, 0.8 * k) <= rMax * (1 + 1e-12)) count++;
    }
    expect(sphere.nearCells! + sphere.farCells!).toBe(count);
  });
});

describe('imageSumTargetsChunk', () => {
  it('gives the same partial sums whether the targets are done in one chunk or three', () => {
    const c = configCorner(12, 9, [1, 1, 1]);
    const s = imageSumSetup(c.positions, c.masses, c.box, { order: 'sphere', shells: 8 });
    const tg = Int32Array.from([11, 0, 5, 6, 2]);
    const one = imageSumPartialAlloc(s, tg.length), three = imageSumPartialAlloc(s, tg.length);
    imageSumTargetsChunk(s, tg, 0, 5, one);
    imageSumTargetsChunk(s, tg, 0, 2, three);
    imageSumTargetsChunk(s, tg, 2, 3, three);
    imageSumTargetsChunk(s, tg, 3, 5, three);
    expect(Array.from(three)).toEqual(Array.from(one));
  });
});
