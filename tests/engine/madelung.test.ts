/**
 * Lattice sums through the engine's Ewald code with signed weights (masses may be negative).
 * Sign convention: with G = 1 the engine returns φ_i = −[Σ_j q_j ψ(r_ij) + q_i ξ], the NEGATIVE of the
 * electrostatic site potential V_i = Σ_j q_j ψ(r_ij) + q_i ξ (Gaussian units, unit charges). The Madelung
 * constant M is defined by V_i = −M q_i / r0 (r0: nearest-neighbour distance, so that a cation sits in a
 * negative potential), hence M = −q_i V_i r0 = q_i φ_i r0. For a neutral cell the −π/(α²V) constants of ψ
 * cancel and the Ewald ("tin-foil") value is the bulk Madelung constant.
 */
import { expect, it } from 'vitest';
import { boxMake, ewaldForces } from '../../engine/index';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { type Crystal, crystalCaesiumChloride, crystalRockSalt, crystalZincBlende } from '../helpers/snapshots';
import { relativeDifference } from '../helpers/tolerance';
import { bruteEwald } from '../reference/bruteEwald';

// NaCl: OEIS A085469 (−1.74756459463318219063621203554439740348…; Bailey, Borwein, Kapoor & Weisstein 2006,
// Amer. Math. Monthly 113, 481). CRC Handbook "Madelung constants" table: 1.74756.
const M_NACL = 1.7475645946331821906;
// CsCl (r0 = √3 a/2): OEIS A181152 (1.76267477307098839793567332063864…; Sakamoto 1958, J. Chem. Phys. 28,
// 164; Zucker 1975, J. Phys. A 8, 1734). CRC: 1.76267.
const M_CSCL = 1.7626747730709883979;
// Zinc blende (r0 = √3 a/4): digit string 1.6380550533… recalled from memory, not looked up (it is a
// truncation: the next digit is 8). CRC: 1.63806. The plain reference sum (tests/reference/bruteEwald.ts),
// which reproduces NaCl and CsCl above to 1e-14, supplies the digits beyond.
const M_ZNS_TRUNCATED = 1.6380550533;
// Simple cubic lattice in a uniform neutralising background: ξ = −2.83729747948061947666591710…/L
// (Nijboer & De Wette 1957, Physica 23, 309; digits: OEIS A185576, "Born's basic potential Π0", Sakamoto 1958).
const XI_SC = 2.8372974794806194767;

const TOL = 1e-12;

function madelungPerIon(c: Crystal, tol = TOL): number[] {
  const r = ewaldForces(c.positions, c.masses, c.box, null, { G: 1, tol });
  return Array.from(r.phi, (phi, i) => c.masses[i] * phi * c.r0);
}

describeKernelPaths('Madelung constants from the Ewald lattice sum with signed masses (tol 1e-12)', () => {
  it('rock salt: every ion of the 8-ion cubic cell gives M = 1.747564594633… (1e-12 relative), CRC 1.74756', () => {
    for (const offset of [[0, 0, 0], [0.1234, 0.2345, 0.3456]] as [number, number, number][]) {
      const m = madelungPerIon(crystalRockSalt(1, 1, offset));
      expect(m).toHaveLength(8);
      for (const v of m) {
        expect(relativeDifference(v, M_NACL)).toBeLessThan(TOL);
        expect(Math.abs(v - 1.74756)).toBeLessThan(5e-6);
      }
    }
  });

  it('caesium chloride: every ion of a 2×2×2 block (16 ions) gives M = 1.762674773070… (1e-12), CRC 1.76267', () => {
    const m = madelungPerIon(crystalCaesiumChloride(2.5, 2));
    expect(m).toHaveLength(16);
    for (const v of m) {
      expect(relativeDifference(v, M_CSCL)).toBeLessThan(TOL);
      expect(Math.abs(v - 1.76267)).toBeLessThan(5e-6);
    }
  });

  it('zinc blende: every ion of the 8-ion cubic cell gives M = 1.6380550533… (10 figures), CRC 1.63806', () => {
    const c = crystalZincBlende(0.8);
    const m = madelungPerIon(c);
    const brute = bruteEwald(c.positions, c.masses, c.box, 1);
    for (let i = 0; i < m.length; i++) {
      expect(m[i] - M_ZNS_TRUNCATED).toBeGreaterThanOrEqual(0);
      expect(m[i] - M_ZNS_TRUNCATED).toBeLessThan(1e-10);
      expect(Math.abs(m[i] - 1.63806)).toBeLessThan(5e-6);
      // and the independent plain sum (tests/reference/bruteEwald.ts) agrees beyond the quoted figures
      expect(relativeDifference(m[i], c.masses[i] * brute.phi[i] * c.r0)).toBeLessThan(TOL);
    }
  });

  it('the site potential has the physical sign: a cation sits at φ > 0 (V < 0), an anion at φ < 0', () => {
    const c = crystalRockSalt();
    const r = ewaldForces(c.positions, c.masses, c.box, null, { tol: 1e-8 });
    for (let i = 0; i < 8; i++) expect(Math.sign(r.phi[i])).toBe(Math.sign(c.masses[i]));
  });

  it('forces on the ions of a perfect crystal vanish (every site is a centre of symmetry)', () => {
    for (const c of [crystalRockSalt(), crystalCaesiumChloride(1, 2), crystalZincBlende()]) {
      const r = ewaldForces(c.positions, c.masses, c.box, null, { tol: TOL });
      // scale: the force of one nearest neighbour, 1/r0²
      for (const a of r.acc) expect(Math.abs(a) * c.r0 * c.r0).toBeLessThan(1e-12);
    }
  });
});

describeKernelPaths('simple cubic lattice with a uniform neutralising background', () => {
  it('one particle in a cube of side 1 has φ = −G m ξ = +2.8372974794806 G m / L (Nijboer & De Wette 1957)', () => {
    const G = 4.30091e-6, m = 3.3;
    const r = ewaldForces(new Float64Array([0.31, 0.72, 0.05]), new Float64Array([m]), boxMake(1), null, { G, tol: TOL });
    expect(relativeDifference(r.phi[0], (G * m * XI_SC) / 1)).toBeLessThan(TOL);
  });

  it('scales as 1/L: the same particle in a cube of side 2.7 has φ = 2.8372974794806 G m / 2.7', () => {
    const G = 4.30091e-6, m = 3.3, L = 2.7;
    const r = ewaldForces(new Float64Array([0.31 * L, 0.72 * L, 0.05 * L]), new Float64Array([m]), boxMake(L), null, { G, tol: TOL });
    expect(relativeDifference(r.phi[0], (G * m * XI_SC) / L)).toBeLessThan(TOL);
  });

  it('two particles stacked in an L×L×2L box (and a 2L×L×L box) reproduce the single-cell potential and zero force', () => {
    const G = 4.30091e-6, m = 3.3, L = 2.7;
    const cases: [number[], [number, number, number]][] = [
      [[0.3, 1.1, 0.2, 0.3, 1.1, 0.2 + L], [L, L, 2 * L]],
      [[0.3, 1.1, 0.2, 0.3 + L, 1.1, 0.2], [2 * L, L, L]],
    ];
    for (const [p, sides] of cases) {
      const r = ewaldForces(new Float64Array(p), new Float64Array([m, m]), boxMake(...sides), null, { G, tol: TOL });
      for (const phi of r.phi) expect(relativeDifference(phi, (G * m * XI_SC) / L)).toBeLessThan(TOL);
      for (const a of r.acc) expect(Math.abs(a)).toBeLessThan(1e-12 * ((G * m) / (L * L)));
    }
  });
});
