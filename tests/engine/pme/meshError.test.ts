import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { bsplineAliasCoefficients, bsplineEulerModulus2, bsplineTransform, cosineSeries } from '../../../engine/pme/bspline';
import { influenceTables, meshFrequency } from '../../../engine/pme/influence';
import { meshErrorFunctional, realErrorFunctional } from '../../../engine/pme/meshError';
import { pmeForces } from '../../../engine/pme/pme';
import { snapshotUniform } from '../../helpers/snapshots';

describe('influenceTables(n, box, α, p, kind)', () => {
  const box = boxMake(1, 1.2, 0.9);
  const n: [number, number, number] = [8, 10, 6];
  const alpha = 7;

  /** Ĝ(k)·V/(4π) from the per-axis tables at mesh indices (i0, i1, i2). */
  const gOf = (kind: 'spme' | 'optimal', p: number, i: [number, number, number]) => {
    const t = influenceTables(n, box, alpha, p, kind);
    const den = t.t[0][i[0]] + t.t[1][i[1]] + t.t[2][i[2]];
    return (t.a[0][i[0]] * t.a[1][i[1]] * t.a[2][i[2]]) / den;
  };

  it("'spme' is e^{−k²/4α²}/k² · Π_d 1/|Σ_l M_p(l+1)e^{iθ_d l}|² (Essmann et al. 1995, Sec. III)", () => {
    for (const i of [[1, 0, 0], [2, 3, 1], [4, 9, 5], [3, 5, 3]] as [number, number, number][]) {
      const k = i.map((v, d) => (2 * Math.PI * meshFrequency(v, n[d])) / [box.lx, box.ly, box.lz][d]);
      const k2 = k[0] ** 2 + k[1] ** 2 + k[2] ** 2;
      let want = Math.exp(-k2 / (4 * alpha * alpha)) / k2;
      for (let d = 0; d < 3; d++) want /= bsplineEulerModulus2(6, (2 * Math.PI * meshFrequency(i[d], n[d])) / n[d]);
      expect(Math.abs(gOf('spme', 6, i) - want)).toBeLessThan(1e-13 * want);
    }
  });

  it("'optimal' equals the 3D alias-sum formula Σ_m U²|k_m|²φ̃ / ([Σ_m |k_m|²U²][Σ_m U²]) summed directly (|m_d| ≤ 6)", () => {
    const p = 4;
    const h = [box.lx / n[0], box.ly / n[1], box.lz / n[2]];
    for (const i of [[1, 0, 0], [2, 3, 1], [4, 5, 3], [3, 9, 5]] as [number, number, number][]) {
      const th = i.map((v, d) => (2 * Math.PI * meshFrequency(v, n[d])) / n[d]);
      let num = 0, su2 = 0, sk2u2 = 0;
      for (let a = -6; a <= 6; a++) for (let b = -6; b <= 6; b++) for (let c = -6; c <= 6; c++) {
        const km = [th[0] + 2 * Math.PI * a, th[1] + 2 * Math.PI * b, th[2] + 2 * Math.PI * c].map((t, d) => t / h[d]);
        const u2 = [a, b, c].reduce((s, m, d) => s * bsplineTransform(p, th[d] + 2 * Math.PI * m) ** 2, 1);
        const k2 = km[0] ** 2 + km[1] ** 2 + km[2] ** 2;
        num += u2 * Math.exp(-k2 / (4 * alpha * alpha)); // U²|k|²φ̃/4π = U² e^{−k²/4α²}
        su2 += u2;
        sk2u2 += k2 * u2;
      }
      const want = num / (su2 * sk2u2);
      // truncating T = Σ|k_m|²U² at |m| ≤ 6 leaves a relative tail ≈ 2e-5 for p = 4 (terms ~ m^{−6})
      expect(Math.abs(gOf('optimal', p, i) - want)).toBeLessThan(1e-4 * want);
    }
  });
});

