/**
 * Plain image sums over whole layers of cells normal to one axis (slab order): the partial sum of radius R
 * holds every cell with |n_axis| ≤ R, each layer summed over its whole plane.
 *
 * A layer of neutral cells (particles plus the background −ρ̄) is a 2D-periodic, neutral distribution; its
 * in-plane sum converges absolutely and is computed here to the tolerance by the 2D Ewald sum of a point
 * mass array (Parry 1975, Surf. Sci. 49, 433; Heyes, Barber & Clarke 1977, J. Chem. Soc. Faraday Trans. 2
 * 73, 1485). With in-plane separation ρ, normal separation h (target − source), cell area A, in-plane
 * reciprocal vectors g = 2π(h_u/L_u, h_v/L_v):
 *   ψ(ρ, h) = Σ_n∥ erfc(α r)/r
 *           + (π/A) Σ_{g≠0} cos(g·ρ)/g [e^{gh} erfc(g/2α + αh) + e^{−gh} erfc(g/2α − αh)]
 *           − (2π/A) [h erf(αh) + e^{−α²h²}/(α√π)],
 * and the acceleration a = G m ∇ψ; its normal component from the last term is −(2πGm/A) erf(αh). Layers
 * |n| ≥ 2 lie wholly above or below the target, where the neutral layer's field is the pure Fourier series
 * −(2πGm/A) Σ_{g≠0} e^{−g|h|} (ĝ sin(g·ρ), sign(h) cos(g·ρ)) (its g = 0 sheet terms cancel against the
 * background), evaluated through layer structure factors. Background slabs: the home layer's pushes the
 * target toward the mid-plane, 2πGρ̄(2w − L_w) along the axis; a layer above −2πGρ̄L_w, below +2πGρ̄L_w.
 * Without the background, each layer's in-plane sum is defined as its limit over growing discs, which is
 * the neutral layer minus its background slab.
 */
import { type Box, boxVolume, minimumImage } from '../box';
import { erfcScaled } from './erfcScaled';

export type SlabAxis = 0 | 1 | 2;

export interface SlabSetup {
  readonly axis: SlabAxis;
  readonly shells: number;
  readonly background: boolean;
  readonly G: number;
  /** Coordinates permuted so that w is the slab normal: in-plane u, v. */
  readonly u: Float64Array;
  readonly v: Float64Array;
  readonly w: Float64Array;
  readonly m: Float64Array;
  readonly lu: number;
  readonly lv: number;
  readonly lw: number;
  readonly meanDensity: number;
  /** 2D Ewald splitting parameter (1/length) and real-space cutoff (length). */
  readonly alpha: number;
  readonly rCut: number;
  /** Half-plane reciprocal vectors of the near layers: integer pairs, |g|, index into the distinct |g| list. */
  readonly gh: Int32Array;
  readonly gNorm: Float64Array;
  readonly gDistinct: Float64Array;
  readonly gClass: Int32Array;
  /** Far-layer reciprocal vectors (half plane) and their structure factors (see farLayers). */
  readonly fh: Int32Array;
  readonly fNorm: Float64Array;
  readonly farUp: Float64Array;
  readonly farDown: Float64Array;
  /** In-plane real-space image range per axis. */
  readonly ku: number;
  readonly kv: number;
}

const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);

function halfPlane(lu: number, lv: number, gMax: number): { h: Int32Array; norm: Float64Array } {
  const hu = Math.floor((gMax * lu) / (2 * Math.PI));
  const hv = Math.floor((gMax * lv) / (2 * Math.PI));
  const hs: number[] = [], ns: number[] = [];
  for (let b = 0; b <= hv; b++) {
    for (let a = -hu; a <= hu; a++) {
      if (b === 0 && a <= 0) continue;
      const gu = (2 * Math.PI * a) / lu, gv = (2 * Math.PI * b) / lv;
      const g = Math.hypot(gu, gv);
      if (g > gMax) continue;
      hs.push(a, b);
      ns.push(g);
    }
  }
  return { h: Int32Array.from(hs), norm: Float64Array.from(ns) };
}

/**
 * Prepares the slab-ordered sum: wrapped positions (flat xyz), masses, box, normal axis (0 = x, 1 = y,
 * 2 = z), largest layer index R, background on/off, G and tol (relative truncation of the in-plane sums);
 * `cutoffSides` sets the 2D Ewald real-space cutoff in shorter in-plane sides (the result must not depend on it).
 */
