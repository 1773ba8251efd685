/**
 * Cardinal B-splines M_p (support [0, p], unit integral) for mesh assignment of order p, by the recursion
 *   M_1(u) = 1 on [0, 1),   M_n(u) = [u M_{n−1}(u) + (n − u) M_{n−1}(u − 1)] / (n − 1),
 *   M_n'(u) = M_{n−1}(u) − M_{n−1}(u − 1)
 * (Essmann et al. 1995, J. Chem. Phys. 103, 8577, Sec. III), and the closed forms of the alias sums of
 * their Fourier transforms that the influence function and the error estimate need.
 */

/** Orders the particle-mesh code accepts. */
export const BSPLINE_ORDER_MIN = 2;
export const BSPLINE_ORDER_MAX = 12;

/**
 * Weights of one particle for order p at fractional offset w ∈ [0, 1): v[s] = M_p(w + s) and (when dv is
 * given) dv[s] = M_p'(w + s), s = 0 … p−1 (grid units). A particle at mesh coordinate u = k + w puts
 * weight v[s] on grid point k − s. The weights sum to 1 (partition of unity) and the derivatives to 0.
 */
export function bsplineWeights(p: number, w: number, v: Float64Array, dv: Float64Array | null = null): void {
  v[0] = 1;
  for (let n = 2; n <= p; n++) {
    if (n === p && dv) {
      // M_p'(w + s) = M_{p−1}(w + s) − M_{p−1}(w + s − 1), with v holding M_{p−1} at s = 0 … p−2.
      dv[0] = v[0];
      for (let s = 1; s < p - 1; s++) dv[s] = v[s] - v[s - 1];
      dv[p - 1] = -v[p - 2];
    }
    const inv = 1 / (n - 1);
    v[n - 1] = (1 - w) * v[n - 2] * inv; // (n − w − (n−1)) M_{n−1}(w + n − 2); the first term is 0
    for (let s = n - 2; s >= 1; s--) v[s] = ((w + s) * v[s] + (n - w - s) * v[s - 1]) * inv;
    v[0] = w * v[0] * inv;
  }
}

/** M_p(u) for any real u (0 outside [0, p]); reference evaluation for tests and tables. */
export function bsplineValue(p: number, u: number): number {
  if (!(u > 0) || !(u < p)) return 0;
  const s = Math.floor(u);
  const v = new Float64Array(p);
  bsplineWeights(p, u - s, v);
  return v[s];
}

/** M_p at the integers 0 … p (M_p(0) = M_p(p) = 0). */
export function bsplineAtIntegers(p: number): Float64Array {
  const v = new Float64Array(p);
  bsplineWeights(p, 0, v);
  const out = new Float64Array(p + 1);
  for (let s = 0; s < p; s++) out[s] = v[s];
  return out;
}

/**
 * Closed forms of the alias sums of U(k) = sinc^p(kh/2) (the Fourier transform of the order-p
 * assignment function, normalised to U(0) = 1), at θ = kh ∈ [−π, π], by Poisson summation of the
 * autocorrelation M_p ⋆ M_p = M_{2p}(· + p) (independent derivation; checked against direct sums in tests):
 *   S(θ) = Σ_j U²(k + 2πj/h)                  = Σ_l M_{2p}(p + l) cos lθ
 *   T(θ) = Σ_j (k + 2πj/h)² U²(k + 2πj/h)     = −h⁻² Σ_l M_{2p}''(p + l) cos lθ
 * Returns the coefficient arrays c_S[l], c_T[l] for l = 0 … p−1 (cos lθ, the l and −l terms combined).
 */
export function bsplineAliasCoefficients(p: number): { s: Float64Array; t: Float64Array } {
  const m2p = bsplineAtIntegers(2 * p);
  const m2 = bsplineAtIntegers(2 * p - 2);
  const at2 = (u: number) => (u >= 0 && u <= 2 * p - 2 ? m2[u] : 0);
  const s = new Float64Array(p);
  const t = new Float64Array(p);
  for (let l = 0; l < p; l++) {
    const u = p + l;
    const second = at2(u) - 2 * at2(u - 1) + at2(u - 2); // M_{2p}''(u) = M_{2p−2}(u) − 2M_{2p−2}(u−1) + M_{2p−2}(u−2)
    const f = l === 0 ? 1 : 2;
    s[l] = f * m2p[u];
    t[l] = -f * second;
  }
  return { s, t };
}

/** Evaluates Σ_l c[l] cos(lθ). */
export function cosineSeries(c: Float64Array, theta: number): number {
  let sum = 0;
  for (let l = 0; l < c.length; l++) sum += c[l] * Math.cos(l * theta);
  return sum;
}

/**
 * |Σ_{l=0}^{p−2} M_p(l + 1) e^{iθl}|², the squared modulus of the Euler exponential spline that
 * interpolates e^{iθu} by B-splines; the SPME influence function divides by it (Essmann et al. 1995,
 * Sec. III, the factor |b(m)|² = 1 / this). Zero only for odd p at θ = π.
 */
export function bsplineEulerModulus2(p: number, theta: number): number {
  const m = bsplineAtIntegers(p);
  let re = 0, im = 0;
  for (let l = 0; l <= p - 2; l++) {
    re += m[l + 1] * Math.cos(theta * l);
    im += m[l + 1] * Math.sin(theta * l);
  }
  return re * re + im * im;
}

/** U(k) = [sin(kh/2)/(kh/2)]^p for θ = kh (1 at θ = 0). */
export function bsplineTransform(p: number, theta: number): number {
  const x = 0.5 * theta;
  if (Math.abs(x) < 1e-8) return 1;
  return Math.pow(Math.sin(x) / x, p);
}
