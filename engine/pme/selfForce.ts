/**
 * Removal of the mesh self-force. With analytic differentiation a particle's own mesh charge pushes it
 * with a force that depends on where it sits inside its mesh cell (zero on average). For a particle of
 * mass m at mesh coordinate u, the field of its own charge is
 *   f(u) = ½ ∇ (1/V) Σ_k Ĝ(k) |ρ̂(k)|²,   |ρ̂(k)|² = Π_d P(θ_d, w_d),   P(θ, w) = |Σ_s M_p(w + s) e^{iθs}|²
 * (w_d the fractional part of u_d; ρ̂ the mesh transform of one unit charge; our derivation from
 * spread.ts and influence.ts). P averages to the alias sum S(θ) over a cell. Keeping the fluctuation of
 * one axis at a time and the average along the other two,
 *   f_d(w) = (1/2h_d) Σ_{k_d} R_d(k_d) ∂_w P(θ_d, w),   R_d(k_d) = Σ_{other axes} (Ĝ/V)·S·S,
 * which is tabulated per axis and subtracted (m·f_d) from each particle's mesh acceleration; the products
 * of fluctuations along two axes are left (second order). The same idea, removing the self-interaction
 * of particle-mesh schemes by its Fourier series, is in Ballenegger, Cerdà & Holm (2011, Comput. Phys.
 * Commun. 182, 1919; quoted from memory).
 */
import { type Box, boxSides } from '../box';
import { bsplineAliasCoefficients, cosineSeries } from './bspline';
import { type InfluenceTables, meshFrequency } from './influence';
import { type MeshGeometry } from './spread';

/** Points per axis of the tabulated self-field over one cell, w ∈ [0, 1]. */
export const SELF_TABLE_POINTS = 256;

export interface SelfForceTables {
  /** f_d(w) at w = j / SELF_TABLE_POINTS, j = 0 … SELF_TABLE_POINTS (raw acceleration per unit mass). */
  readonly f: [Float64Array, Float64Array, Float64Array];
}

function axisWeights(p: number, w: number, v: Float64Array, d: Float64Array): void {
  v[0] = 1;
  for (let k = 2; k <= p; k++) {
    if (k === p) {
      d[0] = v[0];
      for (let s = 1; s < p - 1; s++) d[s] = v[s] - v[s - 1];
      d[p - 1] = -v[p - 2];
    }
    const inv = 1 / (k - 1);
    v[k - 1] = (1 - w) * v[k - 2] * inv;
    for (let s = k - 2; s >= 1; s--) v[s] = ((w + s) * v[s] + (k - w - s) * v[s - 1]) * inv;
    v[0] = w * v[0] * inv;
  }
}

