import { describe, expect, it } from 'vitest';
import { boxMake } from '../../../engine/box';
import { EngineInputError } from '../../../engine/ewald/ewald';
import {
  pmeFinalize,
  pmeForces,
  pmeForwardChunk,
  pmeInterpolateChunk,
  pmeInverseChunk,
  pmeMeshAlloc,
  pmeRealChunk,
  pmeRealCollect,
  pmeScratch,
  pmeSetup,
  pmeSolveChunk,
  pmeSpreadBlocks,
  pmeSpreadChunk,
  pmeWorkUnits,
} from '../../../engine/pme/index';
import { snapshotClustered, snapshotUniform } from '../../helpers/snapshots';

const box = boxMake(1, 1.3, 0.8);

/** Runs fn and returns what it threw (fails the test if it did not throw). */
function thrown(fn: () => unknown): Error {
  try {
    fn();
  } catch (e) {
    return e as Error;
  }
  throw new Error('expected a throw');
}

describe('pmeForces with few particles', () => {
  it('no particles: empty accelerations and potentials', () => {
    const r = pmeForces(new Float64Array(0), new Float64Array(0), box);
    expect(r.acc).toHaveLength(0);
    expect(r.phi).toHaveLength(0);
    expect(r.predictedRmsRelativeError).toBe(0);
  });
  it('coincident particles without softening: an EngineInputError naming both rows; with softening, finite forces', () => {
    const p = new Float64Array([0.1, 0.2, 0.3, 0.5, 0.5, 0.5, 0.1, 0.2, 0.3]);
    const m = new Float64Array([1, 1, 1]);
    const e = thrown(() => pmeForces(p, m, box));
    expect(e).toBeInstanceOf(EngineInputError);
    expect(e.message).toMatch(/particles 0 and 2 sit at the same position/);
    const r = pmeForces(p, m, box, { softening: { kind: 'spline', h: 0.05 } });
    for (const a of r.acc) expect(Number.isFinite(a)).toBe(true);
  });
  it('finds a coincident pair among 200 particles packed into one finest grid cell (the sorted path), and none when all differ', () => {
    const n = 200;
    const p = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) p.set([0.5 + 1e-7 * i, 0.5 + 3e-8 * ((i * 7) % 13), 0.4 + 2e-8 * ((i * 5) % 11)], 3 * i);
    const m = new Float64Array(n).fill(1);
    expect(() => pmeForces(p, m, box, { tol: 1e-3 })).not.toThrow();
    p.set(p.subarray(3 * 17, 3 * 18), 3 * 150);
    expect(thrown(() => pmeForces(p, m, box, { tol: 1e-3 })).message).toMatch(/particles 17 and 150 sit at the same position/);
  });
});

describe('pmeForces rejects bad input with a one-line error that says what and where', () => {
  const p = new Float64Array([0.1, 0.2, 0.3, 0.4, 0.5, 0.6]);
  const m = new Float64Array([1, 1]);
  it('non-finite coordinates and masses, mismatched lengths', () => {
    expect(thrown(() => pmeForces(new Float64Array([0.1, NaN, 0.3]), new Float64Array([1]), box)).message).toMatch(/coordinate y of particle 0 is not finite/);
    expect(thrown(() => pmeForces(p, new Float64Array([1, Infinity]), box)).message).toMatch(/mass of particle 1 is not finite/);
    expect(thrown(() => pmeForces(p, new Float64Array([1]), box)).message).toMatch(/positions hold 6 numbers but 1 masses need 3/);
  });
  it('options: tolerance, order, mesh, α, r_c, influence, maxMeshPoints', () => {
    const cases: [object, RegExp][] = [
      [{ tol: 0 }, /tolerance must lie in \(0, 1\), got 0/],
      [{ tol: 1 }, /tolerance must lie in \(0, 1\), got 1/],
      [{ G: -1 }, /G must be a positive finite number, got -1/],
      [{ order: 1 }, /order must be an integer from 2 to 12, got 1/],
      [{ order: 4.5 }, /order must be an integer from 2 to 12, got 4.5/],
      [{ mesh: 14 }, /mesh side 0 must be a positive integer with prime factors 2, 3, 5 only, got 14/],
      [{ mesh: [9, 8, 8] }, /mesh side 0 must be even, got 9/],
      [{ mesh: [8, 8, 4], order: 6 }, /mesh 8×8×4 has fewer points per side than the order 6/],
      [{ alpha: -2 }, /alpha must be a positive finite number, got -2/],
      [{ rCut: NaN }, /rCut must be a positive finite number, got NaN/],
      [{ influence: 'fancy' }, /influence must be 'optimal' or 'spme', got fancy/],
      [{ maxMeshPoints: 0 }, /maxMeshPoints must be a finite number ≥ 8, got 0/],
      [{ softening: { kind: 'plummer', eps: 0 } }, /Plummer softening length must be > 0, got 0/],
    ];
    for (const [opts, msg] of cases) {
      const e = thrown(() => pmeForces(p, m, box, opts as never));
      expect(e).toBeInstanceOf(RangeError);
      expect(e.message).toMatch(msg);
      expect(e.message).not.toMatch(/\n/);
    }
  });
  it('positions outside the box are wrapped and counted', () => {
    const r = pmeForces(new Float64Array([1.1, 0.2, 0.3, -0.4, 0.5, 0.6, 0.2, 0.2, 0.2]), new Float64Array([1, 1, 1]), box);
    expect(r.wrapped).toBe(2);
  });
});

