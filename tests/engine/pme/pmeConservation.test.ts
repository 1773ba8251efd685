import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { ewaldForces } from '../../../engine/ewald/ewald';
import {
  pmeForces,
  pmeMeshAlloc,
  pmePredictedErrors,
  pmeRealChunk,
  pmeRealCollect,
  pmeSetup,
  pmeWorkUnits,
} from '../../../engine/pme/index';
import { randomSeeded } from '../../../engine/util/random';
import { crystalRockSalt, snapshotClustered, snapshotStackedZ, snapshotTranslated, snapshotUniform } from '../../helpers/snapshots';
import { relativeDifference, vectorRelativeErrors } from '../../helpers/tolerance';

function rms(a: Float64Array): number {
  let s = 0;
  for (const x of a) s += x * x;
  return Math.sqrt(s / a.length);
}

describe('a lone particle feels no force (single-particle self-consistency)', () => {
  // The exact periodic force on a single particle with its neutralising background is zero by symmetry;
  // the mesh self-force of analytic differentiation is removed (selfForce.ts) to second order.
  const box = boxMake(1, 1.3, 0.8);
  const rand = randomSeeded(41);
  for (const order of [4, 5, 6, 7]) {
    it(`order ${order}: |a| < 1e-3 × the predicted rms error at 12 positions, and φ = −Gmξ of direct Ewald`, () => {
      for (let k = 0; k < 12; k++) {
        const p = new Float64Array([rand(), 1.3 * rand(), 0.8 * rand()]);
        const m = new Float64Array([3]);
        const res = pmeForces(p, m, box, { G: 2, tol: 1e-5, order, mesh: [12, 16, 10] });
        const a = Math.hypot(res.acc[0], res.acc[1], res.acc[2]);
        expect(a).toBeLessThan(1e-3 * res.params.predictedRmsError);
        const ref = ewaldForces(p, m, box, null, { G: 2, tol: 1e-12 });
        expect(relativeDifference(res.phi[0], ref.phi[0])).toBeLessThan(1e-5);
      }
    });
  }
  it('without the self-force removal the same particle would feel a force of the order of the predicted error (the test can fail)', () => {
    // Measured directly: mesh self-field from the tables, on the same mesh and α.
    const p = new Float64Array([0.13, 0.41, 0.27]);
    const setup = pmeSetup(p, new Float64Array([1]), box, { tol: 1e-5, order: 4, mesh: [12, 16, 10] });
    const f = setup.selfForce.f;
    const amp = Math.max(...f.map((t) => Math.max(...t.map(Math.abs))));
    expect(amp).toBeGreaterThan(0.05 * setup.params.predictedRmsError);
  });
});

describe('momentum conservation: Σ m_i a_i = 0 for the exact forces', () => {
  it('the real-space part conserves momentum to rounding (pairs are summed once, Newton’s third law)', () => {
    const s = snapshotClustered(3000, 42, [1, 1.3, 0.8]);
    const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-4 });
    pmeRealChunk(setup, 0, pmeWorkUnits(setup).cells);
    const acc = new Float64Array(9000), phi = new Float64Array(3000);
    pmeRealCollect(setup, acc, phi);
    const xyzm = setup.cells.xyzm;
    let px = 0, py = 0, pz = 0, scale = 0;
    for (let i = 0; i < 3000; i++) {
      const m = xyzm[4 * i + 3];
      px += m * acc[3 * i];
      py += m * acc[3 * i + 1];
      pz += m * acc[3 * i + 2];
      scale += m * Math.hypot(acc[3 * i], acc[3 * i + 1], acc[3 * i + 2]);
    }
    expect(Math.hypot(px, py, pz)).toBeLessThan(1e-13 * scale);
    void pmeMeshAlloc;
  });

  it('the total is conserved to the stated level |Σ m_i a_i| ≤ 0.05·tol·Σ m_i|a_i| (uniform and clustered)', () => {
    // Only the mesh part can break it; aligned errors of size tol·|a_i| on every particle would give
    // tol·Σm|a|, so this is a statement that the mesh errors largely cancel in the sum.
    for (const [snap, tol] of [
      [snapshotUniform(3000, 43, [1, 1.3, 0.8], 1, 0.8), 1e-4],
      [snapshotUniform(3000, 44, [1, 1.3, 0.8], 1, 0.8), 1e-6],
      [snapshotClustered(3000, 45, [1, 1.3, 0.8]), 1e-4],
      [snapshotClustered(3000, 46, [1, 1.3, 0.8]), 1e-6],
    ] as const) {
      const res = pmeForces(snap.positions, snap.masses, snap.box, { tol });
      let px = 0, py = 0, pz = 0, total = 0;
      for (let i = 0; i < 3000; i++) {
        const m = snap.masses[i];
        px += m * res.acc[3 * i];
        py += m * res.acc[3 * i + 1];
        pz += m * res.acc[3 * i + 2];
        total += m * Math.hypot(res.acc[3 * i], res.acc[3 * i + 1], res.acc[3 * i + 2]);
      }
      expect(Math.hypot(px, py, pz)).toBeLessThan(0.05 * tol * total);
    }
  });

  it('for uniform (uncorrelated) particles the net force is that of independent errors: ≤ 3·√Σ(m_i ΔA_i)²', () => {
    for (const tol of [1e-3, 1e-5]) {
      const snap = snapshotUniform(3000, 50, [1, 1.3, 0.8], 1, 0.8);
      const res = pmeForces(snap.positions, snap.masses, snap.box, { tol });
      const predicted = pmePredictedErrors(pmeSetup(snap.positions, snap.masses, snap.box, { tol }), res.acc).perParticle;
      let px = 0, py = 0, pz = 0, bound = 0;
      for (let i = 0; i < 3000; i++) {
        const m = snap.masses[i];
        px += m * res.acc[3 * i];
        py += m * res.acc[3 * i + 1];
        pz += m * res.acc[3 * i + 2];
        bound += (m * predicted[i]) ** 2;
      }
      expect(Math.hypot(px, py, pz)).toBeLessThan(3 * Math.sqrt(bound));
    }
  });

  it('two particles: equal and opposite forces to the tolerance, attractive along the minimum image', () => {
    const p = new Float64Array([0.1, 0.2, 0.3, 0.45, 0.95, 0.4]);
    const m = new Float64Array([3, 0.25]);
    const box = boxMake(1, 1.3, 0.8);
    const res = pmeForces(p, m, box, { tol: 1e-6 });
    const ref = ewaldForces(p, m, box, null, { tol: 1e-12 });
    const scale = Math.hypot(ref.acc[0], ref.acc[1], ref.acc[2]) * 3;
    for (let d = 0; d < 3; d++) expect(Math.abs(3 * res.acc[d] + 0.25 * res.acc[3 + d])).toBeLessThan(1e-5 * scale);
    expect(Math.max(...vectorRelativeErrors(res.acc, ref.acc))).toBeLessThan(1e-5);
  });
});