describe('meshErrorFunctional(n, box, α, p, kind, samples): the rms-error functional Q', () => {
  const box = boxMake(1, 1.3, 0.8);

  it('the optimal influence function never gives a larger Q than the SPME one (it minimises Q by construction)', () => {
    for (const p of [3, 4, 6, 8]) for (const ah of [0.4, 0.8, 1.2]) {
      const n: [number, number, number] = [24, 30, 20];
      const alpha = ah / (1 / 24);
      const qo = meshErrorFunctional(n, box, alpha, p, 'optimal');
      const qs = meshErrorFunctional(n, box, alpha, p, 'spme');
      expect(qo).toBeLessThanOrEqual(qs * (1 + 1e-12));
      expect(qo).toBeGreaterThan(0);
    }
  });

  it('the midpoint rule with 16 θ samples per half axis agrees with the exact Brillouin-zone sum to 3 %', () => {
    for (const p of [4, 7]) for (const ah of [0.5, 1]) {
      const n: [number, number, number] = [64, 80, 48];
      const alpha = ah * 64;
      const exact = meshErrorFunctional(n, box, alpha, p, 'optimal', 64);
      const sampled = meshErrorFunctional(n, box, alpha, p, 'optimal', 16);
      expect(Math.abs(sampled / exact - 1)).toBeLessThan(0.03);
    }
  });

  it('predicts the measured rms mesh error of uniform random sources to 10 % (Deserno & Holm 1998 framework)', () => {
    // Real-space cutoff long enough (αr_c = 4.5: KP error 1e-4 of the mesh error) that the PME−Ewald
    // difference is the mesh error alone; N = 2000 sources give the rms to a few per cent.
    const s = snapshotUniform(2000, 21, [1, 1.3, 0.8], 1, 0.6);
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-12 });
    let q2 = 0;
    for (const m of s.masses) q2 += m * m;
    const rho2 = q2 / (1 * 1.3 * 0.8);
    const meshes: Record<number, [number, number, number]> = { 20: [20, 25, 16], 24: [24, 30, 20] };
    for (const [kind, p, mesh, ah] of [['optimal', 4, 20, 0.7], ['spme', 4, 20, 0.7], ['optimal', 6, 24, 1.0], ['spme', 7, 24, 0.9]] as const) {
      const n = meshes[mesh];
      const alpha = ah * mesh;
      const res = pmeForces(s.positions, s.masses, s.box, { mesh: n, order: p, alpha, rCut: 4.5 / alpha, influence: kind });
      let se = 0;
      for (let k = 0; k < res.acc.length; k++) se += (res.acc[k] - ref.acc[k]) ** 2;
      const measured = Math.sqrt(se / 2000);
      const predicted = Math.sqrt(rho2 * meshErrorFunctional(n, s.box, alpha, p, kind, 32));
      expect(measured / predicted).toBeGreaterThan(0.9);
      expect(measured / predicted).toBeLessThan(1.1);
    }
  });

  it('the Kolafa–Perram real-space functional 4e^{−2α²r_c²}/r_c predicts the measured truncation error to 20 %', () => {
    const s = snapshotUniform(2000, 22, [1, 1, 1], 1, 0.6);
    const ref = ewaldForces(s.positions, s.masses, s.box, null, { tol: 1e-12 });
    let q2 = 0;
    for (const m of s.masses) q2 += m * m;
    for (const x of [2.2, 2.8]) {
      const alpha = 12;
      const rCut = x / alpha;
      // a mesh fine enough that its own error is < 1 % of the truncation error
      const res = pmeForces(s.positions, s.masses, s.box, { mesh: 40, order: 8, alpha, rCut });
      let se = 0;
      for (let k = 0; k < res.acc.length; k++) se += (res.acc[k] - ref.acc[k]) ** 2;
      const measured = Math.sqrt(se / 2000);
      const predicted = Math.sqrt(q2 * realErrorFunctional(alpha, rCut));
      expect(measured / predicted).toBeGreaterThan(0.8);
      expect(measured / predicted).toBeLessThan(1.2);
    }
  });

  it('the closed-form alias sums feed the same S, T the direct sums give (consistency of meshError and bspline)', () => {
    const c = bsplineAliasCoefficients(5);
    let s = 0;
    for (let j = -2000; j <= 2000; j++) s += bsplineTransform(5, 1.234 + 2 * Math.PI * j) ** 2;
    expect(Math.abs(cosineSeries(c.s, 1.234) - s)).toBeLessThan(1e-13);
  });
});
