import { describe, expect, it } from 'vitest';
import { ewaldForces, type EwaldOptions, type EwaldResult, targetsResolve } from '../../engine/index';
import { kernelModule } from '../../engine/wasm/module';
import { describeKernelPaths } from '../helpers/kernelPaths';
import { snapshotClustered } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';

describeKernelPaths('the kernel path switch', (path) => {
  it(`TORUSGRAV_NO_WASM selects the path under test (${path.label})`, () => {
    expect(kernelModule() === null).toBe(path.noWasm);
  });
});

describe('WebAssembly and JavaScript kernels agree to round-off (same α, r_c, k_c, same terms)', () => {
  const s = snapshotClustered(600, 21, [3, 2, 2.5], 5);
  const targets = targetsResolve({ kind: 'sample', count: 150, seed: 4 }, 600);
  const fixed: EwaldOptions = { G: 4.30091e-6, alpha: 3, rCut: 1.8, kCut: 2 * 3 * 5.5 };
  const variants: [string, EwaldOptions][] = [
    ['no softening', fixed],
    ['spline softening h = 0.04', { ...fixed, softening: { kind: 'spline', h: 0.04 } }],
    ['spline softening h = 2.1 (beyond r_c)', { ...fixed, softening: { kind: 'spline', h: 2.1 } }],
    ['Plummer softening ε = 0.01', { ...fixed, softening: { kind: 'plummer', eps: 0.01 } }],
  ];

  const run = (noWasm: boolean, tg: Int32Array | null, o: EwaldOptions): EwaldResult => {
    const saved = process.env.TORUSGRAV_NO_WASM;
    if (noWasm) process.env.TORUSGRAV_NO_WASM = '1';
    else delete process.env.TORUSGRAV_NO_WASM;
    try {
      return ewaldForces(s.positions, s.masses, s.box, tg, o);
    } finally {
      if (saved === undefined) delete process.env.TORUSGRAV_NO_WASM;
      else process.env.TORUSGRAV_NO_WASM = saved;
    }
  };

  for (const [name, o] of variants) {
    it(`all particles and a 150-target sample, ${name}: accelerations to 1e-12 relative, potentials to 1e-13 of rms`, () => {
      for (const tg of [null, targets]) {
        const w = run(false, tg, o), j = run(true, tg, o);
        expect(maxVectorRelativeError(w.acc, j.acc)).toBeLessThan(1e-12);
        expect(maxScalarErrorOverRms(w.phi, j.phi)).toBeLessThan(1e-13);
      }
    });
  }
});
