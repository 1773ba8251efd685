/**
 * Cartesian multipole machinery for whole image cells (Taylor expansion of 1/|s + u| in u; e.g. the
 * Cartesian formulation of the fast multipole method, Greengard & Rokhlin 1987, J. Comput. Phys. 73, 325).
 *
 * A cell's sources sit at s + y_j (s its centre's offset from the home cell centre, y_j relative to the
 * cell centre); the target sits at δ from the home centre. With u = y − δ,
 *   Σ_j m_j / |s + y_j − δ| = Σ_α (1/α!) ∂^α(1/r)(s) Σ_j m_j (y_j − δ)^α
 *                            = Σ_γ Λ_γ (−δ)^γ/γ!,   Λ_γ = Σ_β (M_β/β!) S_{β+γ},
 * with raw moments M_β = Σ_j m_j y_j^β and S_α = Σ_cells ∂^α(1/r)(s) summed over a whole shell of cells.
 * The truncation at |α| ≤ p leaves a relative error of order (|u|/|s|)^(p+1) per cell.
 *
 * Multi-indices α = (a, b, c) with |α| = a + b + c ≤ p are numbered by total degree (all of degree 0, then
 * 1, …); tables are built for the largest order used.
 */

export interface MultiIndex {
  /** Largest total degree. */
  readonly order: number;
  /** Number of multi-indices with |α| ≤ order. */
  readonly count: number;
  /** Components per index. */
  readonly a: Uint8Array;
  readonly b: Uint8Array;
  readonly c: Uint8Array;
  /** 1/(a! b! c!) per index. */
  readonly invFactorial: Float64Array;
  /** Index of (a, b, c): lookup[(a·(order+1) + b)·(order+1) + c], −1 when |α| > order. */
  readonly lookup: Int32Array;
  /** First index of each total degree t (length order + 2). */
  readonly degreeStart: Int32Array;
  /**
   * Recurrence plan for index α (|α| ≥ 1): reduce along axis step[α] (0, 1, 2): prev = α − e, prev2 =
   * α − 2e (−1 if none), mult = α_e − 1.
   */
  readonly step: Uint8Array;
  readonly prev: Int32Array;
  readonly prev2: Int32Array;
  readonly mult: Float64Array;
}

/** Number of multi-indices of total degree ≤ p: (p+1)(p+2)(p+3)/6. */
export function multiIndexCount(p: number): number {
  return ((p + 1) * (p + 2) * (p + 3)) / 6;
}

/** Builds the multi-index table for total degree ≤ order. */
export function multiIndexBuild(order: number): MultiIndex {
  const count = multiIndexCount(order);
  const a = new Uint8Array(count), b = new Uint8Array(count), c = new Uint8Array(count);
  const invFactorial = new Float64Array(count);
  const q = order + 1;
  const lookup = new Int32Array(q * q * q).fill(-1);
  const degreeStart = new Int32Array(order + 2);
  const fact = [1];
  for (let k = 1; k <= order; k++) fact.push(fact[k - 1] * k);
  let n = 0;
  for (let t = 0; t <= order; t++) {
    degreeStart[t] = n;
    for (let i = t; i >= 0; i--) {
      for (let j = t - i; j >= 0; j--) {
        const k = t - i - j;
        a[n] = i;
        b[n] = j;
        c[n] = k;
        invFactorial[n] = 1 / (fact[i] * fact[j] * fact[k]);
        lookup[(i * q + j) * q + k] = n;
        n++;
      }
    }
  }
  degreeStart[order + 1] = n;
  const step = new Uint8Array(count), prev = new Int32Array(count).fill(-1), prev2 = new Int32Array(count).fill(-1);
  const mult = new Float64Array(count);
  for (let idx = 1; idx < count; idx++) {
    const e = [a[idx], b[idx], c[idx]];
    const ax = e[0] > 0 ? 0 : e[1] > 0 ? 1 : 2;
    step[idx] = ax;
    mult[idx] = e[ax] - 1;
    e[ax]--;
    prev[idx] = lookup[(e[0] * q + e[1]) * q + e[2]];
    if (e[ax] > 0) {
      e[ax]--;
      prev2[idx] = lookup[(e[0] * q + e[1]) * q + e[2]];
    }
  }
  return { order, count, a, b, c, invFactorial, lookup, degreeStart, step, prev, prev2, mult };
}

