import { describe, expect, it } from 'vitest';
import {
  fieldCoefficients,
  inverseDistanceDerivatives,
  localFromShell,
  localMonomials,
  momentsAddPoint,
  momentsAddUniformBox,
  multiIndexBuild,
  multiIndexCount,
  multiIndexOf,
} from '../../../engine/orders/multipole';
import { uniformBoxField } from '../../../engine/orders/uniformBox';
import { randomSeeded } from '../../../engine/util/random';

const P = 30;
const mi = multiIndexBuild(P);
const work = new Float64Array((P + 1) * mi.count);
const deriv = new Float64Array(mi.count);

/** Legendre P_n(c) by the three-term recurrence (Abramowitz & Stegun 1964, 8.5.3). */
function legendre(n: number, c: number): number {
  let p0 = 1, p1 = c;
  if (n === 0) return 1;
  for (let k = 1; k < n; k++) [p0, p1] = [p1, ((2 * k + 1) * c * p1 - k * p0) / (k + 1)];
  return p1;
}

describe('multiIndexBuild(p)', () => {
  it('numbers (p+1)(p+2)(p+3)/6 indices by total degree, with a consistent lookup', () => {
    expect(mi.count).toBe(multiIndexCount(P));
    for (let n = 0; n < mi.count; n++) expect(multiIndexOf(mi, mi.a[n], mi.b[n], mi.c[n])).toBe(n);
    for (let t = 0; t <= P; t++) for (let n = mi.degreeStart[t]; n < mi.degreeStart[t + 1]; n++) expect(mi.a[n] + mi.b[n] + mi.c[n]).toBe(t);
  });
});

describe('inverseDistanceDerivatives (McMurchie–Davidson recurrence)', () => {
  const s = [0.7, -1.3, 2.1];
  const r = Math.hypot(...s);
  inverseDistanceDerivatives(mi, P, s[0], s[1], s[2], deriv, work);

  it('matches the closed forms of orders 1, 2 and 4 (∂x r⁻¹ = −x/r³, ∂x∂y r⁻¹ = 3xy/r⁵, ∂x⁴ r⁻¹ = 3(35x⁴ − 30x²r² + 3r⁴)/r⁹)', () => {
    const [x, y] = s;
    expect(deriv[multiIndexOf(mi, 1, 0, 0)]).toBeCloseTo(-x / r ** 3, 15);
    expect(Math.abs(deriv[multiIndexOf(mi, 1, 1, 0)] - (3 * x * y) / r ** 5)).toBeLessThan(1e-15);
    const d4 = (3 * (35 * x ** 4 - 30 * x * x * r * r + 3 * r ** 4)) / r ** 9;
    expect(Math.abs(deriv[multiIndexOf(mi, 4, 0, 0)] - d4)).toBeLessThan(1e-14 * Math.abs(d4));
  });

  // Rounding: the recurrence builds ∂^α r⁻¹ from terms up to ~2^|α| times its natural size |α|!/r^(|α|+1)
  // (largest when s points along one axis), so the attainable accuracy is ~ε·2^|α| of that size; in the
  // expansions these terms are multiplied by (|u|/|s|)^|α| ≤ 0.4^|α|, which keeps them harmless.
  const roundoff = (n: number) => 1e-14 * 2 ** n;

  it('along each axis to order 30: ∂z^n r⁻¹ = (−1)^n n! P_n(z/r)/r^(n+1) (Legendre generating function), to ε·2^n', () => {
    for (const [ax, idx] of [[0, (n: number) => multiIndexOf(mi, n, 0, 0)], [1, (n: number) => multiIndexOf(mi, 0, n, 0)], [2, (n: number) => multiIndexOf(mi, 0, 0, n)]] as const) {
      let fact = 1;
      for (let n = 0; n <= P; n++) {
        if (n > 0) fact *= n;
        const ref = ((-1) ** n * fact * legendre(n, s[ax] / r)) / r ** (n + 1);
        // relative to the order's natural size n!/r^(n+1), since P_n can be near a zero
        expect(Math.abs(deriv[idx(n)] - ref)).toBeLessThan(roundoff(n) * (fact / r ** (n + 1)));
      }
    }
  });

  it('is harmonic: Σ_d ∂^(α+2e_d) r⁻¹ = 0 for every |α| ≤ 28, to ε·2^|α| of the terms', () => {
    for (let n = 0; n < mi.degreeStart[P - 1]; n++) {
      const [i, j, k] = [mi.a[n], mi.b[n], mi.c[n]];
      const lap = deriv[multiIndexOf(mi, i + 2, j, k)] + deriv[multiIndexOf(mi, i, j + 2, k)] + deriv[multiIndexOf(mi, i, j, k + 2)];
      const size = Math.abs(deriv[multiIndexOf(mi, i + 2, j, k)]) + Math.abs(deriv[multiIndexOf(mi, i, j + 2, k)]) + Math.abs(deriv[multiIndexOf(mi, i, j, k + 2)]);
      expect(Math.abs(lap)).toBeLessThanOrEqual(roundoff(i + j + k + 2) * size);
    }
  });
});