describe('invariances of the periodic problem', () => {
  it('translating every particle by a vector (not a mesh multiple) changes accelerations only within the tolerance', () => {
    const s = snapshotClustered(2000, 47, [1, 1.3, 0.8]);
    const a = pmeForces(s.positions, s.masses, s.box, { tol: 1e-6 });
    const t = snapshotTranslated(s, [0.3137, -0.771, 2.05]);
    const b = pmeForces(t.positions, t.masses, t.box, { tol: 1e-6 });
    expect(b.wrapped).toBeGreaterThan(0);
    expect(rms(vectorRelativeErrors(b.acc, a.acc))).toBeLessThan(2e-6);
  });

  it('two stacked copies of a cell in an L×L×2L box give the single cell’s accelerations (the images are the same)', () => {
    const s = snapshotUniform(1200, 48, [1, 1, 1], 1, 0.5);
    const one = pmeForces(s.positions, s.masses, s.box, { tol: 1e-6 });
    const two = pmeForces(snapshotStackedZ(s).positions, snapshotStackedZ(s).masses, boxMake(1, 1, 2), { tol: 1e-6 });
    const first = two.acc.subarray(0, 3600);
    expect(rms(vectorRelativeErrors(first as Float64Array, one.acc))).toBeLessThan(2e-6);
  });

  it('does not depend on the input order of the particles (beyond rounding)', () => {
    const s = snapshotUniform(1500, 49, [1, 1.3, 0.8], 1, 0.5);
    const perm = Array.from({ length: 1500 }, (_, i) => (i * 7919) % 1500);
    const pos = new Float64Array(4500), mass = new Float64Array(1500);
    perm.forEach((j, i) => {
      pos.set(s.positions.subarray(3 * j, 3 * j + 3), 3 * i);
      mass[i] = s.masses[j];
    });
    const a = pmeForces(s.positions, s.masses, s.box, { tol: 1e-6 });
    const b = pmeForces(pos, mass, s.box, { tol: 1e-6 });
    let worst = 0;
    perm.forEach((j, i) => {
      for (let d = 0; d < 3; d++) worst = Math.max(worst, Math.abs(b.acc[3 * i + d] - a.acc[3 * j + d]));
    });
    expect(worst).toBeLessThan(1e-12 * rms(a.acc));
  });
});

describe('signed weights (the lattice-sum core): rock salt', () => {
  it('the Madelung constant M = 1.747564594633… (OEIS A085469) from PME potentials to 1e-6', () => {
    const c = crystalRockSalt(1, 3, [0.11, 0.07, 0.03]);
    const res = pmeForces(c.positions, c.masses, c.box, { tol: 1e-8 });
    // with G = 1, φ_i = −Σ q_j ψ: for ion i, q_i φ_i r0 = M (attractive lattice, our sign convention)
    for (let i = 0; i < c.masses.length; i += 17) expect(relativeDifference(c.masses[i] * res.phi[i] * c.r0, 1.7475645946331821906)).toBeLessThan(1e-6);
  });
});
