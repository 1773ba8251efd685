/**
 * The image sum with the screened kernel e^{−λr}/r (a convergence factor): absolutely convergent for every
 * λ > 0, summed over all images of all particles. It is evaluated exactly through the Ewald split of the
 * Yukawa kernel (e.g. Salin & Caillol 2000, J. Chem. Phys. 113, 10459): with A = αr − λ/2α, B = αr + λ/2α,
 *   e^{−λr}/r = [e^{−λr} erfc(A) + e^{λr} erfc(B)]/(2r)                                  (short range)
 *             + (4π/V) Σ_k e^{−(k²+λ²)/4α²}/(k²+λ²) e^{ik·r}   summed over images            (long range).
 * The acceleration is a = G Σ m ∇ψ_λ; the k = 0 term is a constant (no force). The uniform background,
 * summed over all images, is an infinite homogeneous medium whose screened field vanishes, so the result is
 * the same with or without it. As λ → 0 the sum tends to the Ewald (tin-foil) force, with an error of
 * order λ² (the Fourier weights differ by 1/k² − 1/(k²+λ²) ≈ λ²/k⁴).
 * Real space: pairs closer than r_c = the shortest side (minimum image and its neighbours); α and k_max
 * from the tolerance as in the plain Ewald sum.
 */
import { type Box, boxVolume, minimumImage } from '../box';
import { erfcScaled } from './erfcScaled';

export interface ScreenedSetup {
  readonly lambdas: Float64Array;
  readonly G: number;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  readonly m: Float64Array;
  readonly box: Box;
  readonly alpha: number;
  readonly rCut: number;
  /** Half-space k-vectors (3 per vector) and the structure factor Σ m (cos k·r, sin k·r) (2 per vector). */
  readonly k: Float64Array;
  readonly structure: Float64Array;
}

const FOUR_OVER_SQRT_PI = 4 / Math.sqrt(Math.PI);

/**
 * Prepares the screened sums for the given λ values (1/length, > 0): wrapped positions (flat xyz),
 * masses, box, G, tol (relative truncation of the real-space and Fourier sums).
 */
export function screenedSetup(positions: Float64Array, masses: Float64Array, box: Box, lambdas: Float64Array, G: number, tol: number): ScreenedSetup {
  const n = masses.length;
  const L = [box.lx, box.ly, box.lz];
  const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    x[j] = positions[3 * j];
    y[j] = positions[3 * j + 1];
    z[j] = positions[3 * j + 2];
  }
  const lnTol = Math.log(1 / tol) + 3;
  const rCut = Math.min(L[0], L[1], L[2]);
  const alpha = Math.sqrt(lnTol) / rCut;
  const kMax = 2 * alpha * Math.sqrt(lnTol);
  const hMax = L.map((l) => Math.floor((kMax * l) / (2 * Math.PI)));
  const ks: number[] = [];
  for (let a = 0; a <= hMax[0]; a++) {
    for (let b = -hMax[1]; b <= hMax[1]; b++) {
      for (let c = -hMax[2]; c <= hMax[2]; c++) {
        if (a === 0 && (b < 0 || (b === 0 && c <= 0))) continue; // half space
        const kx = (2 * Math.PI * a) / L[0], ky = (2 * Math.PI * b) / L[1], kz = (2 * Math.PI * c) / L[2];
        if (kx * kx + ky * ky + kz * kz > kMax * kMax) continue;
        ks.push(kx, ky, kz);
      }
    }
  }
  const k = Float64Array.from(ks);
  const nk = k.length / 3;
  const structure = new Float64Array(2 * nk);
  for (let q = 0; q < nk; q++) {
    let c = 0, s = 0;
    for (let j = 0; j < n; j++) {
      const ph = k[3 * q] * x[j] + k[3 * q + 1] * y[j] + k[3 * q + 2] * z[j];
      c += masses[j] * Math.cos(ph);
      s += masses[j] * Math.sin(ph);
    }
    structure[2 * q] = c;
    structure[2 * q + 1] = s;
  }
  return { lambdas, G, x, y, z, m: Float64Array.from(masses), box, alpha, rCut, k, structure };
}

/**
 * Screened accelerations (G·mass/length²) for targets[begin..end) (input rows), one row per λ:
 * partial[(ℓ·K + t)·3 + d] for λ_ℓ, K = targets.length.
 */
