/**
 * Multipole lattice sums of the simple cubic lattice, S_l(û) = Σ_{n ∈ Z³, n ≠ 0} P_l(û·n̂) / |n|^{l+1}, for
 * even l ≥ 4 (absolutely convergent: terms ~ |n|^{−l−1}, shells ~ |n|²). With the addition theorem
 * 1/|x − n| = Σ_l r^l P_l(x̂·n̂) / |n|^{l+1} (|x| < |n|; e.g. Jackson, Classical Electrodynamics, eq. 3.38),
 * the periodic kernel of a cube of side L near a source is
 *   ψ(x) = 1/r + ξ + (2π/3)(r²/L³) + Σ_{l = 4, 6, …} (r/L)^l S_l(r̂) / L,
 * the odd l vanishing by inversion symmetry and the l = 2 image sum by cubic symmetry (its place taken by the
 * background term). Summed directly over the ball |n| ≤ R; the neglected shells contribute ≲ R^{−2}.
 */

function legendre(l: number, c: number): number {
  let p0 = 1, p1 = c;
  if (l === 0) return 1;
  for (let k = 1; k < l; k++) {
    const p2 = ((2 * k + 1) * c * p1 - k * p0) / (k + 1);
    p0 = p1;
    p1 = p2;
  }
  return p1;
}

/** S_l(û) for a unit vector û by direct summation over 0 < |n| ≤ R. */
export function cubicLatticeMultipoleSum(l: number, u: readonly number[], R = 64): number {
  let s = 0;
  const R2 = R * R;
  for (let x = -R; x <= R; x++) {
    for (let y = -R; y <= R; y++) {
      for (let z = -R; z <= R; z++) {
        const n2 = x * x + y * y + z * z;
        if (n2 === 0 || n2 > R2) continue;
        const n = Math.sqrt(n2);
        s += legendre(l, (u[0] * x + u[1] * y + u[2] * z) / n) / Math.pow(n, l + 1);
      }
    }
  }
  return s;
}
