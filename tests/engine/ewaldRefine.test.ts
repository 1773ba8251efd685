/**
 * The weak-field refinement reuses the finished run's particles and cell list (ewaldSetupRefine): the
 * cell grid stays and only the stencil is remade for the new, usually much longer cutoff (few targets make
 * a small α the cheapest choice, so r_c exceeds the box and the stencil reaches several images).
 * Checked against a fresh setup of the same targets at the same tolerance (same α, r_c, k_c; its own cell
 * grid), and against a tol = 1e-13 evaluation (the tolerance promise), on both kernel paths.
 */
import { expect, it } from 'vitest';
import {
  ewaldAllRealChunk,
  ewaldAllRealCollect,
  ewaldCellCount,
  ewaldForces,
  ewaldSetup,
  ewaldSetupRefine,
  ewaldStructureFactor,
  ewaldTargetsRun,
} from '../../engine/ewald/ewald';
import type { EwaldOptions } from '../../engine/ewald/params';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { snapshotClustered, snapshotUniform } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';

const RECT: [number, number, number] = [1, 1.6, 0.7];
const ROWS = Int32Array.from([3, 500, 1777, 1999]);
const cases = [
  ['uniform', snapshotUniform(2000, 4, RECT), {}],
  ['clustered', snapshotClustered(2000, 5, RECT), {}],
  ['clustered, spline softening h = 0.01', snapshotClustered(2000, 6, RECT), { softening: { kind: 'spline', h: 0.01 } }],
] as const;

describeKernelPaths('ewaldSetupRefine', (path) => {
  for (const [name, s, extra] of cases) {
    it(`few targets at a tighter tolerance on the run's own cell list equal a fresh setup's, ${name}`, () => {
      const base = ewaldSetup(s.positions, s.masses, s.box, { tol: 1e-5, ...(extra as EwaldOptions) });
      const options: EwaldOptions = { tol: 1e-9, ...(extra as EwaldOptions) };
      const refine = ewaldSetupRefine(base, options, ROWS.length);
      const fresh = ewaldForces(s.positions, s.masses, s.box, ROWS, options, undefined, false);
      // Same parameters as a fresh choice for these targets, but the base run's grid and particles.
      expect(refine.params.alpha).toBe(fresh.params.alpha);
      expect(refine.params.rCut).toBe(fresh.params.rCut);
      expect(refine.params.kCut).toBe(fresh.params.kCut);
      expect(refine.params.cells).toEqual(base.params.cells);
      expect(refine.cells.xyzm).toBe(base.cells.xyzm);
      // The stencil reaches beyond the box (several images of each cell): the case a fresh grid avoids.
      expect(refine.params.rCut).toBeGreaterThan(Math.min(...RECT));
      const r = ewaldTargetsRun(refine, ROWS);
      expect(maxVectorRelativeError(r.acc, fresh.acc)).toBeLessThan(1e-12);
      expect(maxScalarErrorOverRms(r.phi, fresh.phi)).toBeLessThan(1e-12);
      const ref = ewaldForces(s.positions, s.masses, s.box, ROWS, { ...options, tol: 1e-13 }, undefined, false);
      expect(maxVectorRelativeError(r.acc, ref.acc)).toBeLessThan(1e-9);
    });

    it(`after a finished run, made inside the run's WebAssembly contexts: the same bits, the run's sums untouched, ${name}`, () => {
      const opts = { tol: 1e-5, ...(extra as EwaldOptions) };
      const options: EwaldOptions = { tol: 1e-9, ...(extra as EwaldOptions) };
      const base = ewaldSetup(s.positions, s.masses, s.box, opts);
      ewaldStructureFactor(base);
      ewaldAllRealChunk(base, 0, ewaldCellCount(base));
      const refine = ewaldSetupRefine(base, options, ROWS.length);
      // Where the kernels run in WebAssembly, the run made its contexts and the refinement derives its own.
      expect(refine.rWasm === undefined).toBe(path.noWasm);
      expect(refine.kWasm === undefined).toBe(path.noWasm);
      const r = ewaldTargetsRun(refine, ROWS);
      const alone = ewaldTargetsRun(ewaldSetupRefine(ewaldSetup(s.positions, s.masses, s.box, opts), options, ROWS.length), ROWS);
      expect(Array.from(r.acc)).toEqual(Array.from(alone.acc));
      expect(Array.from(r.phi)).toEqual(Array.from(alone.phi));
      const other = ewaldSetup(s.positions, s.masses, s.box, opts);
      ewaldAllRealChunk(other, 0, ewaldCellCount(other));
      const mine = ewaldAllRealCollect(base), theirs = ewaldAllRealCollect(other);
      expect(Array.from(mine.accSorted)).toEqual(Array.from(theirs.accSorted));
      expect(Array.from(mine.phiSorted)).toEqual(Array.from(theirs.phiSorted));
    });
  }
});