export function screenedTargets(st: ScreenedSetup, targets: Int32Array, begin: number, end: number, partial: Float64Array): void {
  const { x, y, z, m, box, alpha, rCut, k, structure, lambdas, G } = st;
  const n = m.length;
  const K = targets.length;
  const nl = lambdas.length;
  const nk = k.length / 3;
  const V = boxVolume(box);
  const rc2 = rCut * rCut;
  const a2 = alpha * alpha;
  const lamE = lambdas.map((l) => Math.exp(-(l * l) / (4 * a2)));
  const acc = new Float64Array(3 * nl);
  const fk = new Float64Array(3 * nk);
  for (let t = begin; t < end; t++) {
    const i = targets[t];
    const xi = x[i], yi = y[i], zi = z[i];
    acc.fill(0);
    for (let j = 0; j < n; j++) {
      const mx = minimumImage(xi - x[j], box.lx), my = minimumImage(yi - y[j], box.ly), mz = minimumImage(zi - z[j], box.lz);
      for (let a = -1; a <= 1; a++) {
        const dx = mx + a * box.lx;
        for (let b = -1; b <= 1; b++) {
          const dy = my + b * box.ly;
          for (let c = -1; c <= 1; c++) {
            const dz = mz + c * box.lz;
            const r2 = dx * dx + dy * dy + dz * dz;
            if (r2 >= rc2 || r2 === 0) continue;
            const r = Math.sqrt(r2);
            const ar = alpha * r;
            const eR = Math.exp(-ar * ar);
            for (let l = 0; l < nl; l++) {
              const lam = lambdas[l];
              const E = eR * lamE[l];
              const shift = lam / (2 * alpha);
              const A = ar - shift, B = ar + shift;
              const tB = erfcScaled(B) * E;
              const tA = A >= 0 ? erfcScaled(A) * E : 2 * Math.exp(-lam * r) - erfcScaled(-A) * E;
              // f'(r) = −(tA + tB)/(2r²) + [λ(tB − tA) − (4α/√π)E]/(2r);  a = G m f'(r) r̂
              const fp = -(tA + tB) / (2 * r2) + (lam * (tB - tA) - FOUR_OVER_SQRT_PI * alpha * E) / (2 * r);
              const f = (m[j] * fp) / r;
              acc[3 * l] += f * dx;
              acc[3 * l + 1] += f * dy;
              acc[3 * l + 2] += f * dz;
            }
          }
        }
      }
    }
    // Fourier: Σ_j m_j sin(k·(r_i − r_j)) = sin(k·r_i) C_k − cos(k·r_i) S_k, the same for every λ
    for (let q = 0; q < nk; q++) {
      const kx = k[3 * q], ky = k[3 * q + 1], kz = k[3 * q + 2];
      const ph = kx * xi + ky * yi + kz * zi;
      const sn = Math.sin(ph) * structure[2 * q] - Math.cos(ph) * structure[2 * q + 1];
      fk[3 * q] = kx * sn;
      fk[3 * q + 1] = ky * sn;
      fk[3 * q + 2] = kz * sn;
    }
    for (let l = 0; l < nl; l++) {
      const lam2 = lambdas[l] * lambdas[l];
      let ax = 0, ay = 0, az = 0;
      for (let q = 0; q < nk; q++) {
        const kx = k[3 * q], ky = k[3 * q + 1], kz = k[3 * q + 2];
        const s = kx * kx + ky * ky + kz * kz + lam2;
        const wgt = Math.exp(-s / (4 * a2)) / s;
        ax += wgt * fk[3 * q];
        ay += wgt * fk[3 * q + 1];
        az += wgt * fk[3 * q + 2];
      }
      // a = −(4π/V) Σ_{all k≠0} k w_k Σ_j m_j sin(…) = −(8π/V) Σ_{half space}
      const pref = (8 * Math.PI) / V;
      const o = (l * K + t) * 3;
      partial[o] = G * (acc[3 * l] - pref * ax);
      partial[o + 1] = G * (acc[3 * l + 1] - pref * ay);
      partial[o + 2] = G * (acc[3 * l + 2] - pref * az);
    }
  }
}
