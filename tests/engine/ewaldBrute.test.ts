import { describe, expect, it } from 'vitest';
import { boxMake, ewaldForces, targetsResolve } from '../../engine/index';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { crystalCaesiumChloride, crystalRockSalt, snapshotClustered } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError, pickRows, relativeDifference } from '../helpers/tolerance';
import { bruteEwald } from '../reference/bruteEwald';

// Physical units: G in kpc (km/s)² / M☉ (PHYSICS.md, "Units"; ≈ 4.3009e−6 from CODATA 2018 G and IAU 2015
// GM☉ — any G ≠ 1 exercises the scaling), box in kpc, masses in M☉.
const G_KPC = 4.30091e-6;

describe('bruteEwald (the independent reference) reproduces published lattice sums', () => {
  it('rock salt M = 1.747564594633… and CsCl M = 1.762674773070… to 1e-14 (OEIS A085469, A181152)', () => {
    const nacl = crystalRockSalt(1.7);
    const b1 = bruteEwald(nacl.positions, nacl.masses, nacl.box, 1);
    for (let i = 0; i < 8; i++) expect(relativeDifference(nacl.masses[i] * b1.phi[i] * nacl.r0, 1.7475645946331821906)).toBeLessThan(1e-14);
    const cscl = crystalCaesiumChloride(0.9);
    const b2 = bruteEwald(cscl.positions, cscl.masses, cscl.box, 1);
    for (let i = 0; i < 2; i++) expect(relativeDifference(cscl.masses[i] * b2.phi[i] * cscl.r0, 1.7626747730709883979)).toBeLessThan(1e-14);
  });

  it('one particle in a 1.3×1.3×2.6 box of two stacked cells gives ξ = −2.8372974794806/L (Nijboer & De Wette 1957)', () => {
    const L = 1.3;
    const b = bruteEwald(new Float64Array([0.2, 0.9, 0.4, 0.2, 0.9, 0.4 + L]), new Float64Array([1, 1]), boxMake(L, L, 2 * L), 1);
    for (const phi of b.phi) expect(relativeDifference(phi, 2.8372974794806194767 / L)).toBeLessThan(1e-14);
  });

  it('does not depend on its splitting parameter α (default, ×1.3 and ×1.7 agree to 1e-13)', () => {
    // (smaller α would leave real-space images beyond its fixed |n_d| ≤ 1 range: by construction α ≥ 6.5/R)
    const s = snapshotClustered(60, 5, [30, 45, 25], 1e11);
    const b = bruteEwald(s.positions, s.masses, s.box, G_KPC);
    for (const f of [1.3, 1.7]) {
      const c = bruteEwald(s.positions, s.masses, s.box, G_KPC, undefined, b.alpha * f);
      expect(maxVectorRelativeError(c.acc, b.acc)).toBeLessThan(1e-13);
      expect(maxScalarErrorOverRms(c.phi, b.phi)).toBeLessThan(1e-13);
    }
  });
});

// Clustered (three knots and a filament), N = 300, rectangular 40×55×30 kpc box, 1e12 M☉, physical G.
const s = snapshotClustered(300, 11, [40, 55, 30], 1e12);
const brute = bruteEwald(s.positions, s.masses, s.box, G_KPC);

describeKernelPaths('ewaldForces against the independent brute-force Ewald sum', () => {
  it('at tol 1e-10, every particle\'s acceleration agrees to 1e-9 relative and every potential to 1e-9 of rms φ (all targets)', () => {
    const r = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol: 1e-10 });
    expect(maxVectorRelativeError(r.acc, brute.acc)).toBeLessThan(1e-9);
    expect(maxScalarErrorOverRms(r.phi, brute.phi)).toBeLessThan(1e-9);
  });

  it('at tol 1e-10, a sampled subset of 120 targets agrees to 1e-9 the same way (per-target code path)', () => {
    const targets = targetsResolve({ kind: 'sample', count: 120, seed: 17 }, 300);
    const r = ewaldForces(s.positions, s.masses, s.box, targets, { G: G_KPC, tol: 1e-10 });
    expect(Array.from(r.targets)).toEqual(Array.from(targets));
    expect(maxVectorRelativeError(r.acc, pickRows(brute.acc, targets, 3))).toBeLessThan(1e-9);
    expect(maxScalarErrorOverRms(r.phi, pickRows(brute.phi, targets, 1))).toBeLessThan(1e-9);
  });

  it('at tol 1e-13 (near round-off), accelerations agree to 1e-11 relative: no systematic term is missing', () => {
    const r = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol: 1e-13 });
    expect(maxVectorRelativeError(r.acc, brute.acc)).toBeLessThan(1e-11);
    expect(maxScalarErrorOverRms(r.phi, brute.phi)).toBeLessThan(1e-12);
  });
});
