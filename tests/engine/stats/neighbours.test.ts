import { describe, expect, test } from 'vitest';
import { boxMake, minimumImage } from '../../../engine/box';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';
import { randomSeeded } from '../../../engine/util/random';
import { neighboursDensity, neighboursFind } from '../../../engine/stats/neighbours';

/** Sorted minimum-image distances from particle i to every other (brute force). */
function bruteDistances(pos: Float64Array, L: [number, number, number], i: number): number[] {
  const out: number[] = [];
  for (let j = 0; j < pos.length / 3; j++) {
    if (j === i) continue;
    const d = [0, 1, 2].map((a) => minimumImage(pos[3 * j + a] - pos[3 * i + a], L[a]));
    out.push(Math.hypot(d[0], d[1], d[2]));
  }
  return out.sort((a, b) => a - b);
}

function uniform(n: number, seed: number, L: [number, number, number]): Float64Array {
  const r = randomSeeded(seed);
  return Float64Array.from({ length: 3 * n }, (_, k) => r() * L[k % 3]);
}

describe('neighboursFind(positions, box, targets, k)', () => {
  test('equals brute-force minimum-image distances on clustered data in a rectangular box', () => {
    const L: [number, number, number] = [2, 1, 0.5];
    const d = demoSnapshot(1500, 4);
    const pos = d.positions.map((x, k) => x * L[k % 3]);
    const targets = Int32Array.from([0, 7, 100, 512, 999, 1499]);
    const nb = neighboursFind(pos, boxMake(...L), targets, 8);
    targets.forEach((i, t) => {
      const b = bruteDistances(pos, L, i);
      expect(nb.nearest[t]).toBeCloseTo(b[0], 14);
      expect(nb.kth[t]).toBeCloseTo(b[7], 14);
      expect(nb.density[t]).toBeCloseTo(7 / ((4 * Math.PI) / 3) / b[7] ** 3, 6);
    });
    expect(nb.kUsed).toBe(8);
  });

  test('finds neighbours across the periodic boundary', () => {
    const pos = Float64Array.from([0.01, 0.5, 0.5, 0.98, 0.5, 0.5, 0.5, 0.5, 0.5]);
    const nb = neighboursFind(pos, boxMake(1), null, 2);
    expect(nb.nearest[0]).toBeCloseTo(0.03, 14);
    expect(nb.nearest[1]).toBeCloseTo(0.03, 14);
    expect(nb.nearest[2]).toBeCloseTo(0.48, 14);
    expect(nb.kth[2]).toBeCloseTo(0.49, 14);
  });

  test('mean nearest-neighbour distance of a Poisson sample is Γ(4/3)(4πn/3)^(−1/3) ≈ 0.55396 n^(−1/3)', () => {
    // Chandrasekhar 1943 (Rev. Mod. Phys. 15, 1), nearest-neighbour distribution w(r) = 4πr²n e^{−4πr³n/3}.
    // 20 000 uniform points, all targets; the sample mean's relative standard error is ≈ 0.36/√N ≈ 0.003.
    const n = 20_000;
    const nb = neighboursFind(uniform(n, 11, [1, 1, 1]), boxMake(1), null, 16);
    const mean = nb.nearest.reduce((s, r) => s + r, 0) / n;
    const expected = 0.8929795115692492 * Math.cbrt(3 / (4 * Math.PI * n)); // Γ(4/3) = 0.89297951156924921
    expect(Math.abs(mean / expected - 1)).toBeLessThan(0.01);
  });

  test('the density estimate (k − 1)/V_k is unbiased for a Poisson sample (mean within 2 % of N/V)', () => {
    // E[1/V_k] = n/(k − 1) for V_k ~ Gamma(k, 1/n); per-point relative sd 1/√(k − 2) ≈ 0.27, 20 000 points
    const n = 20_000;
    const L: [number, number, number] = [1, 2, 1];
    const nb = neighboursFind(uniform(n, 5, L), boxMake(...L), null, 16);
    const mean = nb.density.reduce((s, r) => s + r, 0) / n;
    expect(nb.meanDensity).toBe(n / 2);
    expect(Math.abs(mean / nb.meanDensity - 1)).toBeLessThan(0.02);
  });

  test('N = 1 has no neighbours (Infinity, density NaN); k is capped at N − 1', () => {
    const one = neighboursFind(Float64Array.from([0.5, 0.5, 0.5]), boxMake(1), null, 4);
    expect(one.nearest[0]).toBe(Infinity);
    expect(one.density[0]).toBeNaN();
    const three = neighboursFind(Float64Array.from([0.1, 0.1, 0.1, 0.2, 0.1, 0.1, 0.1, 0.4, 0.1]), boxMake(1), Int32Array.from([0]), 8);
    expect(three.kUsed).toBe(2);
    expect(three.kth[0]).toBeCloseTo(0.3, 14);
  });

  test('coincident particles have nearest distance 0 and infinite density', () => {
    const pos = Float64Array.from([0.3, 0.3, 0.3, 0.3, 0.3, 0.3, 0.7, 0.7, 0.7]);
    const nb = neighboursFind(pos, boxMake(1), Int32Array.from([0]), 2);
    expect(nb.nearest[0]).toBe(0);
    expect(neighboursDensity(0, 2)).toBe(Infinity);
  });

  test('rejects k outside 2..256 with a message naming k', () => {
    expect(() => neighboursFind(new Float64Array(6), boxMake(1), null, 1)).toThrow(/k must be a whole number from 2 to 256, got 1/);
  });
});
