/**
 * cellStencil against a brute-force enumeration of its definition (every offset in the bounding box, kept
 * when the smallest distance between cell 0 and cell o, ∑ (max(0, |o_d| − 1)·w_d)², is below r_c²), in the
 * documented order: (0,0,0), the lexicographically positive half, then their negatives. Independent
 * derivation: the engine finds one range of oz per (ox, oy) instead of testing every offset.
 */
import { describe, expect, it } from 'vitest';
import { cellStencil } from '../../engine/ewald/cellList';

function bruteStencil(w: [number, number, number], r: number): { offsets: number[]; halfCount: number } {
  const reach = w.map((x) => Math.ceil(r / x));
  const positive: number[] = [];
  for (let ox = 0; ox <= reach[0]; ox++) {
    for (let oy = -reach[1]; oy <= reach[1]; oy++) {
      for (let oz = -reach[2]; oz <= reach[2]; oz++) {
        if (!(ox > 0 || (ox === 0 && (oy > 0 || (oy === 0 && oz > 0))))) continue;
        const g = [ox, oy, oz].map((o, d) => Math.max(0, Math.abs(o) - 1) * w[d]);
        if (g[0] * g[0] + g[1] * g[1] + g[2] * g[2] < r * r) positive.push(ox, oy, oz);
      }
    }
  }
  return { offsets: [0, 0, 0, ...positive, ...positive.map((v) => (v === 0 ? 0 : -v))], halfCount: 1 + positive.length / 3 };
}

describe('cellStencil', () => {
  const cases: [[number, number, number], number][] = [
    [[0.125, 0.125, 0.125], 0.338],
    [[1 / 9, 1 / 9, 1 / 9], 1.457], // a refinement's cutoff beyond the box
    [[0.2, 0.3, 0.1], 0.45],
    [[1, 1, 1], 2.5],
    [[0.05, 0.4, 0.4], 0.3],
    [[0.1, 0.1, 0.1], 0.1], // cutoff equal to the cell width: whole-cell boundaries
    [[0.25, 0.5, 0.125], 0.5],
    [[1, 1, 1], 0.01],
    // Cutoffs a whole number of cell widths up to rounding, where the square-root estimate of a column's
    // reach overshoots by one (found by a random search) and the exact test must take it back.
    [[0.73, 0.091, 0.97], 5.82],
    [[0.91, 0.7, 0.2], 0.6000000000000001],
  ];
  for (const [w, r] of cases) {
    it(`equals the brute-force enumeration, same order (w = ${w.map((x) => x.toPrecision(3))}, r = ${r})`, () => {
      const got = cellStencil(w, r);
      const want = bruteStencil(w, r);
      expect(got.halfCount).toBe(want.halfCount);
      expect(Array.from(got.offsets)).toEqual(want.offsets);
    });
  }
});