/** Index of (i, j, k) in the table (−1 if its degree exceeds the table's order). */
export function multiIndexOf(mi: MultiIndex, i: number, j: number, k: number): number {
  const q = mi.order + 1;
  if (i + j + k > mi.order) return -1;
  return mi.lookup[(i * q + j) * q + k];
}

/**
 * Adds m·y^β/β! for every |β| ≤ mi.order to out (the scaled raw moment of one point mass m at y, length
 * units relative to the expansion centre).
 */
export function momentsAddPoint(mi: MultiIndex, m: number, yx: number, yy: number, yz: number, out: Float64Array, pow: Float64Array): void {
  const p = mi.order;
  const q = p + 1;
  pow[0] = 1;
  pow[q] = 1;
  pow[2 * q] = 1;
  for (let k = 1; k <= p; k++) {
    pow[k] = pow[k - 1] * yx;
    pow[q + k] = pow[q + k - 1] * yy;
    pow[2 * q + k] = pow[2 * q + k - 1] * yz;
  }
  const { a, b, c, invFactorial, count } = mi;
  for (let n = 0; n < count; n++) out[n] += m * invFactorial[n] * pow[a[n]] * pow[q + b[n]] * pow[2 * q + c[n]];
}

/**
 * Scaled moments ∫ ρ y^β/β! dV of a homogeneous box of density ρ centred on the origin with sides
 * (lx, ly, lz), added to out: ρ Π_d 2 (l_d/2)^(β_d+1)/(β_d+1) for all-even β, 0 otherwise.
 */
export function momentsAddUniformBox(mi: MultiIndex, rho: number, lx: number, ly: number, lz: number, out: Float64Array): void {
  const axis = (l: number, e: number) => (e % 2 === 1 ? 0 : (2 * Math.pow(l / 2, e + 1)) / (e + 1));
  for (let n = 0; n < mi.count; n++) {
    const v = axis(lx, mi.a[n]) * axis(ly, mi.b[n]) * axis(lz, mi.c[n]);
    if (v !== 0) out[n] += rho * mi.invFactorial[n] * v;
  }
}

/**
 * Derivatives ∂^α (1/r) at s = (x, y, z) for every |α| ≤ p (p ≤ mi.order), written to out[index(α)], by the
 * McMurchie–Davidson recurrence (McMurchie & Davidson 1978, J. Comput. Phys. 26, 218) in its point limit:
 *   R^(n)_000 = (−1)^n (2n−1)!! / r^(2n+1),   R^(n)_{α+e_x} = x R^(n+1)_α + α_x R^(n+1)_{α−e_x},
 * and ∂^α(1/r) = R^(0)_α. `work` must hold (mi.order+1)·mi.count numbers (layout α·(order+1) + n).
 */
export function inverseDistanceDerivatives(mi: MultiIndex, p: number, x: number, y: number, z: number, out: Float64Array, work: Float64Array): void {
  const { degreeStart, step, prev, prev2, mult } = mi;
  const q = mi.order + 1;
  const r2 = x * x + y * y + z * z;
  const inv2 = 1 / r2;
  // R^(n)_000 for n = 0..p
  let v = 1 / Math.sqrt(r2);
  for (let n = 0; n <= p; n++) {
    work[n] = v;
    v *= -(2 * n + 1) * inv2;
  }
  for (let t = 1; t <= p; t++) {
    const top = p - t;
    for (let idx = degreeStart[t]; idx < degreeStart[t + 1]; idx++) {
      const ax = step[idx];
      const coord = ax === 0 ? x : ax === 1 ? y : z;
      const o = idx * q, o1 = prev[idx] * q + 1, p2 = prev2[idx];
      if (p2 < 0) {
        for (let n = 0; n <= top; n++) work[o + n] = coord * work[o1 + n];
      } else {
        const o2 = p2 * q + 1, k = mult[idx];
        for (let n = 0; n <= top; n++) work[o + n] = coord * work[o1 + n] + k * work[o2 + n];
      }
    }
  }
  const end = degreeStart[p + 1];
  for (let idx = 0; idx < end; idx++) out[idx] = work[idx * q];
}

