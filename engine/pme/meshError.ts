/**
 * Rms force error of the mesh part, from the pair-error functional of Deserno & Holm (1998, J. Chem.
 * Phys. 109, 7694, Sec. II, after Hockney & Eastwood 1988, Ch. 8): for uncorrelated sources the
 * acceleration error of a particle has mean square ΔA² = G² (Σ_j m_j² / V)·Q, where
 *   Q = ⟨∫_V d³r |F(r₁; r₁ − r) − R(r)|²⟩_{r₁ in a mesh cell}
 * compares the mesh pair force F with the exact Fourier-space Ewald force R (FT: ik φ̃(k),
 * φ̃ = 4π e^{−k²/4α²}/k²). Working it out for assignment U(k) = Π_d sinc^p(k_d h_d/2), influence
 * function Ĝ and analytic differentiation (our derivation; same structure as their Eq. for ik
 * differentiation with D(k) replaced by ik_m inside the alias sum):
 *   Q = (1/V) Σ_{k ∈ mesh} [ A − 2ĜB + Ĝ²C ],   A = Σ_m |k_m|² φ̃²(k_m),
 *   B = Σ_m U²(k_m)|k_m|² φ̃(k_m) = 4π Π_d σ_d,   C = [Σ_m |k_m|² U²(k_m)]·[Σ_m U²(k_m)],
 * k_m = k + 2πm/h. A − 2ĜB + Ĝ²C = D + C(Ĝ − B/C)² with D = A − B²/C ≥ 0, so Ĝ = B/C is optimal.
 * D is evaluated without cancellation by splitting off the m = 0 terms analytically (see dTimesC).
 * The sum over the Brillouin zone is exact for small meshes and a midpoint rule in θ = kh otherwise.
 */
import { type Box, boxSides } from '../box';
import { bsplineEulerModulus2, bsplineTransform } from './bspline';
import { ALIAS_TERMS, type InfluenceKind } from './influence';

/** Per-axis data at one θ sample. */
interface AxisSample {
  weight: number;
  /** Principal (j = 0) terms and alias remainders (j ≠ 0) of S = ΣU², T = Σk²U², σ = ΣU²e^{−k²/4α²}. */
  s0: number; s1: number;
  t0: number; t1: number;
  g0: number; g1: number;
  /** k of the principal term and the SPME influence factor e^{−k²/4α²}/|b̃|². */
  k: number;
  spme: number;
  /** For A: k_j² and e^{−k_j²/2α²} for j = −J … J (J = 2). */
  kj2: Float64Array;
  ej: Float64Array;
}

const J_A = 2;

function axisSample(p: number, theta: number, h: number, alpha: number, weight: number): AxisSample {
  const a2 = alpha * alpha;
  let s1 = 0, t1 = 0, g1 = 0;
  for (let j = -ALIAS_TERMS; j <= ALIAS_TERMS; j++) {
    if (j === 0) continue;
    const th = theta + 2 * Math.PI * j;
    const k = th / h;
    const u = bsplineTransform(p, th);
    const u2 = u * u;
    s1 += u2;
    t1 += k * k * u2;
    g1 += u2 * Math.exp(-(k * k) / (4 * a2));
  }
  const k = theta / h;
  const u0 = bsplineTransform(p, theta);
  const s0 = u0 * u0;
  const kj2 = new Float64Array(2 * J_A + 1);
  const ej = new Float64Array(2 * J_A + 1);
  for (let j = -J_A; j <= J_A; j++) {
    const kk = (theta + 2 * Math.PI * j) / h;
    kj2[j + J_A] = kk * kk;
    ej[j + J_A] = Math.exp(-(kk * kk) / (2 * a2));
  }
  const euler = bsplineEulerModulus2(p, theta);
  return {
    weight,
    s0, s1,
    t0: k * k * s0, t1,
    g0: s0 * Math.exp(-(k * k) / (4 * a2)), g1,
    k,
    spme: euler > 1e-12 ? Math.exp(-(k * k) / (4 * a2)) / euler : 0,
    kj2, ej,
  };
}

/** xyz − x₀y₀z₀ for x = x₀ + x₁ etc., without cancellation (all parts ≥ 0). */
function productRemainder(x0: number, x1: number, y0: number, y1: number, z0: number, z1: number): number {
  return x1 * (y0 + y1) * (z0 + z1) + x0 * y1 * (z0 + z1) + x0 * y0 * z1;
}

