/**
 * Two-body checks against independent physics.
 * Near a source the periodic kernel of a cube of side L is (tests/reference/cubicLatticeSums.ts)
 *   ψ(x) = 1/r + ξ + (2π/3)(r²/L³) + Σ_{l=4,6,…} (r/L)^l S_l(r̂)/L:
 * ψ − 1/r is regular with ∇²(ψ − 1/r) = 4π/V (Poisson's equation with the neutralising background,
 * ∇²ψ = −4π[δ − 1/V]); cubic symmetry makes its quadratic part isotropic; the higher terms are the image
 * multipoles. For a pair at separation r⃗ = r₁ − r₂ (source m₂), a₁ = G m₂ ∇ψ(r⃗), so the pull toward the
 * source relative to Newton's G m₂/r² falls short by dev = (4π/3)(r/L)³ + Σ_l l S_l (r/L)^{l+1}, and the
 * potential is φ₁ = −G m₂ ψ(r⃗) − G m₁ ξ.
 */
import { expect, it } from 'vitest';
import { boxMake, ewaldForces, type EwaldOptions } from '../../engine/index';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { cubicLatticeMultipoleSum } from '../reference/cubicLatticeSums';
import { splineForceFactor, splinePotential } from '../reference/softKernels';

const XI_SC = 2.8372974794806194767; // −ξ L, simple cubic with background (Nijboer & De Wette 1957; OEIS A185576)
const G = 4.30091e-6;
// Image multipole sums along the pair direction used throughout (0.48, 0.6, 0.64), a unit vector; the
// stored positions tilt it by ~1e-13, which changes S_l far below what the tests resolve.
const DIRECTION = [0.48, 0.6, 0.64];
const S4 = cubicLatticeMultipoleSum(4, DIRECTION, 64);
const S6 = cubicLatticeMultipoleSum(6, DIRECTION, 32);

interface Pair {
  positions: Float64Array;
  masses: Float64Array;
  /** r₁ − r₂ as stored (after rounding of the inputs), its length and unit vector. */
  sep: number[];
  r: number;
  unit: number[];
}

/** Particle 1 at c, particle 2 at c + d·L·(0.48, 0.6, 0.64); the separation is read back from the doubles. */
function pairMake(L: number, d: number): Pair {
  const c = [0.31 * L, 0.42 * L, 0.53 * L], dir = DIRECTION;
  const positions = new Float64Array([c[0], c[1], c[2], c[0] + d * L * dir[0], c[1] + d * L * dir[1], c[2] + d * L * dir[2]]);
  const sep = [0, 1, 2].map((k) => positions[k] - positions[3 + k]);
  const r = Math.hypot(...sep);
  return { positions, masses: new Float64Array([1.3, 0.7]), sep, r, unit: sep.map((v) => v / r) };
}

/** Component of particle 1's acceleration toward particle 2, divided by Newton's G m₂/r². */
function towardOverNewton(p: Pair, acc: Float64Array): { along: number; across: number } {
  const aN = (G * p.masses[1]) / (p.r * p.r);
  const along = -(acc[0] * p.unit[0] + acc[1] * p.unit[1] + acc[2] * p.unit[2]);
  const across = Math.hypot(...[0, 1, 2].map((k) => acc[k] + along * p.unit[k]));
  return { along: along / aN, across: across / aN };
}

describeKernelPaths('a close pair in a periodic cube tends to Newton', () => {
  for (const L of [1, 2.7]) {
    it(`at separation 1e-4 L (L = ${L}) the force is Newton's G m/r² to 1e-11 and differs by the tidal term (4π/3)(r/L)³ to 1e-15`, () => {
      const p = pairMake(L, 1e-4);
      const res = ewaldForces(p.positions, p.masses, boxMake(L), null, { G, tol: 1e-13 });
      const { along, across } = towardOverNewton(p, res.acc);
      expect(Math.abs(1 - along)).toBeLessThan(1e-11);
      expect(Math.abs(1 - along - ((4 * Math.PI) / 3) * (p.r / L) ** 3)).toBeLessThan(1e-15);
      expect(across).toBeLessThan(1e-15);
      // equal and opposite
      for (let k = 0; k < 3; k++) expect(Math.abs(p.masses[0] * res.acc[k] + p.masses[1] * res.acc[3 + k])).toBeLessThan(1e-15 * p.masses[0] * along * G * p.masses[1] / p.r ** 2);
    });
  }

  it('at r/L = 1e-3 and 1e-2 the shortfall equals (4π/3)(r/L)³ + 4 S₄ (r/L)⁵ + 6 S₆ (r/L)⁷ (image multipoles by direct lattice sum) to 1e-15', () => {
    const L = 1.9;
    for (const d of [1e-3, 1e-2]) {
      const p = pairMake(L, d);
      const res = ewaldForces(p.positions, p.masses, boxMake(L), null, { G, tol: 1e-13 });
      const q = p.r / L;
      const expected = ((4 * Math.PI) / 3) * q ** 3 + 4 * S4 * q ** 5 + 6 * S6 * q ** 7; // next term ~ 13 q⁹
      expect(Math.abs(1 - towardOverNewton(p, res.acc).along - expected)).toBeLessThan(1e-15);
    }
  });

  it('the potential of a close pair is −G m₂ ψ(r⃗) − G m₁ ξ with ξ = −2.8373/L and the image multipoles, to 1e-12 G/L (r/L = 1e-3, 1e-2)', () => {
    for (const L of [1, 2.7]) {
      for (const d of [1e-3, 1e-2]) {
        const p = pairMake(L, d);
        const res = ewaldForces(p.positions, p.masses, boxMake(L), null, { G, tol: 1e-13 });
        const q = p.r / L;
        const psi = 1 / p.r - XI_SC / L + ((2 * Math.PI) / 3) * (p.r * p.r) / L ** 3 + (q ** 4 * S4 + q ** 6 * S6) / L;
        const expected = -G * p.masses[1] * psi + (G * p.masses[0] * XI_SC) / L;
        // |φ| ≈ G m₂/r ≤ 700 G/L: a few ulp of it is ~1e-13 G/L
        expect(Math.abs(res.phi[0] - expected)).toBeLessThan((1e-12 * G) / L);
      }
    }
  });
});

