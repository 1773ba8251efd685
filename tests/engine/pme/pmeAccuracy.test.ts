import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { type PmeOptions, pmeForces } from '../../../engine/pme/index';
import { describeKernelPaths } from '../../helpers/kernelPaths';
import { type Snapshot, snapshotClustered, snapshotUniform } from '../../helpers/snapshots';
import { vectorRelativeErrors } from '../../helpers/tolerance';

// Physical units for one of the boxes: G in kpc (km/s)² / M☉ (≈ 4.3009e−6 from CODATA 2018 G and IAU 2015
// GM☉, PHYSICS.md "Units"; any G ≠ 1 exercises the scaling).
const G_KPC = 4.30091e-6;

function rms(a: Float64Array): number {
  let s = 0;
  for (const x of a) s += x * x;
  return Math.sqrt(s / a.length);
}

interface Case {
  readonly label: string;
  readonly snap: Snapshot;
  readonly G: number;
}

const cases: Case[] = [
  { label: 'uniform, cubic box', snap: snapshotUniform(2500, 31, [1, 1, 1], 1, 0.5), G: 1 },
  { label: 'uniform, rectangular 40×55×30 kpc box', snap: snapshotUniform(2500, 32, [40, 55, 30], 1e12, 0.5), G: G_KPC },
  { label: 'clustered, cubic box', snap: snapshotClustered(2500, 33, [1, 1, 1]), G: 1 },
  { label: 'clustered, rectangular 1×1.3×0.8 box', snap: snapshotClustered(2500, 34, [1, 1.3, 0.8], 5), G: 1 },
];

describe('pmeForces against direct Ewald (ewaldForces at tol 1e-11): rms relative acceleration error', () => {
  for (const c of cases) {
    const ref = ewaldForces(c.snap.positions, c.snap.masses, c.snap.box, null, { G: c.G, tol: 1e-11 });
    for (const tol of [1e-3, 1e-4, 1e-6]) {
      it(`${c.label}, tol ${tol}: measured rms below tol, and within a factor 3 of the predicted rms`, () => {
        const res = pmeForces(c.snap.positions, c.snap.masses, c.snap.box, { G: c.G, tol });
        const measured = rms(vectorRelativeErrors(res.acc, ref.acc));
        expect(measured).toBeLessThan(tol);
        const ratio = measured / res.predictedRmsRelativeError;
        expect(ratio).toBeGreaterThan(1 / 3);
        expect(ratio).toBeLessThan(3);
        // the a-priori estimate the parameters were chosen from is not below the measurement either
        expect(res.params.predictedRelativeError * 3).toBeGreaterThan(measured);
      });
    }
  }
});

describe('pmeForces potentials', () => {
  it('agree with direct Ewald to tol × rms φ (zero-mean convention, self term and background included)', () => {
    for (const c of [cases[1], cases[3]]) {
      const ref = ewaldForces(c.snap.positions, c.snap.masses, c.snap.box, null, { G: c.G, tol: 1e-11 });
      for (const tol of [1e-4, 1e-6]) {
        const res = pmeForces(c.snap.positions, c.snap.masses, c.snap.box, { G: c.G, tol });
        const d = res.phi.map((p, i) => p - ref.phi[i]);
        expect(rms(d) / rms(ref.phi)).toBeLessThan(tol);
        let mean = 0;
        for (const p of res.phi) mean += p;
        // Σ m_i φ_i need not vanish, but the mesh carries no k = 0 mode: the equal-mass mean of φ matches Ewald's
        let refMean = 0;
        for (const p of ref.phi) refMean += p;
        expect(Math.abs(mean - refMean) / res.phi.length).toBeLessThan(tol * rms(ref.phi));
      }
    }
  });
});

