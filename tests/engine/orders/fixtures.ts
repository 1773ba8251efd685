/**
 * Seeded configurations and a brute-force reference for the summation-order tests. Imports engine modules
 * directly (not engine/index) so that these tests depend only on what they test.
 */
import { type Box, boxMake } from '../../../engine/box';
import { uniformBoxField } from '../../../engine/orders/uniformBox';
import { randomSeeded } from '../../../engine/util/random';

export interface Config {
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly box: Box;
}

/**
 * n particles with masses 0.5–1.5 (seeded) inside the sub-box [0, f·L) of a box with the given sides: f = 1
 * fills the box; f = 0.5 packs everything into one corner octant, a large dipole D ≈ −M·L/4 per axis.
 */
export function configCorner(n: number, seed: number, sides: [number, number, number], fill = 1): Config {
  const rand = randomSeeded(seed);
  const positions = new Float64Array(3 * n);
  const masses = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let d = 0; d < 3; d++) positions[3 * i + d] = fill * sides[d] * rand();
    masses[i] = 0.5 + rand();
  }
  return { positions, masses, box: boxMake(...sides) };
}

/** 2·half particles in mirror pairs r, 2c − r with equal masses: the box dipole D vanishes. */
export function configNoDipole(half: number, seed: number, sides: [number, number, number]): Config {
  const rand = randomSeeded(seed);
  const positions = new Float64Array(6 * half);
  const masses = new Float64Array(2 * half);
  for (let i = 0; i < half; i++) {
    const m = 0.5 + rand();
    for (let d = 0; d < 3; d++) {
      const x = sides[d] * (0.02 + 0.96 * rand());
      positions[3 * i + d] = x;
      positions[3 * (half + i) + d] = sides[d] - x;
    }
    masses[i] = masses[half + i] = m;
  }
  return { positions, masses, box: boxMake(...sides) };
}

/** Largest |a_t − b_t| over targets divided by the rms of |b_t|. */
export function maxErrorOverRms(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0, s = 0;
  const k = b.length / 3;
  for (let t = 0; t < k; t++) {
    m = Math.max(m, Math.hypot(a[3 * t] - b[3 * t], a[3 * t + 1] - b[3 * t + 1], a[3 * t + 2] - b[3 * t + 2]));
    s += b[3 * t] ** 2 + b[3 * t + 1] ** 2 + b[3 * t + 2] ** 2;
  }
  return m / Math.sqrt(s / k);
}

/** Row s of a partial-sum table (rows × K × 3) as a 3K array. */
export function partialRow(acc: Float64Array, s: number, k: number): Float64Array {
  return acc.slice(s * 3 * k, (s + 1) * 3 * k);
}

/**
 * Brute-force partial sums of the shell orders: every cell with shell index ≤ R summed exactly (pairs, and
 * the background box through the closed form), no multipoles. Layout as the engine's: [(s·K + t)·3 + d].
 */
export function bruteShellPartials(c: Config, shape: 'sphere' | 'cube', R: number, targets: number[], background: boolean, G = 1): Float64Array {
  const { positions: p, masses: m, box } = c;
  const L = [box.lx, box.ly, box.lz];
  const ell = Math.max(...L);
  const K = targets.length;
  const M = m.reduce((a, b) => a + b, 0);
  const rho = M / (L[0] * L[1] * L[2]);
  const perShell = new Float64Array((R + 1) * 3 * K);
  const lim = L.map((l) => (shape === 'cube' ? R : Math.floor((R * ell) / l + 1e-9)));
  const bg = new Float64Array(3);
  for (let i = -lim[0]; i <= lim[0]; i++) {
    for (let j = -lim[1]; j <= lim[1]; j++) {
      for (let k = -lim[2]; k <= lim[2]; k++) {
        const s = [i * L[0], j * L[1], k * L[2]];
        const r = Math.hypot(...s);
        const sh = shape === 'cube' ? Math.max(Math.abs(i), Math.abs(j), Math.abs(k)) : Math.ceil((r / ell) * (1 - 1e-12));
        if (sh > R) continue;
        targets.forEach((ti, t) => {
          const o = (sh * K + t) * 3;
          for (let q = 0; q < m.length; q++) {
            if (i === 0 && j === 0 && k === 0 && q === ti) continue;
            const d = [0, 1, 2].map((a) => p[3 * q + a] + s[a] - p[3 * ti + a]);
            const r2 = d[0] * d[0] + d[1] * d[1] + d[2] * d[2];
            const f = (G * m[q]) / (r2 * Math.sqrt(r2));
            for (let a = 0; a < 3; a++) perShell[o + a] += f * d[a];
          }
          if (background) {
            uniformBoxField(p[3 * ti], p[3 * ti + 1], p[3 * ti + 2], s[0], s[0] + L[0], s[1], s[1] + L[1], s[2], s[2] + L[2], bg);
            for (let a = 0; a < 3; a++) perShell[o + a] -= G * rho * bg[a];
          }
        });
      }
    }
  }
  for (let s = 1; s <= R; s++) for (let q = 0; q < 3 * K; q++) perShell[s * 3 * K + q] += perShell[(s - 1) * 3 * K + q];
  return perShell;
}
