/**
 * The demo's "code under test": a deliberately coarse particle-mesh (PM) gravity solver, an honest
 * approximation of the periodic force whose errors the inspector shows (Hockney & Eastwood 1988,
 * Computer Simulation Using Particles, ch. 5 and 8). Steps: cloud-in-cell (CIC) assignment of mass to a
 * mesh of m³ points x = (i·hx, j·hy, k·hz); FFT; Poisson's equation ∇²φ = 4πG(ρ − ρ̄) with the 7-point
 * finite-difference Laplacian, φ_k = −4πG ρ_k/K², K² = Σ_d (2 sin(k_d h_d/2)/h_d)² (no deconvolution, no
 * short-range correction); the centred two-point difference for a = −∇φ, a_k = −i sin(k_d h_d)/h_d · φ_k;
 * three inverse FFTs (the real-to-complex mesh FFT of engine/pme/fft3d.ts, tested there against a
 * direct DFT); CIC interpolation back to the particles (the textbook CIC scheme of H&E ch. 5). Same sign
 * conventions as the Ewald reference (a = −∇φ, mean density removed). Forces are smoothed below about
 * two cells: that is the error pattern it exists for.
 */
import { targetsAll } from '../targets';
import { type Box, boxVolume } from '../box';
import { meshFftCreate, meshFftForward, meshFftInverse, meshFftLength, meshFftScratch } from '../pme/fft3d';

/** Whether n is a power of two (n ≥ 1). */
function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0;
}

export interface MeshOptions {
  /** Mesh points per side, a power of two from 8 to 256 (default 32). */
  readonly mesh?: number;
  /** Gravitational constant (default 1). */
  readonly G?: number;
}

export interface MeshParams {
  readonly mesh: number;
  /** Cell sides hx, hy, hz (length units). */
  readonly cell: [number, number, number];
  readonly G: number;
}

export interface MeshSetup {
  readonly box: Box;
  readonly params: MeshParams;
  /** Acceleration components on the mesh (G·mass/length²), x-major (ix·m + iy)·m + iz. */
  readonly ax: Float64Array;
  readonly ay: Float64Array;
  readonly az: Float64Array;
}

/** Checks mesh options; throws a RangeError naming the option and why. */
export function meshOptionsCheck(options: MeshOptions): MeshParams & { mesh: number } {
  const mesh = options.mesh ?? 32;
  const G = options.G ?? 1;
  if (!isPowerOfTwo(mesh) || mesh < 8 || mesh > 256) throw new RangeError(`mesh: points per side must be a power of two from 8 to 256, got ${mesh}`);
  if (!(G > 0 && Number.isFinite(G))) throw new RangeError(`G must be a positive finite number, got ${G}`);
  return { mesh, G, cell: [0, 0, 0] };
}

/** CIC stencil along one axis: lower mesh index (wrapped) and the weight of the upper neighbour. */
function cic(x: number, l: number, m: number): [number, number] {
  let u = (x / l) * m;
  u -= Math.floor(u / m) * m;
  const i = Math.floor(u);
  return [i >= m ? i - m : i, u - i];
}

/**
 * Assigns masses (CIC), solves on the mesh and returns the acceleration mesh. Positions flat xyz (length
 * units, wrapped here), masses in mass units, results in G·mass/length².
 */
export function meshSetup(positions: Float64Array, masses: Float64Array, box: Box, options: MeshOptions = {}): MeshSetup {
  const { mesh: m, G } = meshOptionsCheck(options);
  const n = masses.length;
  if (positions.length !== 3 * n) throw new RangeError(`positions hold ${positions.length} numbers but ${n} masses need ${3 * n}`);
  for (let k = 0; k < 3 * n; k++) {
    if (!Number.isFinite(positions[k])) throw new RangeError(`coordinate ${'xyz'[k % 3]} of particle ${Math.floor(k / 3)} is not finite (${positions[k]})`);
  }
  const L = [box.lx, box.ly, box.lz];
  const cell: [number, number, number] = [L[0] / m, L[1] / m, L[2] / m];
  const M3 = m * m * m;
  const rho = new Float64Array(M3);
  const invCellVolume = (m * m * m) / boxVolume(box);
  for (let p = 0; p < n; p++) {
    const [ix, fx] = cic(positions[3 * p], L[0], m);
    const [iy, fy] = cic(positions[3 * p + 1], L[1], m);
    const [iz, fz] = cic(positions[3 * p + 2], L[2], m);
    const jx = ix + 1 === m ? 0 : ix + 1, jy = iy + 1 === m ? 0 : iy + 1, jz = iz + 1 === m ? 0 : iz + 1;
    const w = masses[p] * invCellVolume;
    const gx = 1 - fx, gy = 1 - fy, gz = 1 - fz;
    rho[(ix * m + iy) * m + iz] += w * gx * gy * gz;
    rho[(ix * m + iy) * m + jz] += w * gx * gy * fz;
    rho[(ix * m + jy) * m + iz] += w * gx * fy * gz;
    rho[(ix * m + jy) * m + jz] += w * gx * fy * fz;
    rho[(jx * m + iy) * m + iz] += w * fx * gy * gz;
    rho[(jx * m + iy) * m + jz] += w * fx * gy * fz;
    rho[(jx * m + jy) * m + iz] += w * fx * fy * gz;
    rho[(jx * m + jy) * m + jz] += w * fx * fy * fz;
  }
  // The real-to-complex mesh FFT of the PME engine: half spectrum k0 = 0 … m/2, slab k0 at k0·2B with
  // real parts [k2][k1] then imaginary parts [k2][k1] (B = m²); its inverse is unnormalised (× m³).
  const fft = meshFftCreate([m, m, m]);
  const scratch = meshFftScratch(fft);
  const spectrum = new Float64Array(meshFftLength(fft));
  spectrum.set(rho);
  meshFftForward(fft, spectrum, scratch);
  // Finite-difference operators in Fourier form: the 7-point Laplacian −K² with K_d = 2 sin(k_d h_d/2)/h_d,
  // and the centred 2-point gradient i·D_d with D_d = sin(k_d h_d)/h_d (zero at the Nyquist frequency).
  const K2 = [0, 1, 2].map((d) => Float64Array.from({ length: m }, (_, i) => (2 * Math.sin((Math.PI * i) / m) / cell[d]) ** 2));
  const D = [0, 1, 2].map((d) => Float64Array.from({ length: m }, (_, i) => Math.sin((2 * Math.PI * i) / m) / cell[d]));
  const B = m * m;
  const out: Float64Array[] = [];
  for (let d = 0; d < 3; d++) {
    const a = new Float64Array(spectrum.length);
    for (let k0 = 0; k0 <= m / 2; k0++) {
      const base = 2 * B * k0;
      for (let k2 = 0; k2 < m; k2++) {
        for (let k1 = 0; k1 < m; k1++) {
          if (k0 === 0 && k1 === 0 && k2 === 0) continue; // k = 0: the mean density is removed
          const c = base + k2 * m + k1;
          const kd = d === 0 ? D[0][k0] : d === 1 ? D[1][k1] : D[2][k2];
          // a_k = −i·D_d·φ_k with φ_k = −4πG ρ_k / K², and 1/m³ for the unnormalised inverse
          const g = (4 * Math.PI * G * kd) / ((K2[0][k0] + K2[1][k1] + K2[2][k2]) * M3);
          a[c] = -g * spectrum[c + B];
          a[c + B] = g * spectrum[c];
        }
      }
    }
    meshFftInverse(fft, a, scratch);
    out.push(a.slice(0, M3));
  }
  return { box, params: { mesh: m, cell, G }, ax: out[0], ay: out[1], az: out[2] };
}

