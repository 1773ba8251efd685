/**
 * Potential and field of a homogeneous rectangular box in closed form (the prism formulas of Nagy 1966,
 * Geophysics 31, 362; Banerjee & Das Gupta 1977, Geophysics 42, 1053), written so that points on the
 * box's faces, edges and corners are exact limits rather than 0·∞ or atan(0/0).
 *
 * With (x, y, z) = source point − field point and r = |(x, y, z)|, the antiderivatives are
 *   H(x, y, z) = y ln(z + r) + z ln(y + r) − x atan(yz / (x r))                (∂y∂z H = 1/r)
 *   F(x, y, z) = xy ln(z + r) + yz ln(x + r) + zx ln(y + r)
 *              − x²/2 atan(yz/(xr)) − y²/2 atan(zx/(yr)) − z²/2 atan(xy/(zr))   (∂x∂y∂z F = 1/r)
 * and a box integral is the alternating sum over its 8 corners, [[[f]]] = Σ ±f (+ at the upper end of each
 * axis). The field per unit Gρ is ∫ (s − P)/|s − P|³ dV: its x component is −[[[H(x, y, z)]]] (∫ x/r³ dx =
 * −1/r), y and z by cyclic permutation; the potential per unit Gρ is −∫ dV/|s − P| = −[[[F]]].
 * Branches: y ln(z + r) → 0 when y = 0, and for z < 0 it uses z + r = (x² + y²)/(r − z) (no cancellation);
 * x atan(…/x) → 0 when x = 0. The corner sums cancel for distant points: the relative rounding error grows
 * like ε·(distance/side)², fine out to ~10⁴ sides.
 */

/** y ln(z + r), continuous at y = 0 and free of cancellation for z < 0. */
function yLogZR(x: number, y: number, z: number, r: number): number {
  if (y === 0) return 0;
  if (z >= 0) return y * Math.log(z + r);
  return y * Math.log((x * x + y * y) / (r - z));
}

/** x atan(yz/(x r)), continuous at x = 0 (→ 0). */
function xAtan(x: number, y: number, z: number, r: number): number {
  if (x === 0) return 0;
  return x * Math.atan((y * z) / (x * r));
}

/**
 * Field of the homogeneous box [x1,x2]×[y1,y2]×[z1,z2] at (px, py, pz) per unit Gρ (length units; the
 * acceleration is Gρ times this, pointing toward the box for positive ρ), written to out[o..o+2]. Finite and
 * continuous everywhere, including points on faces, edges and corners.
 */
export function uniformBoxField(
  px: number,
  py: number,
  pz: number,
  x1: number,
  x2: number,
  y1: number,
  y2: number,
  z1: number,
  z2: number,
  out: Float64Array,
  o = 0,
): void {
  const xs = [x1 - px, x2 - px];
  const ys = [y1 - py, y2 - py];
  const zs = [z1 - pz, z2 - pz];
  let ax = 0, ay = 0, az = 0;
  for (let i = 0; i < 2; i++) {
    const x = xs[i];
    for (let j = 0; j < 2; j++) {
      const y = ys[j];
      for (let k = 0; k < 2; k++) {
        const z = zs[k];
        const r = Math.sqrt(x * x + y * y + z * z);
        if (r === 0) continue; // a corner at the point: every term is 0 there
        const hx = yLogZR(x, y, z, r) + yLogZR(x, z, y, r) - xAtan(x, y, z, r);
        const hy = yLogZR(y, z, x, r) + yLogZR(y, x, z, r) - xAtan(y, z, x, r);
        const hz = yLogZR(z, x, y, r) + yLogZR(z, y, x, r) - xAtan(z, x, y, r);
        const w = (i + j + k) % 2 === 1 ? 1 : -1; // (+1 upper, −1 lower) per axis: (−1)^(3 − i − j − k)
        ax -= w * hx;
        ay -= w * hy;
        az -= w * hz;
      }
    }
  }
  out[o] = ax;
  out[o + 1] = ay;
  out[o + 2] = az;
}

/**
 * ∫ dV / |s − P| over the box [x1,x2]×[y1,y2]×[z1,z2] at P = (px, py, pz) (length²): the potential of the
 * homogeneous box is φ = −Gρ times this (φ = −Gm/r convention). Finite and continuous everywhere.
 */
export function uniformBoxInverseDistanceIntegral(
  px: number,
  py: number,
  pz: number,
  x1: number,
  x2: number,
  y1: number,
  y2: number,
  z1: number,
  z2: number,
): number {
  const xs = [x1 - px, x2 - px];
  const ys = [y1 - py, y2 - py];
  const zs = [z1 - pz, z2 - pz];
  let total = 0;
  for (let i = 0; i < 2; i++) {
    const x = xs[i];
    for (let j = 0; j < 2; j++) {
      const y = ys[j];
      for (let k = 0; k < 2; k++) {
        const z = zs[k];
        const r = Math.sqrt(x * x + y * y + z * z);
        if (r === 0) continue;
        const f =
          x * yLogZR(x, y, z, r) + y * yLogZR(y, z, x, r) + z * yLogZR(z, x, y, r) -
          0.5 * x * xAtan(x, y, z, r) - 0.5 * y * xAtan(y, z, x, r) - 0.5 * z * xAtan(z, x, y, r);
        const w = (i + j + k) % 2 === 1 ? 1 : -1;
        total += w * f;
      }
    }
  }
  return total;
}
