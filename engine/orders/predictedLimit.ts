/**
 * What each summation order tends to (de Leeuw, Perram & Smith 1980, Proc. R. Soc. Lond. A 373, 27;
 * Smith 1981, Proc. R. Soc. Lond. A 375, 475): images added as whole neutral cells over growing copies of a
 * shape with depolarisation tensor N (trace 4π) give
 *   a_i = a_i(Ewald) + G N·D/V,                 D = Σ_j m_j (r_j − c) the box's mass dipole;
 * without the background in each cell the force tends instead to
 *   a_i = a_i(Ewald) − G ρ̄ N·(r_i − x_com) = a_i(Ewald) − (G/V) N·(M r_i − Σ_j m_j r_j)
 * (the second form stays defined when the masses sum to zero). The surface term is the field at the
 * shape's centre of the shape uniformly polarised with P = D/V.
 */
import { type Box, boxVolume } from '../box';

export type OrderShapeName = 'sphere' | 'cube' | 'slab-x' | 'slab-y' | 'slab-z' | 'screened';

/** Mass dipole D = Σ m_j (r_j − c) (mass·length) of wrapped positions (flat xyz) about the box centre c. */
export function boxDipole(positions: Float64Array, masses: Float64Array, box: Box): Float64Array {
  const c = [box.lx / 2, box.ly / 2, box.lz / 2];
  const d = new Float64Array(3);
  for (let j = 0; j < masses.length; j++) for (let k = 0; k < 3; k++) d[k] += masses[j] * (positions[3 * j + k] - c[k]);
  return d;
}

/**
 * Depolarisation tensor at the centre of a rectangular prism with half-sides (a, b, c), row-major 3×3:
 * N_xx = 2Ω_x = 8 atan(bc/(a√(a²+b²+c²))), Ω_x the solid angle of one x face seen from the centre (each
 * face carries surface density ±P_x and pulls with G·σ·Ω); cyclic for y, z. A cube gives (4π/3)I; the
 * trace is 4π for any prism.
 */
export function prismDepolarisation(a: number, b: number, c: number): Float64Array {
  const d = Math.sqrt(a * a + b * b + c * c);
  const n = new Float64Array(9);
  n[0] = 8 * Math.atan((b * c) / (a * d));
  n[4] = 8 * Math.atan((c * a) / (b * d));
  n[8] = 8 * Math.atan((a * b) / (c * d));
  return n;
}

/**
 * Depolarisation tensor (row-major 3×3, dimensionless) of the shape in which an order adds its cells:
 * sphere (4π/3)I; cube shells max|n_i| ≤ R form a prism similar to the box (prismDepolarisation with the
 * box sides; (4π/3)I for a cubic box); slab normal to axis e: 4π ee; screened: 0 (the limit is Ewald).
 */
export function orderDepolarisation(shape: OrderShapeName, box: Box): Float64Array {
  const n = new Float64Array(9);
  switch (shape) {
    case 'sphere':
      n[0] = n[4] = n[8] = (4 * Math.PI) / 3;
      return n;
    case 'cube':
      return prismDepolarisation(box.lx, box.ly, box.lz);
    case 'slab-x':
      n[0] = 4 * Math.PI;
      return n;
    case 'slab-y':
      n[4] = 4 * Math.PI;
      return n;
    case 'slab-z':
      n[8] = 4 * Math.PI;
      return n;
    case 'screened':
      return n;
  }
}

/**
 * Predicted limit (G·mass/length²) per target: ewald (3 per target, tin-foil accelerations of the same
 * targets) plus the surface term G N·D/V with the background, or minus G N·(M r_i − Σ m_j r_j)/V without
 * it; positions wrapped (flat xyz), targets input rows.
 */
export function predictedLimit(
  ewald: Float64Array,
  targets: Int32Array,
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  depolarisation: Float64Array,
  background: boolean,
  G: number,
): Float64Array {
  const V = boxVolume(box);
  const out = Float64Array.from(ewald);
  const D = boxDipole(positions, masses, box);
  let M = 0;
  const first = new Float64Array(3); // Σ m_j r_j
  for (let j = 0; j < masses.length; j++) {
    M += masses[j];
    for (let k = 0; k < 3; k++) first[k] += masses[j] * positions[3 * j + k];
  }
  const v = new Float64Array(3);
  for (let t = 0; t < targets.length; t++) {
    const i = targets[t];
    for (let k = 0; k < 3; k++) v[k] = background ? D[k] : -(M * positions[3 * i + k] - first[k]);
    for (let r = 0; r < 3; r++) {
      const nv = depolarisation[3 * r] * v[0] + depolarisation[3 * r + 1] * v[1] + depolarisation[3 * r + 2] * v[2];
      out[3 * t + r] += (G * nv) / V;
    }
  }
  return out;
}