export function slabSetup(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  axis: SlabAxis,
  shells: number,
  background: boolean,
  G: number,
  tol: number,
  cutoffSides = 2,
): SlabSetup {
  const n = masses.length;
  const sides = [box.lx, box.ly, box.lz];
  const iu = (axis + 1) % 3, iv = (axis + 2) % 3;
  const lu = sides[iu], lv = sides[iv], lw = sides[axis];
  const u = new Float64Array(n), v = new Float64Array(n), w = new Float64Array(n);
  let M = 0;
  for (let j = 0; j < n; j++) {
    u[j] = positions[3 * j + iu];
    v[j] = positions[3 * j + iv];
    w[j] = positions[3 * j + axis];
    M += masses[j];
  }
  const lnTol = Math.log(1 / tol) + 3;
  const rCut = cutoffSides * Math.min(lu, lv);
  const alpha = Math.sqrt(lnTol) / rCut;
  const gMax = 2 * alpha * Math.sqrt(lnTol);
  const near = halfPlane(lu, lv, gMax);
  const distinct: number[] = [];
  const gClass = new Int32Array(near.norm.length);
  near.norm.forEach((g, q) => {
    let k = distinct.findIndex((d) => Math.abs(d - g) <= 1e-12 * g);
    if (k < 0) {
      k = distinct.length;
      distinct.push(g);
    }
    gClass[q] = k;
  });
  // Far layers (|n| ≥ 2): |h| ≥ L_w, so terms e^{−g L_w} below tol·e^{−3} are dropped.
  const far = halfPlane(lu, lv, lnTol / lw);
  const nf = far.norm.length;
  const farUp = new Float64Array(2 * nf), farDown = new Float64Array(2 * nf);
  for (let q = 0; q < nf; q++) {
    const gu = (2 * Math.PI * far.h[2 * q]) / lu, gv = (2 * Math.PI * far.h[2 * q + 1]) / lv, g = far.norm[q];
    let cu = 0, su = 0, cd = 0, sd = 0;
    for (let j = 0; j < n; j++) {
      const ph = gu * u[j] + gv * v[j];
      const c = Math.cos(ph), s = Math.sin(ph);
      const up = masses[j] * Math.exp(-g * w[j]);
      const down = masses[j] * Math.exp(-g * (lw - w[j]));
      cu += up * c;
      su += up * s;
      cd += down * c;
      sd += down * s;
    }
    farUp[2 * q] = cu;
    farUp[2 * q + 1] = su;
    farDown[2 * q] = cd;
    farDown[2 * q + 1] = sd;
  }
  return {
    axis,
    shells,
    background,
    G,
    u,
    v,
    w,
    m: Float64Array.from(masses),
    lu,
    lv,
    lw,
    meanDensity: M / boxVolume(box),
    alpha,
    rCut,
    gh: near.h,
    gNorm: near.norm,
    gDistinct: Float64Array.from(distinct),
    gClass,
    fh: far.h,
    fNorm: far.norm,
    farUp,
    farDown,
    ku: Math.ceil(rCut / lu + 0.5),
    kv: Math.ceil(rCut / lv + 0.5),
  };
}

/**
 * Field (per unit G, in-plane u, v and normal w) at the target of the three near layers n = −1, 0, 1 of
 * particles only (no background), by the 2D Ewald sum; adds into out[3(n+1) + ·]. Target row i.
 */