/** Trilinear (CIC) sum over the 8 corners: row offsets c·· (x,y), z indices iz, jz, xy weights, z weights. */
function corners(
  f: Float64Array, c000: number, c010: number, c100: number, c110: number, iz: number, jz: number,
  w000: number, w010: number, w100: number, w110: number, gz: number, fz: number,
): number {
  return (
    w000 * (gz * f[c000 + iz] + fz * f[c000 + jz]) +
    w010 * (gz * f[c010 + iz] + fz * f[c010 + jz]) +
    w100 * (gz * f[c100 + iz] + fz * f[c100 + jz]) +
    w110 * (gz * f[c110 + iz] + fz * f[c110 + jz])
  );
}

/** CIC interpolation of the mesh accelerations at targets[begin..end) into acc[3t..3t+2] (overwrites). */
export function meshInterpolate(setup: MeshSetup, positions: Float64Array, targets: Int32Array, begin: number, end: number, acc: Float64Array): void {
  const { box, ax, ay, az } = setup;
  const m = setup.params.mesh;
  const L = [box.lx, box.ly, box.lz];
  for (let t = begin; t < end; t++) {
    const p = targets[t];
    const [ix, fx] = cic(positions[3 * p], L[0], m);
    const [iy, fy] = cic(positions[3 * p + 1], L[1], m);
    const [iz, fz] = cic(positions[3 * p + 2], L[2], m);
    const jx = ix + 1 === m ? 0 : ix + 1, jy = iy + 1 === m ? 0 : iy + 1, jz = iz + 1 === m ? 0 : iz + 1;
    const gx = 1 - fx, gy = 1 - fy, gz = 1 - fz;
    const c000 = (ix * m + iy) * m, c010 = (ix * m + jy) * m, c100 = (jx * m + iy) * m, c110 = (jx * m + jy) * m;
    const w000 = gx * gy, w010 = gx * fy, w100 = fx * gy, w110 = fx * fy;
    const sx = corners(ax, c000, c010, c100, c110, iz, jz, w000, w010, w100, w110, gz, fz);
    const sy = corners(ay, c000, c010, c100, c110, iz, jz, w000, w010, w100, w110, gz, fz);
    const sz = corners(az, c000, c010, c100, c110, iz, jz, w000, w010, w100, w110, gz, fz);
    acc[3 * t] = sx;
    acc[3 * t + 1] = sy;
    acc[3 * t + 2] = sz;
  }
}

export interface MeshResult {
  readonly targets: Int32Array;
  /** Accelerations, 3 per target (G·mass/length²). */
  readonly acc: Float64Array;
  readonly params: MeshParams;
}

/** PM accelerations for `targets` (input rows; null = all) on one thread, with progress in [0, 1]. */
export function meshForces(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: MeshOptions = {},
  onProgress?: (fraction: number) => void,
): MeshResult {
  const setup = meshSetup(positions, masses, box, options);
  onProgress?.(0.5);
  const tg = targets ?? targetsAll(masses.length);
  const acc = new Float64Array(3 * tg.length);
  const chunk = 65536;
  for (let b = 0; b < tg.length; b += chunk) {
    meshInterpolate(setup, positions, tg, b, Math.min(tg.length, b + chunk), acc);
    onProgress?.(0.5 + (0.5 * Math.min(tg.length, b + chunk)) / tg.length);
  }
  return { targets: tg, acc, params: setup.params };
}
