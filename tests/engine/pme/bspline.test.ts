import { describe, expect, it } from 'vitest';
import {
  bsplineAliasCoefficients,
  bsplineAtIntegers,
  bsplineEulerModulus2,
  bsplineTransform,
  bsplineValue,
  bsplineWeights,
  cosineSeries,
} from '../../../engine/pme/bspline';
import { gaussLegendre } from '../../helpers/quadrature';

const ORDERS = [2, 3, 4, 5, 6, 7, 8, 10, 12];

/** ∫_a^b f by 40-point Gauss–Legendre on unit subintervals (exact for the piecewise polynomials here). */
function integrate(f: (u: number) => number, a: number, b: number): number {
  const g = gaussLegendre(40);
  let s = 0;
  for (let lo = a; lo < b; lo++) {
    for (let k = 0; k < g.nodes.length; k++) s += 0.5 * g.weights[k] * f(lo + 0.5 * (g.nodes[k] + 1));
  }
  return s;
}

describe('bsplineWeights(p, w, v, dv): cardinal B-spline weights', () => {
  it('partition of unity Σ_s M_p(w + s) = 1 and Σ_s M_p′(w + s) = 0 for p = 2 … 12 (Essmann et al. 1995, Sec. III)', () => {
    for (const p of ORDERS) {
      const v = new Float64Array(p), dv = new Float64Array(p);
      for (const w of [0, 1e-12, 0.1, 0.25, 0.5, 0.731, 0.999999]) {
        bsplineWeights(p, w, v, dv);
        expect(Math.abs(v.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-14);
        expect(Math.abs(dv.reduce((a, b) => a + b, 0))).toBeLessThan(1e-13);
        for (const x of v) expect(x).toBeGreaterThanOrEqual(0);
      }
    }
  });

  it('reproduces linear functions: Σ_s (w + s)·M_p(w + s) = p/2 (first moment of the centred spline; de Boor 1978, Ch. IX)', () => {
    for (const p of ORDERS) {
      const v = new Float64Array(p);
      for (const w of [0, 0.3, 0.77]) {
        bsplineWeights(p, w, v);
        let moment = 0;
        for (let s = 0; s < p; s++) moment += (w + s) * v[s];
        expect(Math.abs(moment - p / 2)).toBeLessThan(1e-13);
      }
    }
  });

  it('derivative identity M_p′(u) = M_{p−1}(u) − M_{p−1}(u − 1), and agreement with a central difference', () => {
    for (const p of [3, 4, 5, 6, 8]) {
      const v = new Float64Array(p), dv = new Float64Array(p);
      for (const w of [0.05, 0.4, 0.9]) {
        bsplineWeights(p, w, v, dv);
        for (let s = 0; s < p; s++) {
          const u = w + s;
          expect(Math.abs(dv[s] - (bsplineValue(p - 1, u) - bsplineValue(p - 1, u - 1)))).toBeLessThan(1e-14);
          const hStep = 1e-6;
          const fd = (bsplineValue(p, u + hStep) - bsplineValue(p, u - hStep)) / (2 * hStep);
          expect(Math.abs(dv[s] - fd)).toBeLessThan(1e-8);
        }
      }
    }
  });

  it('M_4 is the cubic B-spline: u³/6, (−3u³ + 12u² − 12u + 4)/6, … (closed form, de Boor 1978)', () => {
    const cubic = (u: number) =>
      u < 0 || u > 4 ? 0 : u < 1 ? u ** 3 / 6 : u < 2 ? (-3 * u ** 3 + 12 * u ** 2 - 12 * u + 4) / 6 : u < 3 ? (3 * u ** 3 - 24 * u ** 2 + 60 * u - 44) / 6 : (4 - u) ** 3 / 6;
    for (let u = -0.5; u <= 4.5; u += 0.0625) expect(Math.abs(bsplineValue(4, u) - cubic(u))).toBeLessThan(1e-15);
  });

  it('symmetry M_p(u) = M_p(p − u), unit integral, and support [0, p]', () => {
    for (const p of ORDERS) {
      for (const u of [0.1, 0.5, 1.3, p / 2 - 0.2]) expect(Math.abs(bsplineValue(p, u) - bsplineValue(p, p - u))).toBeLessThan(1e-15);
      expect(Math.abs(integrate((u) => bsplineValue(p, u), 0, p) - 1)).toBeLessThan(1e-14);
      expect(bsplineValue(p, -0.01)).toBe(0);
      expect(bsplineValue(p, p + 0.01)).toBe(0);
    }
  });

  it('integer values of M_4 are 1/6, 2/3, 1/6 and of M_6 are 1/120, 26/120, 66/120, 26/120, 1/120 (Eulerian numbers / p!)', () => {
    const m4 = bsplineAtIntegers(4);
    [0, 1 / 6, 2 / 3, 1 / 6, 0].forEach((x, i) => expect(Math.abs(m4[i] - x)).toBeLessThan(1e-16));
    const m6 = bsplineAtIntegers(6);
    [0, 1, 26, 66, 26, 1, 0].forEach((x, i) => expect(Math.abs(m6[i] - x / 120)).toBeLessThan(1e-16));
  });
});

describe('bsplineAliasCoefficients(p): closed forms of the alias sums', () => {
  /** Direct alias sums Σ_j U²(θ + 2πj) and Σ_j (θ + 2πj)² U² (h = 1), |j| ≤ 4000. */
  function direct(p: number, theta: number): { s: number; t: number } {
    let s = 0, t = 0;
    for (let j = -4000; j <= 4000; j++) {
      const th = theta + 2 * Math.PI * j;
      const u = bsplineTransform(p, th);
      s += u * u;
      t += th * th * u * u;
    }
    return { s, t };
  }

  it('S(θ) = Σ_j U²(θ + 2πj) and T(θ) = Σ_j (θ + 2πj)²U² agree with the direct sums (Poisson summation of M_2p)', () => {
    for (const p of [2, 3, 4, 5, 6, 7, 8]) {
      const c = bsplineAliasCoefficients(p);
      for (const theta of [0, 0.3, 1, 2, 2.9, Math.PI]) {
        const d = direct(p, theta);
        expect(Math.abs(cosineSeries(c.s, theta) - d.s)).toBeLessThan(1e-12);
        // the truncated direct T sum converges like j^(3−2p): tolerance from its tail for p = 2
        expect(Math.abs(cosineSeries(c.t, theta) - d.t)).toBeLessThan(p === 2 ? 1e-3 : 1e-8);
      }
    }
  });

  it('p = 2 gives T(θ) = 2(1 − cos θ) exactly (Σ_j 1/(θ + 2πj)² = 1/(4 sin²(θ/2)))', () => {
    const c = bsplineAliasCoefficients(2);
    for (const theta of [0.2, 1.1, 3]) expect(Math.abs(cosineSeries(c.t, theta) - 2 * (1 - Math.cos(theta)))).toBeLessThan(1e-15);
  });
});

describe('bsplineEulerModulus2(p, θ): the SPME interpolation denominator', () => {
  it('for even p equals [Σ_j U(θ + 2πj)]² (Poisson summation of the centred M_p; Essmann et al. 1995, Sec. III)', () => {
    for (const p of [4, 6, 8]) {
      for (const theta of [0, 0.7, 2, Math.PI]) {
        let s = 0;
        for (let j = -3000; j <= 3000; j++) s += bsplineTransform(p, theta + 2 * Math.PI * j);
        expect(Math.abs(bsplineEulerModulus2(p, theta) - s * s)).toBeLessThan(1e-12);
      }
    }
  });
  it('is 1 at θ = 0 and vanishes at θ = π for odd p', () => {
    for (const p of ORDERS) expect(Math.abs(bsplineEulerModulus2(p, 0) - 1)).toBeLessThan(1e-14);
    for (const p of [3, 5, 7]) expect(bsplineEulerModulus2(p, Math.PI)).toBeLessThan(1e-28);
  });
});
