import { describe, expect, it } from 'vitest';
import { ewaldForces, type EwaldOptions, type EwaldResult, targetsResolve } from '../../engine/index';
import { kernelModule, kernelVariant } from '../../engine/wasm/module';
import { KERNEL_PATHS, describeKernelPaths } from '../helpers/kernelPaths';
import { snapshotClustered } from '../helpers/snapshots';
import { maxScalarErrorOverRms, maxVectorRelativeError } from '../helpers/tolerance';

describeKernelPaths('the kernel path switch', (path) => {
  it(`TORUSGRAV_NO_WASM and TORUSGRAV_NO_RELAXED_SIMD select the path under test (${path.label})`, () => {
    expect(kernelModule() === null).toBe(path.noWasm);
    // The relaxed-SIMD build validates here: tests/setup/relaxedSimd.ts sets V8's flag as the CLI does.
    expect(kernelVariant()).toBe(path.noWasm ? null : path.noRelaxed ? 'simd' : 'relaxed-simd');
  });
});

describe('both WebAssembly builds and the JavaScript kernels agree to round-off (same α, r_c, k_c, same terms)', () => {
  const s = snapshotClustered(600, 21, [3, 2, 2.5], 5);
  const targets = targetsResolve({ kind: 'sample', count: 150, seed: 4 }, 600);
  const fixed: EwaldOptions = { G: 4.30091e-6, alpha: 3, rCut: 1.8, kCut: 2 * 3 * 5.5 };
  const variants: [string, EwaldOptions][] = [
    ['no softening', fixed],
    ['spline softening h = 0.04', { ...fixed, softening: { kind: 'spline', h: 0.04 } }],
    ['spline softening h = 2.1 (beyond r_c)', { ...fixed, softening: { kind: 'spline', h: 2.1 } }],
    ['Plummer softening ε = 0.01', { ...fixed, softening: { kind: 'plummer', eps: 0.01 } }],
  ];

  const run = (path: (typeof KERNEL_PATHS)[number], tg: Int32Array | null, o: EwaldOptions): EwaldResult => {
    const vars = { TORUSGRAV_NO_WASM: path.noWasm, TORUSGRAV_NO_RELAXED_SIMD: path.noRelaxed };
    const saved = Object.fromEntries(Object.keys(vars).map((k) => [k, process.env[k]]));
    for (const [k, on] of Object.entries(vars)) {
      if (on) process.env[k] = '1';
      else delete process.env[k];
    }
    try {
      return ewaldForces(s.positions, s.masses, s.box, tg, o);
    } finally {
      for (const [k, v] of Object.entries(saved)) {
        if (v === undefined) delete process.env[k];
        else process.env[k] = v;
      }
    }
  };
  const [relaxed, plain, js] = KERNEL_PATHS;

  for (const [name, o] of variants) {
    it(`all particles and a 150-target sample, ${name}: accelerations to 1e-12 relative, potentials to 1e-13 of rms`, () => {
      for (const tg of [null, targets]) {
        const j = run(js, tg, o);
        for (const w of [run(relaxed, tg, o), run(plain, tg, o)]) {
          expect(maxVectorRelativeError(w.acc, j.acc)).toBeLessThan(1e-12);
          expect(maxScalarErrorOverRms(w.phi, j.phi)).toBeLessThan(1e-13);
        }
      }
    });
  }
});
