import { expect, it } from 'vitest';
import { ewaldForces, type EwaldOptions } from '../../engine/index';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { type Snapshot, snapshotClustered, snapshotStackedZ, snapshotTranslated, snapshotUniform } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError, vectorRelativeErrors } from '../helpers/tolerance';

const G_KPC = 4.30091e-6; // kpc (km/s)² / M☉ (PHYSICS.md, "Units")

/** α, r_c, k_c fixed by hand (tol-independent), so that two runs sum exactly the same terms. */
const FIXED: EwaldOptions = { alpha: 2.2, rCut: 2.4, kCut: 2 * 2.2 * 5.6 };

describeKernelPaths('ewaldForces does not depend on the splitting parameter α', () => {
  it('α = 2, 8 and 25 (×12 apart; r_c and k_c chosen for tol 1e-13) agree to 1e-12 relative in every acceleration and 1e-12 of rms φ (1 × 1.4 × 0.7 box)', () => {
    const s = snapshotUniform(200, 31, [1, 1.4, 0.7], 1, 0.5);
    const runs = [2, 8, 25].map((alpha) => ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-13, alpha }));
    expect(runs.map((r) => r.params.alpha)).toEqual([2, 8, 25]);
    for (let a = 0; a < 3; a++) {
      for (let b = a + 1; b < 3; b++) {
        expect(maxVectorRelativeError(runs[a].acc, runs[b].acc)).toBeLessThan(1e-12);
        expect(maxScalarErrorOverRms(runs[a].phi, runs[b].phi)).toBeLessThan(1e-12);
      }
    }
  });
});

describeKernelPaths('ewaldForces conserves momentum', () => {
  for (const [name, s] of [
    ['uniform', snapshotUniform(500, 3, [2, 3, 1.5], 7, 0.8)],
    ['clustered', snapshotClustered(500, 4, [2, 3, 1.5], 7)],
  ] as [string, Snapshot][]) {
    // The pairwise sum is antisymmetric term by term, so it conserves momentum to round-off; the
    // weak-field refinement (ewaldRefineWeak) replaces a few particles by more accurate values and may
    // move Σ m a by at most the error it removes, i.e. below tol·Σ m|a|.
    const momentum = (r: ReturnType<typeof ewaldForces>) => {
      const p = [0, 0, 0];
      let scale = 0;
      for (let t = 0; t < 500; t++) {
        const m = s.masses[r.targets[t]];
        for (let d = 0; d < 3; d++) p[d] += m * r.acc[3 * t + d];
        scale += m * Math.hypot(r.acc[3 * t], r.acc[3 * t + 1], r.acc[3 * t + 2]);
      }
      return Math.hypot(...p) / scale;
    };
    it(`Σ m_i a_i = 0 to 1e-14 of Σ m_i |a_i| for the pairwise sum, ${name}, all-particle and per-target code paths`, () => {
      const reversed = Int32Array.from({ length: 500 }, (_, i) => 499 - i);
      for (const targets of [null, reversed]) {
        const r = ewaldForces(s.positions, s.masses, s.box, targets, { tol: 1e-8 }, undefined, false);
        expect(momentum(r)).toBeLessThan(1e-14);
      }
    });
    it(`with the weak-field refinement Σ m_i a_i stays below tol·Σ m_i |a_i|, ${name}`, () => {
      const r = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-8 });
      expect(momentum(r)).toBeLessThan(1e-8);
    });
  }
});

describeKernelPaths('ewaldForces is invariant under translations', () => {
  const s = snapshotClustered(400, 4, [2, 3, 1.5], 7);

  it('a shift by a lattice vector (2Lx, −2Ly, 2Lz) changes nothing beyond the round-off of re-wrapping', () => {
    const base = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol: 1e-10 });
    const shifted = snapshotTranslated(s, [4, -6, 3]);
    const r = ewaldForces(shifted.positions, shifted.masses, shifted.box, null, { G: G_KPC, tol: 1e-10 });
    expect(r.wrapped).toBe(400);
    // wrapping moves a coordinate by ≤ 1 ulp(L) ≈ 4e-16; over separations ≳ 1e-4 that is ≲ 1e-11 relative
    expect(maxVectorRelativeError(r.acc, base.acc)).toBeLessThan(1e-11);
    expect(maxScalarErrorOverRms(r.phi, base.phi)).toBeLessThan(1e-12);
  });

  it('a shift by an arbitrary vector leaves forces and potentials unchanged: to round-off with fixed α, r_c, k_c', () => {
    const base = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, ...FIXED });
    for (const shift of [[0.3141, -0.2718, 1.1], [-7.7, 0.01, 0.5]] as [number, number, number][]) {
      const moved = snapshotTranslated(s, shift);
      const r = ewaldForces(moved.positions, moved.masses, moved.box, null, { G: G_KPC, ...FIXED });
      expect(maxVectorRelativeError(r.acc, base.acc)).toBeLessThan(1e-11);
      expect(maxScalarErrorOverRms(r.phi, base.phi)).toBeLessThan(1e-12);
    }
  });

  it('a shift by an arbitrary vector leaves forces unchanged within 2·tol with automatic parameters (tol 1e-10)', () => {
    const tol = 1e-10;
    const base = ewaldForces(s.positions, s.masses, s.box, null, { G: G_KPC, tol });
    const moved = snapshotTranslated(s, [0.3141, -0.2718, 1.1]);
    const r = ewaldForces(moved.positions, moved.masses, moved.box, null, { G: G_KPC, tol });
    expect(maxVectorRelativeError(r.acc, base.acc)).toBeLessThan(2 * tol);
    expect(maxScalarErrorOverRms(r.phi, base.phi)).toBeLessThan(2 * tol);
  });
});

