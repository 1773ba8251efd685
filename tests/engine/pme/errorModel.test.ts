import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { densityCoherent, densityPairEstimate, densityStats, MORTON_LEVELS } from '../../../engine/pme/density';
import { errorModelFactor, errorModelFieldSample, errorModelSamples, HOLTSMARK_FACTOR, HOLTSMARK_INV_SQ, holtsmarkInverseSquare } from '../../../engine/pme/errorModel';
import { randomSeeded } from '../../../engine/util/random';
import { snapshotUniform } from '../../helpers/snapshots';

/**
 * Holtsmark distribution of the field strength β (units of the normal field), Chandrasekhar 1943 (Rev.
 * Mod. Phys. 15, 1), Eq. (426): H(β) = (2/πβ) ∫₀^∞ x sin x e^{−(x/β)^{3/2}} dx, by Simpson's rule.
 */
function holtsmarkH(beta: number): number {
  const X = beta * 12 + 40;
  const m = Math.ceil(X / 0.02) * 2;
  const dx = X / m;
  let s = 0;
  for (let j = 0; j <= m; j++) {
    const x = j * dx;
    const w = j === 0 || j === m ? 1 : j % 2 ? 4 : 2;
    s += w * x * Math.sin(x) * Math.exp(-Math.pow(x / beta, 1.5));
  }
  return ((2 / (Math.PI * beta)) * s * dx) / 3;
}

describe('Holtsmark constants and g(s) = Q_H²·E[1/|A + F|²]', () => {
  it('the normal-field factor 2π(4/15)^{2/3} is 2.6031 (Chandrasekhar 1943, Eq. 428: Q_H = 2.603 G m n^{2/3})', () => {
    expect(Math.abs(HOLTSMARK_FACTOR - 2.6031)).toBeLessThan(5e-5);
  });

  // H(β) on a grid once: β ∈ (0, 60], plus the large-β tail H ≈ (15/8)√(2/π) β^{−5/2} (Chandrasekhar Eq. 432).
  const db = 0.01;
  const betas: number[] = [];
  const H: number[] = [];
  for (let b = db / 2; b < 60; b += db) {
    betas.push(b);
    H.push(holtsmarkH(b));
  }
  const tail = (15 / 8) * Math.sqrt(2 / Math.PI);

  it('the quadrature of H(β) is normalised (∫H dβ = 1 to 2e-3, tail beyond β = 60 included)', () => {
    let s = 0;
    for (let k = 0; k < betas.length; k++) s += H[k] * db;
    s += (tail * 2) / (3 * Math.pow(60, 1.5));
    expect(Math.abs(s - 1)).toBeLessThan(2e-3);
  });

  it('g(0) = ⟨β⁻²⟩ = (2/3)Γ(4/3) = ∫ H(β)/β² dβ (independent route: the distribution, not its characteristic function)', () => {
    let s = 0;
    for (let k = 0; k < betas.length; k++) s += (H[k] / (betas[k] * betas[k])) * db;
    expect(Math.abs(s - HOLTSMARK_INV_SQ)).toBeLessThan(2e-3);
    expect(holtsmarkInverseSquare(0)).toBe(HOLTSMARK_INV_SQ);
  });

  it('g(s) for s > 0 equals ∫ H(β) (1/2sβ) ln|(s+β)/(s−β)| dβ (the angular average of 1/|A+F|²) to 1 %', () => {
    for (const sv of [0.5, 1, 2, 4, 10]) {
      let s = 0;
      for (let k = 0; k < betas.length; k++) {
        const b = betas[k];
        s += H[k] * (Math.log(Math.abs((sv + b) / (sv - b))) / (2 * sv * b)) * db;
      }
      expect(Math.abs(holtsmarkInverseSquare(sv) / s - 1)).toBeLessThan(0.01);
    }
  });

  it('g(s) → 1/s² + Γ(5/2)sin(π/4)/s^{7/2} for a dominant large-scale field (asymptotics of the sine transform)', () => {
    const c = 0.75 * Math.sqrt(Math.PI) * Math.SQRT1_2;
    for (const sv of [12, 20, 30, 100]) {
      const want = 1 / sv ** 2 + c / sv ** 3.5;
      expect(Math.abs(holtsmarkInverseSquare(sv) / want - 1)).toBeLessThan(1e-3);
    }
  });
});