describe('moments → local expansion → field, for one distant cell', () => {
  it('reproduces the direct field of 12 particles plus a background box at 3.5 diagonals, error falling with order', () => {
    const rand = randomSeeded(8);
    const L = [1, 0.8, 1.3];
    const n = 12;
    const y = Float64Array.from({ length: 3 * n }, (_, k) => (rand() - 0.5) * L[k % 3]);
    const m = Float64Array.from({ length: n }, () => 0.5 + rand());
    const M = m.reduce((a, b) => a + b, 0);
    const rho = M / (L[0] * L[1] * L[2]);
    const moments = new Float64Array(mi.count);
    const pow = new Float64Array(3 * (P + 1));
    for (let j = 0; j < n; j++) momentsAddPoint(mi, m[j], y[3 * j], y[3 * j + 1], y[3 * j + 2], moments, pow);
    momentsAddUniformBox(mi, -rho, L[0], L[1], L[2], moments);
    // one cell centred at s (a "shell" of one cell: its sums need not be mirror-symmetric, so use all
    // parities by summing the cell and its 7 mirror images and comparing with the same 8 cells directly)
    const d = Math.hypot(...L);
    const s = [2.1 * d, 2.0 * d, 1.2 * d];
    const delta = [0.3, -0.2, 0.45];
    const direct = [0, 0, 0];
    const sums = new Float64Array(mi.count);
    const bg = new Float64Array(3);
    for (const sx of [1, -1]) for (const sy of [1, -1]) for (const sz of [1, -1]) {
      const c = [sx * s[0], sy * s[1], sz * s[2]];
      inverseDistanceDerivatives(mi, P, c[0], c[1], c[2], deriv, work);
      for (let q = 0; q < mi.count; q++) sums[q] += deriv[q];
      for (let j = 0; j < n; j++) {
        const r = [0, 1, 2].map((a) => c[a] + y[3 * j + a] - delta[a]);
        const r3 = Math.hypot(...r) ** 3;
        for (let a = 0; a < 3; a++) direct[a] += (m[j] * r[a]) / r3;
      }
      uniformBoxField(delta[0], delta[1], delta[2], c[0] - L[0] / 2, c[0] + L[0] / 2, c[1] - L[1] / 2, c[1] + L[1] / 2, c[2] - L[2] / 2, c[2] + L[2] / 2, bg);
      for (let a = 0; a < 3; a++) direct[a] -= rho * bg[a];
    }
    const local = new Float64Array(mi.count);
    const mono = new Float64Array(mi.count);
    const errs: number[] = [];
    for (const p of [4, 8, 12, 16, 20]) {
      localFromShell(mi, p, moments, sums, local);
      const fc = new Float64Array(3 * multiIndexCount(p - 1));
      fieldCoefficients(mi, p, local, fc);
      localMonomials(mi, p - 1, delta[0], delta[1], delta[2], mono, pow);
      const a = [0, 0, 0];
      for (let g = 0; g < multiIndexCount(p - 1); g++) for (let q = 0; q < 3; q++) a[q] += fc[3 * g + q] * mono[g];
      errs.push(Math.hypot(a[0] - direct[0], a[1] - direct[1], a[2] - direct[2]) / Math.hypot(...direct));
    }
    for (let k = 1; k < errs.length; k++) expect(errs[k]).toBeLessThan(errs[k - 1]);
    expect(errs[errs.length - 1]).toBeLessThan(1e-9);
  });
});