/**
 * Local coefficients Λ_γ = Σ_β Mβ S_{β+γ} over |β| + |γ| ≤ p with scaled moments Mβ = M_β/β! (see the file
 * comment), for 1 ≤ |γ| ≤ p; only index pairs whose sum is even in every component are visited (the shell
 * sums S vanish otherwise, by the mirror symmetry of every shell). Writes out[0..count(p)).
 */
export function localFromShell(mi: MultiIndex, p: number, scaledMoments: Float64Array, shellSums: Float64Array, out: Float64Array): void {
  const { a, b, c, lookup, degreeStart } = mi;
  const q = mi.order + 1;
  out.fill(0, 0, degreeStart[p + 1]);
  for (let g = degreeStart[1]; g < degreeStart[p + 1]; g++) {
    const gi = a[g], gj = b[g], gk = c[g];
    const tg = gi + gj + gk;
    let sum = 0;
    for (let be = 0; be < degreeStart[p - tg + 1]; be++) {
      const bi = a[be], bj = b[be], bk = c[be];
      if (((bi ^ gi) | (bj ^ gj) | (bk ^ gk)) & 1) continue;
      const mb = scaledMoments[be];
      if (mb === 0) continue;
      sum += mb * shellSums[lookup[((bi + gi) * q + bj + gj) * q + bk + gk]];
    }
    out[g] = sum;
  }
}

/**
 * Monomials (−δ)^γ/γ! for |γ| ≤ p (p ≤ mi.order), the target side of the local expansion; δ in length units
 * from the expansion centre. `pow` needs 3(mi.order+1) numbers.
 */
export function localMonomials(mi: MultiIndex, p: number, dx: number, dy: number, dz: number, out: Float64Array, pow: Float64Array): void {
  const q = mi.order + 1;
  pow[0] = 1;
  pow[q] = 1;
  pow[2 * q] = 1;
  for (let k = 1; k <= p; k++) {
    pow[k] = -pow[k - 1] * dx;
    pow[q + k] = -pow[q + k - 1] * dy;
    pow[2 * q + k] = -pow[2 * q + k - 1] * dz;
  }
  const { a, b, c, invFactorial, degreeStart } = mi;
  for (let n = 0; n < degreeStart[p + 1]; n++) out[n] = invFactorial[n] * pow[a[n]] * pow[q + b[n]] * pow[2 * q + c[n]];
}

/**
 * Field coefficients of one shell: fd[3γ' + d] = −Λ_{γ'+e_d} for |γ'| ≤ p − 1, so that the field of the
 * shell at δ, ∇_δ Σ_γ Λ_γ (−δ)^γ/γ!, is Σ_γ' fd[3γ' + d] (−δ)^γ'/γ'! (per unit G; a = G × this).
 */
export function fieldCoefficients(mi: MultiIndex, p: number, local: Float64Array, out: Float64Array): void {
  const { a, b, c, lookup, degreeStart } = mi;
  const q = mi.order + 1;
  for (let g = 0; g < degreeStart[p]; g++) {
    const i = a[g], j = b[g], k = c[g];
    out[3 * g] = -local[lookup[((i + 1) * q + j) * q + k]];
    out[3 * g + 1] = -local[lookup[(i * q + j + 1) * q + k]];
    out[3 * g + 2] = -local[lookup[(i * q + j) * q + k + 1]];
  }
}
