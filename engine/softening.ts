/**
 * Softened pair kernels. Conventions: an isolated mass m at distance r gives potential −G m ψ(r) and
 * acceleration −G m f(r) r⃗ (r⃗ points from the source to the target); Newton is ψ = 1/r, f = 1/r³.
 */

export type Softening =
  | { readonly kind: 'none' }
  /** Plummer: ψ = (r² + ε²)^{-1/2}, f = (r² + ε²)^{-3/2}; ε in length units. */
  | { readonly kind: 'plummer'; readonly eps: number }
  /** Cubic spline kernel (Monaghan & Lattanzio 1985) with compact support h; Newtonian for r ≥ h. */
  | { readonly kind: 'spline'; readonly h: number };

export const NO_SOFTENING: Softening = { kind: 'none' };

/** Checks a softening description; throws a RangeError that names the bad value. */
export function softeningValidate(s: Softening): Softening {
  if (s.kind === 'plummer' && !(s.eps > 0 && Number.isFinite(s.eps))) throw new RangeError(`Plummer softening length must be > 0, got ${s.eps}`);
  if (s.kind === 'spline' && !(s.h > 0 && Number.isFinite(s.h))) throw new RangeError(`spline softening support h must be > 0, got ${s.h}`);
  return s;
}

/**
 * Force factor f(r²) of the softened kernel (multiplies r⃗; Newton: 1/r³). Spline: for u = r/h,
 * f = g(u)/h³ with g = 32/3 − 192/5 u² + 32 u³ (u < ½), 64/3 − 48u + 192/5 u² − 32/3 u³ − 1/(15u³)
 * (½ ≤ u < 1), 1/u³ beyond: the enclosed mass of the M&L density W(u) = 8/(πh³)(1 − 6u² + 6u³ | 2(1−u)³).
 */
export function softenedForceFactor(s: Softening, r2: number): number {
  if (s.kind === 'plummer') {
    const q = r2 + s.eps * s.eps;
    return 1 / (q * Math.sqrt(q));
  }
  if (s.kind === 'spline') {
    const h = s.h;
    const r = Math.sqrt(r2);
    const u = r / h;
    const h3 = h * h * h;
    if (u < 0.5) return (32 / 3 + u * u * (-192 / 5 + 32 * u)) / h3;
    if (u < 1) return (64 / 3 - 48 * u + (192 / 5) * u * u - (32 / 3) * u * u * u - 1 / (15 * u * u * u)) / h3;
    return 1 / (r2 * r);
  }
  return 1 / (r2 * Math.sqrt(r2));
}

/**
 * Potential kernel ψ(r²) of the softened kernel (potential is −G m ψ; Newton: 1/r). Spline, u = r/h:
 * ψ = (14/5 − 16/3 u² + 48/5 u⁴ − 32/5 u⁵)/h (u < ½),
 * (16/5 − 1/(15u) − 32/3 u² + 16u³ − 48/5 u⁴ + 32/15 u⁵)/h (½ ≤ u < 1), 1/r beyond.
 */
export function softenedPotential(s: Softening, r2: number): number {
  if (s.kind === 'plummer') return 1 / Math.sqrt(r2 + s.eps * s.eps);
  if (s.kind === 'spline') {
    const h = s.h;
    const r = Math.sqrt(r2);
    const u = r / h;
    const u2 = u * u;
    if (u < 0.5) return (14 / 5 + u2 * (-16 / 3 + u2 * (48 / 5 - (32 / 5) * u))) / h;
    if (u < 1) return (16 / 5 - 1 / (15 * u) + u2 * (-32 / 3 + u * (16 + u * (-48 / 5 + (32 / 15) * u)))) / h;
    return 1 / r;
  }
  return 1 / Math.sqrt(r2);
}

/** Radius beyond which the kernel is Newtonian (spline: h; Plummer: never, returns Infinity; none: 0). */
export function softeningSupport(s: Softening): number {
  return s.kind === 'spline' ? s.h : s.kind === 'plummer' ? Infinity : 0;
}
