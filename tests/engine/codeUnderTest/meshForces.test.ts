import { describe, expect, test } from 'vitest';
import { boxMake } from '../../../engine/box';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { meshForces, meshOptionsCheck } from '../../../engine/codeUnderTest/meshForces';
import { randomSeeded } from '../../../engine/util/random';

/** Particles on the m³ mesh points of a box, masses m̄(1 + δ cos(2π x_axis/L_axis)). */
function planeWave(m: number, L: [number, number, number], axis: number, delta: number) {
  const n = m * m * m;
  const positions = new Float64Array(3 * n);
  const masses = new Float64Array(n);
  let p = 0;
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) for (let k = 0; k < m; k++) {
    const idx = [i, j, k];
    for (let d = 0; d < 3; d++) positions[3 * p + d] = (idx[d] * L[d]) / m;
    masses[p] = (1 / n) * (1 + delta * Math.cos((2 * Math.PI * idx[axis]) / m));
    p++;
  }
  return { positions, masses };
}

describe('meshForces on a plane wave (derivation: Poisson for ρ̄(1 + δ cos kx))', () => {
  test.each([
    [[1, 1, 1], 0],
    [[1, 2, 1], 1],
    [[1, 1, 0.5], 2],
  ] as [[number, number, number], number][])('box %j, wave along axis %i: a = −4πGρ̄δ·D/K² sin kx exactly, within (kh)²/12 of −4πGρ̄δ/k sin kx', (L, axis) => {
    // Continuum: ∇²φ = 4πGρ̄δ cos kx → φ = −(4πGρ̄δ/k²) cos kx → a_x = −∂φ/∂x = −(4πGρ̄δ/k) sin kx
    // (pointing toward the density maximum at x = 0). The mesh replaces k by the
    // finite-difference symbols: D = sin(kh)/h (gradient) over K² = (2 sin(kh/2)/h)² (Laplacian), whose
    // ratio to 1/k is (kh/2)·cot(kh/2) = 1 − (kh)²/12 − …
    const m = 16, G = 2, delta = 0.3;
    const { positions, masses } = planeWave(m, L, axis, delta);
    const box = boxMake(...L);
    const V = L[0] * L[1] * L[2];
    const k = (2 * Math.PI) / L[axis];
    const h = L[axis] / m;
    const amp = (4 * Math.PI * G * (1 / V) * delta * (Math.sin(k * h) / h)) / (2 * Math.sin((k * h) / 2) / h) ** 2;
    const r = meshForces(positions, masses, box, null, { mesh: m, G });
    let maxDev = 0;
    for (let p = 0; p < masses.length; p++) {
      const expected = -amp * Math.sin(k * positions[3 * p + axis]);
      for (let d = 0; d < 3; d++) maxDev = Math.max(maxDev, Math.abs(r.acc[3 * p + d] - (d === axis ? expected : 0)));
    }
    expect(maxDev / amp).toBeLessThan(1e-12);
    const continuum = (4 * Math.PI * G * (1 / V) * delta) / k;
    expect(Math.abs(amp / continuum - (1 - (k * h) ** 2 / 12))).toBeLessThan((k * h) ** 4 / 100);
    expect(r.params).toEqual({ mesh: 16, cell: L.map((l) => l / 16), G: 2 });
  });
});

describe('meshForces exact properties (derivation: CIC both ways, even Green function, odd gradient)', () => {
  test('conserves momentum: Σ m_i a_i = 0 to rounding on the clustered demo', () => {
    const d = demoSnapshot(3000, 2);
    const r = meshForces(d.positions, d.masses, boxMake(1), null, { mesh: 32 });
    const total = [0, 0, 0];
    let scale = 0;
    for (let i = 0; i < 3000; i++) for (let c = 0; c < 3; c++) {
      total[c] += d.masses[i] * r.acc[3 * i + c];
      scale += d.masses[i] * Math.abs(r.acc[3 * i + c]);
    }
    for (const t of total) expect(Math.abs(t) / scale).toBeLessThan(1e-13);
  });

  test('a single particle feels no force (no self-force), wherever it sits', () => {
    const r = meshForces(Float64Array.from([0.123, 0.777, 0.5]), Float64Array.from([1]), boxMake(1), null, { mesh: 16 });
    for (const a of r.acc) expect(Math.abs(a)).toBeLessThan(1e-12);
  });
});

describe('meshForces against the Ewald pair force (two particles, mesh 32, cell h = 1/32)', () => {
  /** rms and mean-magnitude ratio over random placements and directions at separation s·h. */
  function pairStats(s: number, trials = 24) {
    const m = 32, h = 1 / m, box = boxMake(1);
    const rand = randomSeeded(7 + Math.round(10 * s));
    let s2 = 0, ratio = 0;
    for (let t = 0; t < trials; t++) {
      const p = [rand(), rand(), rand()];
      const z = 2 * rand() - 1, ph = 2 * Math.PI * rand(), w = Math.sqrt(1 - z * z);
      const dir = [w * Math.cos(ph), w * Math.sin(ph), z];
      const pos = Float64Array.from([...p, ...p.map((v, d) => v + s * h * dir[d])]);
      const mass = Float64Array.from([1, 1e-12]);
      const tg = Int32Array.from([1]);
      const e = ewaldForces(pos, mass, box, tg, { tol: 1e-10 }).acc;
      const a = meshForces(pos, mass, box, tg, { mesh: m }).acc;
      const en = Math.hypot(e[0], e[1], e[2]);
      s2 += (Math.hypot(a[0] - e[0], a[1] - e[1], a[2] - e[2]) / en) ** 2;
      ratio += Math.hypot(a[0], a[1], a[2]) / en;
    }
    return { rms: Math.sqrt(s2 / trials), ratio: ratio / trials };
  }

  test('approaches the periodic Newtonian force at separations ≫ a cell (rms deviation < 3 % at 8 and 12 cells)', () => {
    // CIC with the 7-point Laplacian and 2-point gradient: force errors of a few per cent beyond a few
    // cells (Hockney & Eastwood 1988, ch. 8, from memory); measured here 1.2 % at 8 cells, 0.7 % at 12.
    // A wrong sign, G or 4π would give deviations of order 1.
    for (const s of [8, 12]) expect(pairStats(s).rms).toBeLessThan(0.03);
  });

  test('smooths the force below a cell: at half a cell it is under 20 % of Newton, at 1 cell about half', () => {
    // the CIC cloud's force vanishes linearly as r → 0 while Newton's grows as 1/r² (measured: 8 % at 0.5
    // cells, 45 % at 1 cell, 99 % at 2 cells)
    expect(pairStats(0.5).ratio).toBeLessThan(0.2);
    const one = pairStats(1).ratio;
    expect(one).toBeGreaterThan(0.3);
    expect(one).toBeLessThan(0.7);
  });
});

describe('meshOptionsCheck(options)', () => {
  test.each([[12], [4], [512]])('rejects mesh %i with a message naming the option', (mesh) => {
    expect(() => meshOptionsCheck({ mesh })).toThrow(`mesh: points per side must be a power of two from 8 to 256, got ${mesh}`);
  });

  test('rejects a non-finite coordinate naming the particle', () => {
    expect(() => meshForces(Float64Array.from([0, 0, 0, 0.5, NaN, 0]), Float64Array.from([1, 1]), boxMake(1), null)).toThrow('coordinate y of particle 1 is not finite (NaN)');
  });
});
