/**
 * Softened pair kernels derived independently from their DENSITY profiles by numerical quadrature
 * (tests/helpers/quadrature.ts), for a unit mass: force factor f(r) = M(<r)/r³ (acceleration −G m f r⃗) and
 * potential kernel ψ(r) = M(<r)/r + ∫_r^∞ 4π s ρ(s) ds (potential −G m ψ), from Poisson's equation for a
 * spherical density (Binney & Tremaine 2008, Galactic Dynamics, §2.2.1, eq. 2.28 — equation number from memory).
 */
import { integrate } from '../helpers/quadrature';

/** Cubic spline density W(r, h) of Monaghan & Lattanzio 1985 (A&A 149, 135), support h, unit mass. */
export function splineDensity(r: number, h: number): number {
  const u = r / h, c = 8 / (Math.PI * h * h * h);
  if (u < 0.5) return c * (1 - 6 * u * u + 6 * u * u * u);
  if (u < 1) return c * 2 * (1 - u) ** 3;
  return 0;
}

/** ∫_a^b g over [a, b] split at the spline's break point h/2 (so every piece is a polynomial: GL is exact). */
function splinePieces(g: (s: number) => number, a: number, b: number, h: number): number {
  if (!(b > a)) return 0;
  const m = h / 2;
  if (a < m && b > m) return integrate(g, a, m) + integrate(g, m, b);
  return integrate(g, a, b);
}

/** Spline enclosed mass M(<r) by quadrature of 4πs²W. */
export function splineEnclosedMass(r: number, h: number): number {
  return splinePieces((s) => 4 * Math.PI * s * s * splineDensity(s, h), 0, Math.min(r, h), h);
}

/** Spline force factor M(<r)/r³ (Newton 1/r³ beyond h). */
export function splineForceFactor(r: number, h: number): number {
  return splineEnclosedMass(r, h) / (r * r * r);
}

/** Spline potential kernel ψ(r) = M(<r)/r + ∫_r^h 4π s W ds (Newton 1/r beyond h). */
export function splinePotential(r: number, h: number): number {
  const outer = splinePieces((s) => 4 * Math.PI * s * splineDensity(s, h), Math.min(r, h), h, h);
  return splineEnclosedMass(r, h) / r + outer;
}

/** Plummer density 3/(4π ε³) (1 + r²/ε²)^{−5/2} (Plummer 1911, MNRAS 71, 460), unit mass. */
export function plummerDensity(r: number, eps: number): number {
  return (3 / (4 * Math.PI * eps ** 3)) * Math.pow(1 + (r * r) / (eps * eps), -2.5);
}

/** Plummer enclosed mass by quadrature of 4πs²ρ on panels of width ≤ ε/4. */
export function plummerEnclosedMass(r: number, eps: number): number {
  return integrate((s) => 4 * Math.PI * s * s * plummerDensity(s, eps), 0, r, Math.max(4, Math.ceil((4 * r) / eps)));
}

/** Plummer force factor M(<r)/r³ by quadrature. */
export function plummerForceFactor(r: number, eps: number): number {
  return plummerEnclosedMass(r, eps) / (r * r * r);
}

/**
 * Plummer potential kernel ψ(r) = M(<r)/r + ∫_r^∞ 4π s ρ ds; the outer integral in s = r + ε t/(1 − t),
 * t ∈ [0, 1), which maps the infinite range onto a finite one.
 */
export function plummerPotential(r: number, eps: number): number {
  const outer = integrate(
    (t) => {
      if (t >= 1) return 0;
      const s = r + (eps * t) / (1 - t);
      const ds = eps / ((1 - t) * (1 - t));
      return 4 * Math.PI * s * plummerDensity(s, eps) * ds;
    },
    0,
    1,
    64,
  );
  return plummerEnclosedMass(r, eps) / r + outer;
}