describeKernelPaths('ewaldForces on a box of two stacked copies', () => {
  const cube = snapshotClustered(300, 9, [1.3, 1.3, 1.3], 2);
  const stacked = snapshotStackedZ(cube);

  it('an L×L×2L box holding two stacked copies of a cubic configuration gives the cubic forces and potentials (fixed α, r_c, k_c: round-off)', () => {
    const a = ewaldForces(cube.positions, cube.masses, cube.box, null, FIXED);
    const b = ewaldForces(stacked.positions, stacked.masses, stacked.box, null, FIXED);
    for (const half of [0, 1]) {
      expect(maxVectorRelativeError(b.acc.subarray(900 * half, 900 * (half + 1)), a.acc)).toBeLessThan(1e-11);
      expect(maxScalarErrorOverRms(b.phi.subarray(300 * half, 300 * (half + 1)), a.phi)).toBeLessThan(1e-12);
    }
  });

  it('the same holds within 2·tol with automatic parameters chosen separately for each box (tol 1e-12)', () => {
    const tol = 1e-12;
    const a = ewaldForces(cube.positions, cube.masses, cube.box, null, { tol });
    const b = ewaldForces(stacked.positions, stacked.masses, stacked.box, null, { tol });
    for (const half of [0, 1]) {
      expect(maxVectorRelativeError(b.acc.subarray(900 * half, 900 * (half + 1)), a.acc)).toBeLessThan(2 * tol);
      expect(maxScalarErrorOverRms(b.phi.subarray(300 * half, 300 * (half + 1)), a.phi)).toBeLessThan(2 * tol);
    }
  });
});

describeKernelPaths('ewaldForces code paths and bookkeeping', () => {
  const s = snapshotUniform(300, 12, [1.2, 0.9, 1.6], 5, 1);

  it('the symmetric all-particle path and the per-target path agree to round-off for the same α, r_c, k_c', () => {
    const all = ewaldForces(s.positions, s.masses, s.box, null, FIXED);
    const perm = Int32Array.from({ length: 300 }, (_, i) => (i * 7) % 300); // 7 is coprime to 300
    const each = ewaldForces(s.positions, s.masses, s.box, perm, FIXED);
    const allPermuted = new Float64Array(900), phiPermuted = new Float64Array(300);
    perm.forEach((i, t) => {
      allPermuted.set(all.acc.subarray(3 * i, 3 * i + 3), 3 * t);
      phiPermuted[t] = all.phi[i];
    });
    expect(maxVectorRelativeError(each.acc, allPermuted)).toBeLessThan(1e-12);
    expect(maxScalarErrorOverRms(each.phi, phiPermuted)).toBeLessThan(1e-13);
  });

  it('results follow the input rows: permuting the particles permutes the accelerations and potentials', () => {
    const n = 300;
    const order = Int32Array.from({ length: n }, (_, i) => (i * 11 + 5) % n);
    const pos = new Float64Array(3 * n), mas = new Float64Array(n);
    order.forEach((src, dst) => {
      pos.set(s.positions.subarray(3 * src, 3 * src + 3), 3 * dst);
      mas[dst] = s.masses[src];
    });
    const a = ewaldForces(s.positions, s.masses, s.box, null, FIXED);
    const b = ewaldForces(pos, mas, s.box, null, FIXED);
    const errs = vectorRelativeErrors(b.acc, Float64Array.from({ length: 3 * n }, (_, k) => a.acc[3 * order[Math.floor(k / 3)] + (k % 3)]));
    expect(Math.max(...errs)).toBeLessThan(1e-12);
    order.forEach((src, dst) => expect(Math.abs(b.phi[dst] - a.phi[src])).toBeLessThan(1e-12 * Math.abs(a.phi[src]) + 1e-13));
  });

  it('reports how many particles lay outside the home cell and were wrapped', () => {
    const moved = Float64Array.from(s.positions);
    moved[0] += 1.2; // x of particle 0 leaves the box
    moved[4] -= 5; // y of particle 1
    moved[7] = -moved[7]; // y of particle 2 (negative)
    moved[8] += 1.6; // z of particle 2 too: still one particle
    const r = ewaldForces(moved, s.masses, s.box, null, { tol: 1e-6 });
    expect(r.wrapped).toBe(3);
    expect(ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-6 }).wrapped).toBe(0);
  });
});
