/**
 * The WebAssembly Fourier kernels against their JavaScript twins (engine/ewald/kSpace.ts), piece by
 * piece: the structure factor over source ranges of odd and even length (the kernel takes particles in
 * pairs) and the evaluation at every particle. Independent derivation: the twins are separate codes for
 * the same sums, one k-vector at a time, while the kernels take the k-vectors ±hz of a column together,
 * so agreement to round-off checks both (a sum of O(N) unit terms: 1e-13 of its scale). Besides the
 * default setup: a box so thin in z that only hz = 0 exists (one slot per column, padded), and a cutoff so
 * short that the k-vectors are a handful of columns, the (0, 0) column (hz > 0 only) among them.
 */
import { describe, expect, it } from 'vitest';
import { ewaldSetup, ewaldStructureFactor, ewaldWeighStructureFactor, ewaldFourierChunk } from '../../../engine/ewald/ewald';
import { kSpaceStructureFactor, kSpaceTargets } from '../../../engine/ewald/kSpace';
import { kernelModule } from '../../../engine/wasm/module';
import { snapshotClustered } from '../../helpers/snapshots';

const s = snapshotClustered(301, 5, [1, 1.3, 0.8]);
const thin = snapshotClustered(301, 6, [1, 1.2, 0.05]);
const setups = [
  ['clustered, 1 × 1.3 × 0.8 box, tol 1e-8', ewaldSetup(s.positions, s.masses, s.box, { tol: 1e-8 })],
  ['thin 1 × 1.2 × 0.05 box, k_c below 2π/L_z (hz = 0 only)', ewaldSetup(thin.positions, thin.masses, thin.box, { alpha: 8, rCut: 0.6, kCut: 60 })],
  ['k_c = 1.5·2π/L: a handful of columns', ewaldSetup(s.positions, s.masses, s.box, { alpha: 3, rCut: 1.5, kCut: 1.5 * 2 * Math.PI })],
] as const;

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (const v of a) m = Math.max(m, Math.abs(v));
  return m;
}

describe.each(setups)('WebAssembly Fourier kernels = JavaScript twins (%s)', (_name, setup) => {
  it('runs on the WebAssembly path here', () => expect(kernelModule()).not.toBeNull());

  it('has the k-vectors the case is about', () => {
    expect(setup.kspace.count).toBeGreaterThan(0);
    if (setup.box.lz < 0.1) expect(setup.kspace.hMax[2]).toBe(0);
  });

  it('structure factor over [0, 7), [7, 301), [0, 301), [3, 4): equal to the twin to 1e-13 of max|S|', () => {
    for (const [b, e] of [[0, 7], [7, 301], [0, 301], [3, 4], [10, 10]]) {
      const w = ewaldStructureFactor(setup, b, e);
      const j = new Float64Array(2 * setup.kspace.count);
      kSpaceStructureFactor(setup.kspace, setup.box, setup.positions, setup.masses, b, e, j);
      const scale = Math.max(maxAbs(j), 1e-300);
      for (let k = 0; k < j.length; k++) expect(Math.abs(w[k] - j[k])).toBeLessThanOrEqual(1e-13 * scale);
    }
  });

  it('evaluation at every particle (chunks of odd length): accelerations and potentials equal to the twin to 1e-13 of their scale', () => {
    const ws = ewaldWeighStructureFactor(setup, ewaldStructureFactor(setup, 0, 301));
    const n = 301;
    const targets = Int32Array.from({ length: n }, (_, i) => i);
    const accW = new Float64Array(3 * n), phiW = new Float64Array(n);
    for (let b = 0; b < n; b += 37) ewaldFourierChunk(setup, ws, targets, b, Math.min(n, b + 37), accW, phiW);
    const accJ = new Float64Array(3 * n), phiJ = new Float64Array(n);
    kSpaceTargets(setup.kspace, setup.box, ws, setup.positions, targets, 0, n, accJ, phiJ);
    const sa = maxAbs(accJ), sp = maxAbs(phiJ);
    for (let k = 0; k < 3 * n; k++) expect(Math.abs(accW[k] - accJ[k])).toBeLessThanOrEqual(1e-13 * sa);
    for (let k = 0; k < n; k++) expect(Math.abs(phiW[k] - phiJ[k])).toBeLessThanOrEqual(1e-13 * sp);
  });
});