/** Builds the self-field tables for a mesh n, order p and influence tables (one pass over k-space). */
export function selfForceTables(n: [number, number, number], box: Box, p: number, tab: InfluenceTables): SelfForceTables {
  const sides = boxSides(box);
  const coef = bsplineAliasCoefficients(p);
  const len = [n[0] / 2 + 1, n[1], n[2]];
  const S = [0, 1, 2].map((d) => Float64Array.from({ length: len[d] }, (_, i) => cosineSeries(coef.s, (2 * Math.PI * meshFrequency(i, n[d])) / n[d])));
  // Axis 0 holds k0 ≥ 0 only: interior modes stand for ±k0 (weight 2).
  const w0 = Float64Array.from({ length: len[0] }, (_, i) => (i === 0 || 2 * i === n[0] ? 1 : 2));
  const R = [new Float64Array(len[0]), new Float64Array(len[1]), new Float64Array(len[2])];
  const [a0, a1, a2] = tab.a;
  const [t0, t1, t2] = tab.t;
  // Axes 1 and 2 hold all signed modes, and every table is even in the mode (a function of θ²): sum over
  // i ≤ n/2 with multiplicity 2 for the modes that have a mirror image n − i, then copy to the mirrors.
  const half1 = Math.floor(n[1] / 2), half2 = Math.floor(n[2] / 2);
  const mult = (i: number, nd: number) => (i === 0 || 2 * i === nd ? 1 : 2);
  for (let i0 = 0; i0 < len[0]; i0++) {
    for (let i1 = 0; i1 <= half1; i1++) {
      const m1 = mult(i1, n[1]);
      const c01 = tab.scale * a0[i0] * a1[i1];
      const t01 = t0[i0] + t1[i1];
      for (let i2 = 0; i2 <= half2; i2++) {
        const den = t01 + t2[i2];
        if (!(den > 0)) continue;
        const m2 = mult(i2, n[2]);
        const g = (c01 * a2[i2]) / den;
        R[0][i0] += m1 * m2 * g * S[1][i1] * S[2][i2];
        R[1][i1] += m2 * w0[i0] * g * S[0][i0] * S[2][i2];
        R[2][i2] += m1 * w0[i0] * g * S[0][i0] * S[1][i1];
      }
    }
  }
  for (let i1 = half1 + 1; i1 < n[1]; i1++) R[1][i1] = R[1][n[1] - i1];
  for (let i2 = half2 + 1; i2 < n[2]; i2++) R[2][i2] = R[2][n[2] - i2];
  const v = new Float64Array(p), dv = new Float64Array(p);
  const f = [0, 1, 2].map((d) => {
    const h = sides[d] / n[d];
    // e^{iθs} for every mode of this axis and s < p, weighted by the mode's R (and multiplicity).
    const cs = new Float64Array(len[d] * p), sn = new Float64Array(len[d] * p);
    for (let i = 0; i < len[d]; i++) {
      const theta = (2 * Math.PI * meshFrequency(i, n[d])) / n[d];
      const wr = (d === 0 ? w0[i] : 1) * R[d][i];
      for (let s = 0; s < p; s++) {
        cs[i * p + s] = Math.cos(theta * s);
        sn[i * p + s] = Math.sin(theta * s);
      }
      R[d][i] = wr;
    }
    const table = new Float64Array(SELF_TABLE_POINTS + 1);
    for (let j = 0; j <= SELF_TABLE_POINTS; j++) {
      axisWeights(p, Math.min(j / SELF_TABLE_POINTS, 1 - 1e-15), v, dv);
      let sum = 0;
      for (let i = 0; i < len[d]; i++) {
        // ∂_w |Σ v_s e^{iθs}|² = 2 Re[(Σ dv_s e^{iθs}) · conj(Σ v_s e^{iθs})]
        let vr = 0, vi = 0, dr = 0, di = 0;
        const o = i * p;
        for (let s = 0; s < p; s++) {
          vr += v[s] * cs[o + s];
          vi += v[s] * sn[o + s];
          dr += dv[s] * cs[o + s];
          di += dv[s] * sn[o + s];
        }
        sum += R[d][i] * 2 * (dr * vr + di * vi);
      }
      table[j] = sum / (2 * h);
    }
    return table;
  }) as [Float64Array, Float64Array, Float64Array];
  return { f };
}

/** Subtracts m·f_d(w_d) from the mesh accelerations of sorted particles [begin, end) (raw sums). */
export function selfForceRemove(tables: SelfForceTables, geo: MeshGeometry, xyzm: Float64Array, begin: number, end: number, accSorted: Float64Array): void {
  const T = SELF_TABLE_POINTS;
  const [f0, f1, f2] = tables.f;
  const [s0, s1, s2] = geo.inv;
  for (let i = begin; i < end; i++) {
    const m = xyzm[4 * i + 3];
    const ux = xyzm[4 * i] * s0, uy = xyzm[4 * i + 1] * s1, uz = xyzm[4 * i + 2] * s2;
    let q = (ux - Math.floor(ux)) * T;
    let k = Math.min(T - 1, Math.floor(q));
    accSorted[3 * i] -= m * (f0[k] + (q - k) * (f0[k + 1] - f0[k]));
    q = (uy - Math.floor(uy)) * T;
    k = Math.min(T - 1, Math.floor(q));
    accSorted[3 * i + 1] -= m * (f1[k] + (q - k) * (f1[k + 1] - f1[k]));
    q = (uz - Math.floor(uz)) * T;
    k = Math.min(T - 1, Math.floor(q));
    accSorted[3 * i + 2] -= m * (f2[k] + (q - k) * (f2[k + 1] - f2[k]));
  }
}