function nearLayers(st: SlabSetup, i: number, out: Float64Array): void {
  const { u, v, w, m, lu, lv, lw, alpha, rCut, gh, gNorm, gDistinct, gClass, ku, kv } = st;
  const n = m.length;
  const area = lu * lv;
  const rc2 = rCut * rCut;
  const a2 = alpha * alpha;
  const bu = (2 * Math.PI) / lu, bv = (2 * Math.PI) / lv;
  let hu = 0, hv = 0;
  for (let q = 0; q < gh.length; q += 2) {
    hu = Math.max(hu, Math.abs(gh[q]));
    hv = Math.max(hv, gh[q + 1]);
  }
  const cu = new Float64Array(hu + 1), su = new Float64Array(hu + 1), cv = new Float64Array(hv + 1), sv = new Float64Array(hv + 1);
  const nd = gDistinct.length;
  const pTab = new Float64Array(3 * nd), qTab = new Float64Array(3 * nd);
  const gE = gDistinct.map((g) => Math.exp(-(g * g) / (4 * a2)));
  const ng = gNorm.length;
  const ui = u[i], vi = v[i], wi = w[i];
  for (let j = 0; j < n; j++) {
    const du = minimumImage(ui - u[j], lu), dv = minimumImage(vi - v[j], lv);
    const mj = m[j];
    // real space, three layers
    for (let layer = -1; layer <= 1; layer++) {
      const h = wi - w[j] - layer * lw;
      if (h * h >= rc2) continue;
      let ax = 0, ay = 0, az = 0;
      for (let a = -ku; a <= ku; a++) {
        const ru = du + a * lu;
        for (let b = -kv; b <= kv; b++) {
          const rv = dv + b * lv;
          const r2 = ru * ru + rv * rv + h * h;
          if (r2 >= rc2 || r2 === 0) continue;
          const r = Math.sqrt(r2);
          const x = alpha * r;
          const e = Math.exp(-x * x);
          const f = (e * (erfcScaled(x) + TWO_OVER_SQRT_PI * x)) / (r2 * r);
          ax -= f * ru;
          ay -= f * rv;
          az -= f * h;
        }
      }
      const o = 3 * (layer + 1);
      out[o] += mj * ax;
      out[o + 1] += mj * ay;
      out[o + 2] += mj * az;
    }
    // Fourier: phases e^{i(a bu du + b bv dv)} from powers
    const c1u = Math.cos(bu * du), s1u = Math.sin(bu * du), c1v = Math.cos(bv * dv), s1v = Math.sin(bv * dv);
    cu[0] = 1; su[0] = 0; cv[0] = 1; sv[0] = 0;
    for (let k = 1; k <= hu; k++) {
      cu[k] = cu[k - 1] * c1u - su[k - 1] * s1u;
      su[k] = su[k - 1] * c1u + cu[k - 1] * s1u;
    }
    for (let k = 1; k <= hv; k++) {
      cv[k] = cv[k - 1] * c1v - sv[k - 1] * s1v;
      sv[k] = sv[k - 1] * c1v + cv[k - 1] * s1v;
    }
    for (let layer = -1; layer <= 1; layer++) {
      const h = wi - w[j] - layer * lw;
      const eh = Math.exp(-a2 * h * h);
      for (let k = 0; k < nd; k++) {
        const g = gDistinct[k];
        const E = gE[k] * eh;
        const x1 = g / (2 * alpha) + alpha * h; // e^{gh} erfc(x1)
        const x2 = g / (2 * alpha) - alpha * h; // e^{−gh} erfc(x2)
        const t1 = x1 >= 0 ? erfcScaled(x1) * E : 2 * Math.exp(g * h) - erfcScaled(-x1) * E;
        const t2 = x2 >= 0 ? erfcScaled(x2) * E : 2 * Math.exp(-g * h) - erfcScaled(-x2) * E;
        pTab[(layer + 1) * nd + k] = t1 + t2;
        qTab[(layer + 1) * nd + k] = t1 - t2;
      }
    }
    const pref = (2 * Math.PI * mj) / area; // half plane: 2 × π/A
    for (let q = 0; q < ng; q++) {
      const a = gh[2 * q], b = gh[2 * q + 1];
      const ca = cu[a < 0 ? -a : a], sa = a < 0 ? -su[-a] : su[a];
      const c = ca * cv[b] - sa * sv[b];
      const s = sa * cv[b] + ca * sv[b];
      const g = gNorm[q];
      const gu = (bu * a) / g, gv = (bv * b) / g;
      const k = gClass[q];
      for (let layer = 0; layer < 3; layer++) {
        const P = pTab[layer * nd + k], Q = qTab[layer * nd + k];
        out[3 * layer] -= pref * gu * s * P;
        out[3 * layer + 1] -= pref * gv * s * P;
        out[3 * layer + 2] += pref * c * Q;
      }
    }
    // g = 0
    for (let layer = -1; layer <= 1; layer++) {
      const h = wi - w[j] - layer * lw;
      const x = alpha * Math.abs(h);
      const erfAbs = 1 - erfcScaled(x) * Math.exp(-x * x);
      out[3 * (layer + 1) + 2] -= ((2 * Math.PI * mj) / area) * Math.sign(h) * erfAbs;
    }
  }
}