/** The summand A − 2ĜB + Ĝ²C at one 3D sample (k ≠ 0), for the given influence kind. */
function summand(x: AxisSample, y: AxisSample, z: AxisSample, kind: InfluenceKind): number {
  const FOUR_PI = 4 * Math.PI;
  const u0 = x.s0 * y.s0 * z.s0; // U²(k)
  const R = (x.s0 + x.s1) * (y.s0 + y.s1) * (z.s0 + z.s1);
  const Rr = productRemainder(x.s0, x.s1, y.s0, y.s1, z.s0, z.s1);
  const P0 = x.t0 * y.s0 * z.s0 + y.t0 * x.s0 * z.s0 + z.t0 * x.s0 * y.s0; // |k|²U²(k)
  const Pr =
    productRemainder(x.t0, x.t1, y.s0, y.s1, z.s0, z.s1) +
    productRemainder(y.t0, y.t1, x.s0, x.s1, z.s0, z.s1) +
    productRemainder(z.t0, z.t1, x.s0, x.s1, y.s0, y.s1);
  const P = P0 + Pr;
  const C = P * R;
  const B0 = FOUR_PI * x.g0 * y.g0 * z.g0;
  const Br = FOUR_PI * productRemainder(x.g0, x.g1, y.g0, y.g1, z.g0, z.g1);
  const k2 = x.k * x.k + y.k * y.k + z.k * z.k;
  // A = a₀² + A', a₀² = |k|²φ̃²(k) = 16π² e^{−k²/2α²}/k²; A' over |m_d| ≤ 2, m ≠ 0.
  const E0 = x.ej[J_A] * y.ej[J_A] * z.ej[J_A];
  const a02 = k2 > 0 ? (16 * Math.PI * Math.PI * E0) / k2 : 0;
  let Ar = 0;
  for (let i = 0; i <= 2 * J_A; i++) {
    for (let j = 0; j <= 2 * J_A; j++) {
      const exy = x.ej[i] * y.ej[j];
      const kxy = x.kj2[i] + y.kj2[j];
      for (let l = 0; l <= 2 * J_A; l++) {
        if (i === J_A && j === J_A && l === J_A) continue;
        Ar += (exy * z.ej[l]) / (kxy + z.kj2[l]);
      }
    }
  }
  Ar *= 16 * Math.PI * Math.PI;
  if (k2 === 0) return Ar; // k = 0: Ĝ = 0, only the aliases of the exact force remain
  // D·C = a₀²(P₀R' + P'U² + P'R') + A'PR − 2B₀B' − B'²  (the a₀²P₀U² and B₀² terms cancel exactly)
  const DC = a02 * (P0 * Rr + Pr * u0 + Pr * Rr) + Ar * C - 2 * B0 * Br - Br * Br;
  const D = Math.max(0, DC / C);
  if (kind === 'optimal') return D;
  const gOpt = (B0 + Br) / C;
  const g = (FOUR_PI * x.spme * y.spme * z.spme) / k2;
  return D + C * (g - gOpt) * (g - gOpt);
}

/** θ samples of one axis: the exact mesh modes 0 … n/2 (weights 1 or 2 over n), or a midpoint rule. */
function axisThetas(n: number, samples: number): { theta: number; weight: number }[] {
  const out: { theta: number; weight: number }[] = [];
  if (n <= 2 * samples) {
    for (let m = 0; m <= Math.floor(n / 2); m++) {
      const edge = m === 0 || 2 * m === n;
      out.push({ theta: (2 * Math.PI * m) / n, weight: (edge ? 1 : 2) / n });
    }
  } else {
    for (let i = 0; i < samples; i++) out.push({ theta: (Math.PI * (i + 0.5)) / samples, weight: 1 / samples });
  }
  return out;
}

/**
 * The error functional Q (1/length) of the mesh part for mesh n, order p, splitting α and influence
 * kind: ΔA_mesh² = G²(Σm²/V)·Q. `samples` θ points per half axis (exact sum when the mesh is smaller).
 */
export function meshErrorFunctional(n: [number, number, number], box: Box, alpha: number, p: number, kind: InfluenceKind, samples = 16): number {
  const sides = boxSides(box);
  const axes = [0, 1, 2].map((d) => {
    const h = sides[d] / n[d];
    return axisThetas(n[d], samples).map(({ theta, weight }) => axisSample(p, theta, h, alpha, weight));
  });
  let q = 0;
  for (const x of axes[0]) for (const y of axes[1]) for (const z of axes[2]) q += x.weight * y.weight * z.weight * summand(x, y, z, kind);
  const cell = (sides[0] / n[0]) * (sides[1] / n[1]) * (sides[2] / n[2]);
  return q / cell;
}

/** Kolafa–Perram real-space functional (1/length): ΔA_real² = G²(Σm²/V)·4e^{−2α²r_c²}/r_c (see ewald/params.ts). */
export function realErrorFunctional(alpha: number, rCut: number): number {
  return (4 * Math.exp(-2 * alpha * alpha * rCut * rCut)) / rCut;
}

/** Plummer correction cut at R (ewald/params.ts plummerTailError): (9π/5) ε⁴ R⁻⁵. */
export function plummerErrorFunctional(eps: number, R: number): number {
  return (9 * Math.PI * eps ** 4) / (5 * R ** 5);
}
