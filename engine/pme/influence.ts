/**
 * Influence functions Ĝ(k) of the mesh solve for gravity with the Ewald split α, order-p B-spline
 * assignment and analytic differentiation (force = gradient of the interpolated potential). Both kinds
 * factor into per-axis tables, Ĝ(k)/V = (4π/V)·a₀(k₀)a₁(k₁)a₂(k₂) / (t₀(k₀) + t₁(k₁) + t₂(k₂)):
 *   'spme':    a = e^{−k_d²/4α²}/|b̃(θ_d)|²,  t = k_d²          (Essmann et al. 1995, J. Chem. Phys. 103,
 *              8577, Sec. III: exp(−k²/4α²)/k² times the B-spline factor 1/|Σ_l M_p(l+1)e^{iθl}|² per axis);
 *   'optimal': a = σ_d/S_d², t = T_d/S_d, with S, T the alias sums of bspline.ts and
 *              σ_d = Σ_j U_d²(k_d + 2πj/h) e^{−(k_d + 2πj/h)²/4α²}: the minimiser of the rms force error
 *              functional (Hockney & Eastwood 1988, Computer Simulation Using Particles, Ch. 8;
 *              Deserno & Holm 1998, J. Chem. Phys. 109, 7694) worked out for analytic differentiation,
 *              Ĝ_opt = Σ_m U²(k_m)|k_m|²φ̃(k_m) / ([Σ_m |k_m|²U²(k_m)][Σ_m U²(k_m)]) (our derivation, in
 *              meshError.ts; the same form as Ballenegger, Cerdà & Holm 2012, J. Chem. Theory Comput. 8,
 *              936, quoted from memory). With φ̃ = 4πe^{−k²/4α²}/k² the numerator and denominator factor
 *              by axis, so no 3D alias sum is needed.
 */
import { type Box, boxSides, boxVolume } from '../box';
import { bsplineAliasCoefficients, bsplineEulerModulus2, bsplineTransform, cosineSeries } from './bspline';
import { type MeshFft } from './fft3d';

export type InfluenceKind = 'spme' | 'optimal';

export interface InfluenceTables {
  /** Per-axis numerator and denominator tables indexed by the mesh index (axis 0: 0 … n0/2). */
  readonly a: [Float64Array, Float64Array, Float64Array];
  readonly t: [Float64Array, Float64Array, Float64Array];
  /** 4π/V: Ĝ/V = scale·a₀a₁a₂/(t₀ + t₁ + t₂). */
  readonly scale: number;
}

/** Alias terms summed on each side of the principal one (terms fall off like j^{−2p}). */
export const ALIAS_TERMS = 40;

/** Signed frequency of mesh index i on a side of n points (−n/2 < m ≤ n/2). */
export function meshFrequency(i: number, n: number): number {
  return i <= n / 2 ? i : i - n;
}

/** The per-axis pieces at θ = kh for spacing h: S, T (closed forms) and σ (direct alias sum). */
export function influenceAxis(p: number, theta: number, h: number, alpha: number, coef = bsplineAliasCoefficients(p)): { s: number; t: number; sigma: number } {
  const s = cosineSeries(coef.s, theta);
  const t = cosineSeries(coef.t, theta) / (h * h);
  let sigma = 0;
  for (let j = -ALIAS_TERMS; j <= ALIAS_TERMS; j++) {
    const th = theta + 2 * Math.PI * j;
    const k = th / h;
    const u = bsplineTransform(p, th);
    sigma += u * u * Math.exp(-(k * k) / (4 * alpha * alpha));
  }
  return { s, t, sigma };
}

/** Builds the per-axis tables for a mesh of n[d] points per side in the box. */
export function influenceTables(n: [number, number, number], box: Box, alpha: number, p: number, kind: InfluenceKind): InfluenceTables {
  const sides = boxSides(box);
  const coef = bsplineAliasCoefficients(p);
  const a: Float64Array[] = [];
  const t: Float64Array[] = [];
  for (let d = 0; d < 3; d++) {
    const len = d === 0 ? n[0] / 2 + 1 : n[d];
    const h = sides[d] / n[d];
    const ad = new Float64Array(len);
    const td = new Float64Array(len);
    const euler = new Float64Array(len);
    for (let i = 0; i < len; i++) euler[i] = bsplineEulerModulus2(p, (2 * Math.PI * meshFrequency(i, n[d])) / n[d]);
    for (let i = 0; i < len; i++) {
      const m = meshFrequency(i, n[d]);
      const theta = (2 * Math.PI * m) / n[d];
      const k = (2 * Math.PI * m) / sides[d];
      if (kind === 'spme') {
        let e2 = euler[i];
        // Odd p: the Euler spline vanishes at θ = π (i = n/2 ≥ 1); use the neighbouring mode's factor
        // there, which by symmetry is the mean of both neighbours (common practice, no source).
        if (e2 < 1e-12 && i > 0) e2 = euler[i - 1] > 1e-12 ? euler[i - 1] : 1;
        ad[i] = Math.exp(-(k * k) / (4 * alpha * alpha)) / e2;
        td[i] = k * k;
      } else {
        const ax = influenceAxis(p, theta, h, alpha, coef);
        ad[i] = ax.sigma / (ax.s * ax.s);
        td[i] = m === 0 ? 0 : ax.t / ax.s; // T(0) = 0 exactly (the cosine series leaves rounding)
      }
    }
    a.push(ad);
    t.push(td);
  }
  return { a: a as InfluenceTables['a'], t: t as InfluenceTables['t'], scale: (4 * Math.PI) / boxVolume(box) };
}

/**
 * Multiplies the spectrum of slab k0 (split layout of fft3d.ts: [k2][k1] real parts, then imaginary)
 * by Ĝ/V; the k = 0 mode is set to zero (mean density removed).
 */
export function influenceApplySlab(f: MeshFft, tab: InfluenceTables, k0: number, s: Float64Array): void {
  const [, n1, n2] = f.n;
  const B = n1 * n2;
  const a1 = tab.a[1], a2 = tab.a[2], t1 = tab.t[1], t2 = tab.t[2];
  const c0 = tab.scale * tab.a[0][k0];
  const tt0 = tab.t[0][k0];
  for (let k2 = 0; k2 < n2; k2++) {
    const c = c0 * a2[k2];
    const tz = tt0 + t2[k2];
    const row = k2 * n1;
    for (let k1 = 0; k1 < n1; k1++) {
      const den = tz + t1[k1];
      const g = den > 0 ? (c * a1[k1]) / den : 0;
      s[row + k1] *= g;
      s[B + row + k1] *= g;
    }
  }
}