describe('densityStats / densityPairEstimate / densityCoherent', () => {
  it('Morton order sorts the codes, and pair sums match a direct count per level', () => {
    const s = snapshotUniform(3000, 5, [1, 2, 0.5]);
    const st = densityStats(s.positions, s.masses, s.box);
    for (let k = 1; k < st.n; k++) expect(st.sorted[k]).toBeGreaterThanOrEqual(st.sorted[k - 1]);
    for (const j of [0, 3, 6, 10]) {
      const counts = new Map<number, number>();
      for (const c of st.codes) counts.set(c >>> (3 * (MORTON_LEVELS - j)), (counts.get(c >>> (3 * (MORTON_LEVELS - j))) ?? 0) + 1);
      let sum = 0;
      for (const n of counts.values()) sum += n * (n - 1);
      expect(st.pairSum[j]).toBe(sum);
    }
  });

  it('estimates the pairs closer than r within 10 % for uniform particles (exact count by brute force)', () => {
    const s = snapshotUniform(3000, 6, [1, 1, 1]);
    const st = densityStats(s.positions, s.masses, s.box);
    for (const r of [0.05, 0.1, 0.2]) {
      let count = 0;
      for (let i = 0; i < 3000; i++) for (let j = i + 1; j < 3000; j++) {
        let d2 = 0;
        for (let d = 0; d < 3; d++) {
          let x = Math.abs(s.positions[3 * i + d] - s.positions[3 * j + d]);
          x = Math.min(x, 1 - x);
          d2 += x * x;
        }
        if (d2 < r * r) count++;
      }
      expect(Math.abs(densityPairEstimate(st, r) / count - 1)).toBeLessThan(0.1);
    }
  });

  it('coherent ρ₂ is Σm²/V for a Poisson sample and doubles when every source is a tight pair (amplitudes add)', () => {
    const s = snapshotUniform(8000, 7, [1, 1, 1], 1, 0.5);
    const st = densityStats(s.positions, s.masses, s.box);
    let q = 0;
    for (const m of s.masses) q += m * m;
    const map = densityCoherent(st, s.masses, 2, 5);
    const mean = map.rho2.reduce((a, b) => a + b, 0) / map.rho2.length;
    expect(Math.abs(mean / q - 1)).toBeLessThan(0.05);
    // 4000 pairs 1e-5 apart (same total mass per pair partner)
    const r = randomSeeded(8);
    const pos = new Float64Array(3 * 8000), mass = new Float64Array(8000).fill(1 / 8000);
    for (let k = 0; k < 4000; k++) for (let d = 0; d < 3; d++) {
      const x = r() * 0.99;
      pos[6 * k + d] = x;
      pos[6 * k + 3 + d] = x + 1e-5;
    }
    const st2 = densityStats(pos, mass, boxMake(1));
    const map2 = densityCoherent(st2, mass, 2, 5);
    const mean2 = map2.rho2.reduce((a, b) => a + b, 0) / map2.rho2.length;
    expect(Math.abs(mean2 / (8000 / 8000 ** 2) - 2)).toBeLessThan(0.1);
  });
});

describe('errorModelFieldSample / errorModelFactor', () => {
  it('the coarse-mesh field of a sinusoidal density is its long-range part 4πGε cos(kx)e^{−k²/4α²}/k (Poisson equation), rms within 3 % of the amplitude', () => {
    // density 1 + ε sin(2πx) in a unit cube (ε = 0.5), sampled by inverse transform in x
    const n = 60000, eps = 0.5, k = 2 * Math.PI, G = 2;
    const r = randomSeeded(9);
    const pos = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const u = r();
      let x = u;
      for (let it = 0; it < 50; it++) x -= (x + (eps / k) * (1 - Math.cos(k * x)) - u) / (1 + eps * Math.sin(k * x));
      pos[3 * i] = ((x % 1) + 1) % 1;
      pos[3 * i + 1] = r();
      pos[3 * i + 2] = r();
    }
    const masses = new Float64Array(n).fill(1 / n);
    const f = errorModelFieldSample(pos, masses, boxMake(1), G, 2000);
    const amp = ((4 * Math.PI * G * eps) / k) * Math.exp(-(k * k) / (4 * f.alpha * f.alpha));
    let se = 0, fit = 0, norm = 0;
    for (let s = 0; s < f.rows.length; s++) {
      const x = pos[3 * f.rows[s]];
      se += (f.acc[3 * s] - amp * Math.cos(k * x)) ** 2;
      fit += f.acc[3 * s] * Math.cos(k * x);
      norm += Math.cos(k * x) ** 2;
    }
    // the deviation is the particles' shot noise (≈ 2.3 % here, as in the y component, whose mean is zero)
    expect(Math.sqrt(se / f.rows.length) / amp).toBeLessThan(0.03);
    expect(Math.abs(fit / norm / amp - 1)).toBeLessThan(0.02);
  });

  it('for uniform particles Z ≈ ⟨β⁻²⟩ G²ρ₂ / Q_H² (mean field negligible) to 15 %', () => {
    const s = snapshotUniform(20000, 10, [1, 1, 1]);
    const st = densityStats(s.positions, s.masses, s.box);
    const G = 3;
    const f = errorModelFieldSample(s.positions, s.masses, s.box, G);
    const z = errorModelFactor(st, s.masses, errorModelSamples(st, s.masses, f, G), G, 0.03, 0.1).factor;
    const m = 1 / 20000;
    const qh = HOLTSMARK_FACTOR * G * Math.pow(20000 * m ** 1.5, 2 / 3);
    const expected = (HOLTSMARK_INV_SQ * G * G * 20000 * m * m) / (qh * qh);
    expect(Math.abs(z / expected - 1)).toBeLessThan(0.15);
  });
});