describeKernelPaths('pmeForces real-space part', () => {
  it('gives the same accelerations on both kernel paths and meets tol 1e-5 against direct Ewald', () => {
    const s = snapshotClustered(1500, 35, [1, 1.3, 0.8]);
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-11 });
    const res = pmeForces(s.positions, s.masses, s.box, { tol: 1e-5 });
    expect(rms(vectorRelativeErrors(res.acc, ref.acc))).toBeLessThan(1e-5);
  });
});

describe('pmeForces with softening (PHYSICS.md: point-mass Ewald plus the softened-minus-Newton pair terms)', () => {
  const s = snapshotClustered(2000, 36, [1, 1.3, 0.8]);
  it('cubic-spline kernel (Monaghan & Lattanzio 1985), h = 0.02: rms relative error below tol against direct Ewald', () => {
    const softening = { kind: 'spline', h: 0.02 } as const;
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-11, softening });
    for (const tol of [1e-4, 1e-6]) {
      const res = pmeForces(s.positions, s.masses, s.box, { tol, softening });
      expect(rms(vectorRelativeErrors(res.acc, ref.acc))).toBeLessThan(tol);
    }
  });
  it('Plummer ε = 0.005: the correction radius is chosen from tol, and the result stays within tol of the half-box convention', () => {
    const softening = { kind: 'plummer', eps: 0.005 } as const;
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-11, softening });
    for (const tol of [1e-3, 1e-5]) {
      const opts: PmeOptions = { tol, softening };
      const res = pmeForces(s.positions, s.masses, s.box, opts);
      expect(res.params.rSoft).toBeGreaterThanOrEqual(res.params.rCut);
      expect(res.params.rSoft).toBeLessThanOrEqual(0.4);
      expect(rms(vectorRelativeErrors(res.acc, ref.acc))).toBeLessThan(tol);
    }
  });
});

describe('pmeForces does not depend on its splitting parameter', () => {
  it('α, 1.4α and 0.7α (each with the mesh and cutoff chosen for it) agree to the tolerance', () => {
    const s = snapshotUniform(1500, 37, [1, 1.3, 0.8], 1, 0.5);
    const base = pmeForces(s.positions, s.masses, s.box, { tol: 1e-7 });
    for (const f of [1.4, 0.7]) {
      const other = pmeForces(s.positions, s.masses, s.box, { tol: 1e-7, alpha: base.params.alpha * f });
      expect(other.params.alpha).toBe(base.params.alpha * f);
      expect(rms(vectorRelativeErrors(other.acc, base.acc))).toBeLessThan(2e-7);
    }
  });
  it("the 'spme' and 'optimal' influence functions agree to the tolerance", () => {
    const s = snapshotUniform(1500, 38, [1, 1, 1]);
    const a = pmeForces(s.positions, s.masses, s.box, { tol: 1e-6, influence: 'spme' });
    const b = pmeForces(s.positions, s.masses, s.box, { tol: 1e-6, influence: 'optimal' });
    expect(rms(vectorRelativeErrors(a.acc, b.acc))).toBeLessThan(2e-6);
  });
});

describe('pmeForces fixed parameters', () => {
  it('honours mesh, order, α and r_c when given, and reports their predicted errors', () => {
    const s = snapshotUniform(1000, 39, [1, 1.3, 0.8]);
    const res = pmeForces(s.positions, s.masses, s.box, { mesh: [20, 24, 16], order: 5, alpha: 14, rCut: 0.22 });
    expect(res.params.mesh).toEqual([20, 24, 16]);
    expect(res.params.order).toBe(5);
    expect(res.params.alpha).toBe(14);
    expect(res.params.rCut).toBe(0.22);
    expect(res.params.predictedRmsError).toBeGreaterThan(0);
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-11 });
    const measured = rms(vectorRelativeErrors(res.acc, ref.acc));
    expect(measured / res.predictedRmsRelativeError).toBeGreaterThan(1 / 3);
    expect(measured / res.predictedRmsRelativeError).toBeLessThan(3);
    void boxMake;
  });
});
