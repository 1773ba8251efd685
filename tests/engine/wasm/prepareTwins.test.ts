/**
 * The WebAssembly particle passes of a setup (engine/wasm/prepareWasm.ts) against their JavaScript twins:
 * the same operations in the same order, so the same bits — wrapped positions, the count of wrapped
 * particles, the clustering factor and mass sums (hence the same α, r_c, k_c), the total mass and every
 * array of the cell list — on snapshots with particles outside the box in every way (negative, beyond L,
 * exactly L, many boxes away) and unequal masses; and the same error for a non-finite value.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { type EwaldSetup, cellListFindCoincident, ewaldSetup } from '../../../engine/ewald/ewald';
import { boxMake } from '../../../engine/box';
import { prepareWasmCreate } from '../../../engine/wasm/prepareWasm';
import { snapshotClustered, snapshotUniform } from '../../helpers/snapshots';

function setupOn(wasm: boolean, positions: Float64Array, masses: Float64Array, box: Parameters<typeof ewaldSetup>[2]): EwaldSetup {
  const saved = process.env.TORUSGRAV_NO_WASM;
  if (wasm) delete process.env.TORUSGRAV_NO_WASM;
  else process.env.TORUSGRAV_NO_WASM = '1';
  try {
    return ewaldSetup(positions, masses, box, { tol: 1e-7, sharedMemory: true });
  } finally {
    if (saved === undefined) delete process.env.TORUSGRAV_NO_WASM;
    else process.env.TORUSGRAV_NO_WASM = saved;
  }
}

afterEach(() => delete process.env.TORUSGRAV_NO_WASM);

const rect: [number, number, number] = [1, 1.6, 0.7];
const clustered = snapshotClustered(3001, 8, rect);
const moved = Float64Array.from(clustered.positions);
// Outside in every way: negative, beyond, exactly on the far face, many boxes away, a tiny negative
// (whose wrapped value rounds to L and must come out as 0).
const outside: [number, number, number][] = [[5, 0, -0.25], [15, 1, 1.9], [25, 2, 0.7], [35, 0, -37.2], [35, 1, 412.5], [35, 2, 9.1], [45, 0, -1e-17]];
for (const [i, d, v] of outside) moved[3 * i + d] = v;
const masses = clustered.masses.map((m, i) => m * (1 + 0.5 * Math.sin(i)));
const uniform = snapshotUniform(2500, 3, [2, 2, 2], 7, 0.8);

describe('WebAssembly particle passes = JavaScript twins', () => {
  it('run on the WebAssembly path here', () => expect(prepareWasmCreate()).not.toBeNull());

  for (const [name, pos, m, box] of [
    ['clustered, rectangular box, particles outside in every way, unequal masses', moved, masses, clustered.box],
    ['uniform, cubic box, mass spread 0.8', uniform.positions, uniform.masses, uniform.box],
  ] as const) {
    it(`the same bits: ${name}`, () => {
      const w = setupOn(true, pos, m, box), j = setupOn(false, pos, m, box);
      expect(Array.from(w.positions)).toEqual(Array.from(j.positions));
      expect(w.wrapped).toBe(j.wrapped);
      expect(w.totalMass).toBe(j.totalMass);
      for (const key of ['alpha', 'rCut', 'kCut', 'clustering', 'accelerationScale', 'predictedRmsError'] as const) expect(w.params[key]).toBe(j.params[key]);
      expect(w.params.cells).toEqual(j.params.cells);
      for (const key of ['start', 'order', 'slot', 'xyzm', 'stencil'] as const) expect(Array.from(w.cells[key])).toEqual(Array.from(j.cells[key]));
      expect(w.cells.w).toEqual(j.cells.w);
      expect(w.cells.halfCount).toBe(j.cells.halfCount);
      expect(w.cells.xyzm.buffer).toBeInstanceOf(SharedArrayBuffer);
    });
  }

  it('counts the wrapped particles (5 moved here) and wraps onto [0, L)', () => {
    const w = setupOn(true, moved, masses, clustered.box);
    expect(w.wrapped).toBe(5);
    for (let i = 0; i < w.positions.length; i++) {
      expect(w.positions[i]).toBeGreaterThanOrEqual(0);
      expect(w.positions[i]).toBeLessThan(rect[i % 3]);
    }
  });

  it('a non-finite coordinate or mass: the same error on both paths, naming the particle', () => {
    const p = Float64Array.from(uniform.positions);
    p[3 * 17 + 1] = Infinity;
    expect(() => setupOn(true, p, uniform.masses, uniform.box)).toThrow(/coordinate y of particle 17 is not finite/);
    expect(() => setupOn(false, p, uniform.masses, uniform.box)).toThrow(/coordinate y of particle 17 is not finite/);
    const mm = Float64Array.from(uniform.masses);
    mm[9] = NaN;
    expect(() => setupOn(true, uniform.positions, mm, uniform.box)).toThrow(/mass of particle 9 is not finite/);
  });

  it('the hash pass for coincident positions agrees with the cell search, pair or none, −0 as +0', () => {
    const base = snapshotUniform(4000, 12, [1, 1, 1]);
    const variants: [string, (p: Float64Array) => void, boolean][] = [
      ['all distinct', () => undefined, false],
      ['one pair far apart in the input', (p) => p.set(p.subarray(3 * 7, 3 * 8), 3 * 3990), true],
      ['equal in two coordinates only', (p) => p.set(p.subarray(3 * 11, 3 * 11 + 2), 3 * 12), false],
      ['a copy one box length away (the same once wrapped)', (p) => p.set([p[3 * 5] + 1, p[3 * 5 + 1], p[3 * 5 + 2] - 1], 3 * 6), true],
      ['−0 and +0 in the same place', (p) => p.set([0, 0.5, 0.5, -0, 0.5, 0.5], 3 * 20), true],
      ['1000 particles at one point', (p) => {
        for (let i = 0; i < 1000; i++) p.set([0.25, 0.5, 0.75], 3 * (2000 + i));
      }, true],
    ];
    for (const [name, change, expected] of variants) {
      const p = Float64Array.from(base.positions);
      change(p);
      const prep = prepareWasmCreate()!;
      const wrapped = new Float64Array(p.length);
      prep.particles(p, base.masses, boxMake(1), [8, 8, 8], wrapped);
      const cells = prep.cellList(boxMake(1), [10, 10, 10], 0.3, false);
      expect(prep.anyCoincident(), name).toBe(expected);
      expect(cellListFindCoincident(cells) !== null, name).toBe(expected);
    }
  });
});