describeKernelPaths('softened pair forces in the periodic box', () => {
  // Same α, r_c, k_c for the softened and the Newtonian run, so their difference is the softening alone.
  const L = 1, box = boxMake(L);
  const fixed: EwaldOptions = { G, alpha: 7, rCut: 0.85, kCut: 2 * 7 * 6 };

  it('Ewald(spline) − Ewald(Newton) equals the kernel correction −G m₂ [M(<r)/r³ − 1/r³] r⃗ inside h and 0 outside (M&L density by quadrature)', () => {
    const h = 0.05;
    for (const d of [0.002, 0.01, 0.02, 0.03, 0.045, 0.049, 0.0501, 0.06, 0.2]) {
      const p = pairMake(L, d);
      const newton = ewaldForces(p.positions, p.masses, box, null, fixed);
      const soft = ewaldForces(p.positions, p.masses, box, null, { ...fixed, softening: { kind: 'spline', h } });
      const inside = p.r < h;
      const fCorr = inside ? splineForceFactor(p.r, h) - 1 / p.r ** 3 : 0;
      const psiCorr = inside ? splinePotential(p.r, h) - 1 / p.r : 0;
      const aN = (G * p.masses[1]) / p.r ** 2;
      for (let k = 0; k < 3; k++) {
        const expected = -G * p.masses[1] * fCorr * p.sep[k];
        expect(Math.abs(soft.acc[k] - newton.acc[k] - expected)).toBeLessThan(1e-12 * aN);
        expect(Math.abs(soft.acc[3 + k] - newton.acc[3 + k] - (-G * p.masses[0] * fCorr * -p.sep[k]))).toBeLessThan(1e-12 * aN);
      }
      expect(Math.abs(soft.phi[0] - newton.phi[0] - -G * p.masses[1] * psiCorr)).toBeLessThan(1e-12 * ((G * p.masses[1]) / p.r));
      if (!inside) {
        expect(Array.from(soft.acc)).toEqual(Array.from(newton.acc));
      }
    }
  });

  it('Ewald(Plummer) − Ewald(Newton) is the closed-form Plummer correction G m₂ [r^{-3} − (r²+ε²)^{-3/2}] r⃗ for the minimum image inside L_min/2, and 0 beyond', () => {
    // Convention of engine/ewald/params.ts (PHYSICS.md leaves the radius to the engine): the Plummer
    // correction is applied to every pair image closer than half the shortest side; the tail is reported.
    const eps = 0.01;
    for (const d of [0.003, 0.02, 0.1, 0.4, 0.52]) {
      const p = pairMake(L, d);
      const newton = ewaldForces(p.positions, p.masses, box, null, { ...fixed, tol: 1e-10 });
      const soft = ewaldForces(p.positions, p.masses, box, null, { ...fixed, tol: 1e-10, softening: { kind: 'plummer', eps } });
      expect(soft.params.rSoft).toBe(L / 2);
      const inside = p.r < L / 2;
      const f = inside ? (p.r ** 2 + eps ** 2) ** -1.5 - p.r ** -3 : 0;
      const psi = inside ? (p.r ** 2 + eps ** 2) ** -0.5 - 1 / p.r : 0;
      const aN = (G * p.masses[1]) / p.r ** 2;
      for (let k = 0; k < 3; k++) expect(Math.abs(soft.acc[k] - newton.acc[k] - -G * p.masses[1] * f * p.sep[k])).toBeLessThan(1e-12 * aN);
      expect(Math.abs(soft.phi[0] - newton.phi[0] - -G * p.masses[1] * psi)).toBeLessThan(1e-12 * ((G * p.masses[1]) / p.r));
      // the image sum the convention leaves out is what params.softeningTailError reports (nonzero)
      expect(soft.params.softeningTailError).toBeGreaterThan(0);
    }
  });
});
