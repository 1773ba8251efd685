/**
 * A deliberately plain Ewald sum, independent of the engine's machinery (no cell list, no kernel table, no
 * phase recurrences, no half-space tricks): the formulas of PHYSICS.md (Ewald 1921; Hernquist, Bouchet &
 * Suto 1991) written as loops. O(N² · images + N · k-vectors); meant for N of a few hundred.
 *
 *   ψ(x) = Σ_n erfc(α|x_n|)/|x_n| + (4π/V) Σ_{k≠0} e^{−k²/4α²} cos(k·x)/k² − π/(α²V)
 *   ∇ψ(x) = −Σ_n x_n/|x_n|³ [erfc(α|x_n|) + (2α|x_n|/√π) e^{−α²|x_n|²}] − (4π/V) Σ_{k≠0} k e^{−k²/4α²} sin(k·x)/k²
 *   φ_i = −G [Σ_{j≠i} m_j ψ(r_i − r_j) + m_i ξ],  ξ = lim_{x→0} [ψ(x) − 1/|x|],  a_i = G Σ_{j≠i} m_j ∇ψ(r_i − r_j)
 *
 * Real space: separations are reduced to the minimum image, then images with every |n_d| ≤ 1 are summed; every
 * image left out is farther than R = 1.5·min(L). α = 6.5/R makes the dropped terms ≲ e^{−42} relative; the
 * Fourier sum keeps every k with k²/4α² ≤ 45 (dropped weights ≤ e^{−45}). Uses erfc from engine/special/erf.ts,
 * which tests/engine/erf.test.ts checks against independent quadrature.
 */
import { type Box, erfc } from '../../engine/index';

export interface BruteEwaldResult {
  readonly acc: Float64Array;
  readonly phi: Float64Array;
  readonly alpha: number;
  readonly kVectors: number;
}

/** Reference Ewald accelerations and potentials (G·mass/length², G·mass/length) for the given targets. */
export function bruteEwald(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  G: number,
  targets: ArrayLike<number> = Array.from({ length: masses.length }, (_, i) => i),
  alphaOverride?: number,
): BruteEwaldResult {
  const L = [box.lx, box.ly, box.lz];
  const V = L[0] * L[1] * L[2];
  const n = masses.length;
  const R = 1.5 * Math.min(...L);
  const alpha = alphaOverride ?? 6.5 / R;
  const twoOverSqrtPi = 2 / Math.sqrt(Math.PI);
  let totalMass = 0;
  for (let j = 0; j < n; j++) totalMass += masses[j];

  // k-vectors: every h ≠ 0 with k²/(4α²) ≤ 45, both signs.
  const kMax = 2 * alpha * Math.sqrt(45);
  const hMax = L.map((l) => Math.ceil((kMax * l) / (2 * Math.PI)));
  const kx: number[] = [], ky: number[] = [], kz: number[] = [], w: number[] = [];
  for (let hx = -hMax[0]; hx <= hMax[0]; hx++) {
    for (let hy = -hMax[1]; hy <= hMax[1]; hy++) {
      for (let hz = -hMax[2]; hz <= hMax[2]; hz++) {
        if (hx === 0 && hy === 0 && hz === 0) continue;
        const k = [(2 * Math.PI * hx) / L[0], (2 * Math.PI * hy) / L[1], (2 * Math.PI * hz) / L[2]];
        const k2 = k[0] * k[0] + k[1] * k[1] + k[2] * k[2];
        if (k2 > kMax * kMax) continue;
        kx.push(k[0]);
        ky.push(k[1]);
        kz.push(k[2]);
        w.push(((4 * Math.PI) / V) * Math.exp(-k2 / (4 * alpha * alpha)) / k2);
      }
    }
  }
  // Structure factor S(k) = Σ_j m_j (cos k·r_j, sin k·r_j), one explicit cos and sin per particle and k.
  const K = w.length;
  const sc = new Float64Array(K), ss = new Float64Array(K);
  for (let q = 0; q < K; q++) {
    let c = 0, s = 0;
    for (let j = 0; j < n; j++) {
      const ph = kx[q] * positions[3 * j] + ky[q] * positions[3 * j + 1] + kz[q] * positions[3 * j + 2];
      c += masses[j] * Math.cos(ph);
      s += masses[j] * Math.sin(ph);
    }
    sc[q] = c;
    ss[q] = s;
  }

  const nt = targets.length;
  const acc = new Float64Array(3 * nt);
  const phi = new Float64Array(nt);
  for (let t = 0; t < nt; t++) {
    const i = targets[t];
    const xi = positions[3 * i], yi = positions[3 * i + 1], zi = positions[3 * i + 2];
    let gx = 0, gy = 0, gz = 0, pot = 0;
    // Real space.
    for (let j = 0; j < n; j++) {
      let dx = xi - positions[3 * j], dy = yi - positions[3 * j + 1], dz = zi - positions[3 * j + 2];
      dx -= L[0] * Math.round(dx / L[0]);
      dy -= L[1] * Math.round(dy / L[1]);
      dz -= L[2] * Math.round(dz / L[2]);
      for (let nx = -1; nx <= 1; nx++) {
        for (let ny = -1; ny <= 1; ny++) {
          for (let nz = -1; nz <= 1; nz++) {
            if (j === i && nx === 0 && ny === 0 && nz === 0) continue;
            const x = dx + nx * L[0], y = dy + ny * L[1], z = dz + nz * L[2];
            const r = Math.sqrt(x * x + y * y + z * z);
            const ec = erfc(alpha * r);
            const f = (ec + twoOverSqrtPi * alpha * r * Math.exp(-alpha * alpha * r * r)) / (r * r * r);
            gx -= masses[j] * f * x;
            gy -= masses[j] * f * y;
            gz -= masses[j] * f * z;
            pot += (masses[j] * ec) / r;
          }
        }
      }
    }
    // Fourier space, all k (the j = i term supplies the Fourier part of ξ; its force vanishes).
    for (let q = 0; q < K; q++) {
      const ph = kx[q] * xi + ky[q] * yi + kz[q] * zi;
      const c = Math.cos(ph), s = Math.sin(ph);
      const sinSum = s * sc[q] - c * ss[q]; // Σ_j m_j sin(k·(r_i − r_j))
      const cosSum = c * sc[q] + s * ss[q]; // Σ_j m_j cos(k·(r_i − r_j))
      gx -= w[q] * kx[q] * sinSum;
      gy -= w[q] * ky[q] * sinSum;
      gz -= w[q] * kz[q] * sinSum;
      pot += w[q] * cosSum;
    }
    // Constants: the −π/(α²V) of ψ for every source, and the −2α/√π of the target's own ξ.
    pot += -(Math.PI * totalMass) / (alpha * alpha * V) - masses[i] * alpha * twoOverSqrtPi;
    acc[3 * t] = G * gx;
    acc[3 * t + 1] = G * gy;
    acc[3 * t + 2] = G * gz;
    phi[t] = -G * pot;
  }
  return { acc, phi, alpha, kVectors: K };
}