/**
 * Partial sums for targets[begin..end) (input rows): partial[(R·K + t)·3 + d] = acceleration (G·mass/
 * length², box axes x, y, z) of target t from all layers |n_axis| ≤ R, R = 0..shells, K = targets.length.
 */
export function slabTargets(st: SlabSetup, targets: Int32Array, begin: number, end: number, partial: Float64Array): void {
  const { lu, lv, lw, shells, fh, fNorm, farUp, farDown, G, axis } = st;
  const K = targets.length;
  const area = lu * lv;
  const nf = fNorm.length;
  const near = new Float64Array(9);
  const layerAcc = new Float64Array(3 * (shells + 1)); // per |n|: sum of layers n and −n (u, v, w)
  const iu = (axis + 1) % 3, iv = (axis + 2) % 3;
  const bgOn = st.background;
  const rho = st.meanDensity;
  for (let t = begin; t < end; t++) {
    const i = targets[t];
    const ui = st.u[i], vi = st.v[i], wi = st.w[i];
    near.fill(0);
    nearLayers(st, i, near);
    layerAcc.fill(0);
    // neutral layers: particles + background (home: 2πρ̄(2w − L); above −2πρ̄L; below +2πρ̄L, per unit G)
    layerAcc[0] = near[3];
    layerAcc[1] = near[4];
    layerAcc[2] = near[5] + 2 * Math.PI * rho * (2 * wi - lw);
    if (shells >= 1) {
      layerAcc[3] = near[0] + near[6];
      layerAcc[4] = near[1] + near[7];
      layerAcc[5] = near[2] + near[8]; // the backgrounds above (−2πρ̄L) and below (+2πρ̄L) cancel
    }
    // far layers |n| ≥ 2, pure Fourier with structure factors
    if (shells >= 2 && nf > 0) {
      for (let q = 0; q < nf; q++) {
        const gu = (2 * Math.PI * fh[2 * q]) / lu, gv = (2 * Math.PI * fh[2 * q + 1]) / lv, g = fNorm[q];
        const ph = gu * ui + gv * vi;
        const ci = Math.cos(ph), si = Math.sin(ph);
        // Σ_j m_j sin(g·(ρ_i − ρ_j)) e^{−g|h|} = f [si C − ci S];  cos: f [ci C + si S]
        const sinUp = si * farUp[2 * q] - ci * farUp[2 * q + 1];
        const cosUp = ci * farUp[2 * q] + si * farUp[2 * q + 1];
        const sinDn = si * farDown[2 * q] - ci * farDown[2 * q + 1];
        const cosDn = ci * farDown[2 * q] + si * farDown[2 * q + 1];
        const step = Math.exp(-g * lw);
        let fUp = Math.exp(-g * (2 * lw - wi)); // n = 2: e^{−g(n L − w_i)}
        let fDn = Math.exp(-g * (wi + lw)); // n = −2: e^{−g(w_i + (|n|−1)L)}
        const pref = (4 * Math.PI) / area; // half plane ×2, times 2π/A
        for (let nn = 2; nn <= shells; nn++) {
          if (fUp < 1e-300 && fDn < 1e-300) break;
          // above: h < 0 → sign(h) = −1; below: sign(h) = +1
          layerAcc[3 * nn] -= pref * (gu / g) * (fUp * sinUp + fDn * sinDn);
          layerAcc[3 * nn + 1] -= pref * (gv / g) * (fUp * sinUp + fDn * sinDn);
          layerAcc[3 * nn + 2] -= pref * (-fUp * cosUp + fDn * cosDn);
          fUp *= step;
          fDn *= step;
        }
      }
    }
    let au = 0, av = 0, aw = 0;
    for (let s = 0; s <= shells; s++) {
      au += layerAcc[3 * s];
      av += layerAcc[3 * s + 1];
      aw += layerAcc[3 * s + 2];
      const o = (s * K + t) * 3;
      partial[o + iu] = G * au;
      partial[o + iv] = G * av;
      // without background: remove the layers' background slabs (pairs ±n cancel; the home layer's remains)
      partial[o + axis] = G * (aw - (bgOn ? 0 : 2 * Math.PI * rho * (2 * wi - lw)));
    }
  }
}