describe('the chunked pieces give the one-thread result (what a scheduler relies on)', () => {
  it('spread into two meshes summed, FFT passes and interpolation split in uneven chunks, real space by cell ranges', () => {
    const s = snapshotClustered(3000, 51, [1, 1.3, 0.8]);
    const whole = pmeForces(s.positions, s.masses, s.box, { tol: 1e-5 });
    const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-5 });
    const u = pmeWorkUnits(setup);
    const n = u.particles;
    const a = pmeMeshAlloc(setup), b = pmeMeshAlloc(setup);
    pmeSpreadChunk(setup, a, 0, 1111);
    pmeSpreadChunk(setup, b, 1111, n);
    for (let k = 0; k < a.length; k++) a[k] += b[k];
    const sc1 = pmeScratch(setup), sc2 = pmeScratch(setup);
    const cb = Math.floor(u.columnBlocks / 3);
    pmeForwardChunk(setup, a, 0, cb, sc1);
    pmeForwardChunk(setup, a, cb, u.columnBlocks, sc2);
    const sl = Math.ceil(u.slabs / 2);
    pmeSolveChunk(setup, a, sl, u.slabs, sc2);
    pmeSolveChunk(setup, a, 0, sl, sc1);
    pmeInverseChunk(setup, a, cb, u.columnBlocks, sc1);
    pmeInverseChunk(setup, a, 0, cb, sc2);
    const acc = new Float64Array(3 * n), phi = new Float64Array(n);
    pmeInterpolateChunk(setup, a, 2000, n, acc, phi);
    pmeInterpolateChunk(setup, a, 0, 2000, acc, phi);
    const c3 = Math.floor(u.cells / 3);
    pmeRealChunk(setup, c3, u.cells);
    pmeRealChunk(setup, 0, c3);
    pmeRealCollect(setup, acc, phi);
    const out = pmeFinalize(setup, acc, phi);
    let scale = 0;
    for (const x of whole.acc) scale = Math.max(scale, Math.abs(x));
    for (let k = 0; k < out.acc.length; k++) expect(Math.abs(out.acc[k] - whole.acc[k])).toBeLessThan(1e-12 * scale);
    for (let k = 0; k < n; k++) expect(Math.abs(out.phi[k] - whole.phi[k])).toBeLessThan(1e-12 * Math.abs(whole.phi[k]) + 1e-12);
  });
  it('pmeSpreadBlocks: same-parity blocks write to disjoint mesh planes, and cover all particles in order', () => {
    for (const s of [snapshotUniform(4000, 53, [1, 1.3, 0.8]), snapshotClustered(4000, 54, [1, 1.3, 0.8])]) {
      const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-4, order: 6 });
      const cuts = pmeSpreadBlocks(setup, 4);
      expect(cuts).not.toBeNull();
      expect(cuts![0]).toBe(0);
      expect(cuts![4]).toBe(4000);
      const [n0, n1, n2] = setup.params.mesh;
      const planes = [0, 1, 2, 3].map((b) => {
        expect(cuts![b + 1]).toBeGreaterThan(cuts![b]);
        const mesh = pmeMeshAlloc(setup);
        pmeSpreadChunk(setup, mesh, cuts![b], cuts![b + 1]);
        const used = new Set<number>();
        for (let x = 0; x < n0; x++) for (let k = 0; k < n1 * n2; k++) if (mesh[x * n1 * n2 + k] !== 0) { used.add(x); break; }
        return used;
      });
      for (const [a, b] of [[0, 2], [1, 3]]) for (const x of planes[a]) expect(planes[b].has(x)).toBe(false);
    }
    const thin = pmeSetup(new Float64Array([0.1, 0.1, 0.1, 0.5, 0.5, 0.5]), new Float64Array([1, 1]), box, { mesh: 8, order: 6 });
    expect(pmeSpreadBlocks(thin, 4)).toBeNull();
    expect(() => pmeSpreadBlocks(thin, 3)).toThrow(/spread blocks must be an even integer ≥ 2, got 3/);
  });
  it('the work units are positive and the parameters carry the predicted errors and the model cost', () => {
    const s = snapshotUniform(500, 52, [1, 1.3, 0.8]);
    const setup = pmeSetup(s.positions, s.masses, s.box, { tol: 1e-4 });
    const u = pmeWorkUnits(setup);
    expect(u.particles).toBe(500);
    expect(u.columnBlocks).toBeGreaterThan(0);
    expect(u.slabs).toBe(setup.params.mesh[0] / 2 + 1);
    expect(u.cells).toBe(setup.params.cells[0] * setup.params.cells[1] * setup.params.cells[2]);
    const p = setup.params;
    expect(p.predictedRelativeError).toBeLessThanOrEqual(1e-4);
    expect(p.predictedRmsError).toBeCloseTo(Math.hypot(p.meshError, p.realError), 12);
    expect(p.modelSeconds).toBeGreaterThan(0);
  });
});
