/**
 * The engine runs its real-space and Fourier sums in WebAssembly where available — the relaxed-SIMD build
 * (fused multiply-add) where it validates, else the plain SIMD build — and in JavaScript twins otherwise
 * (engine/wasm/module.ts; switched by the environment variables TORUSGRAV_NO_RELAXED_SIMD=1 and
 * TORUSGRAV_NO_WASM=1, read on every setup). `describeKernelPaths` registers a suite once per path so that
 * all three meet the same checks.
 */
import { afterAll, beforeAll, describe } from 'vitest';

export const KERNEL_PATHS = [
  { label: 'WebAssembly kernels', noWasm: false, noRelaxed: false },
  { label: 'WebAssembly kernels without relaxed SIMD', noWasm: false, noRelaxed: true },
  { label: 'JavaScript kernels', noWasm: true, noRelaxed: false },
] as const;

/** describe(`${title} [path]`, body) for each kernel path, with TORUSGRAV_NO_WASM set accordingly. */
export function describeKernelPaths(title: string, body: (path: (typeof KERNEL_PATHS)[number]) => void): void {
  for (const path of KERNEL_PATHS) {
    describe(`${title} [${path.label}]`, () => {
      const saved: Record<string, string | undefined> = {};
      const vars = { TORUSGRAV_NO_WASM: path.noWasm, TORUSGRAV_NO_RELAXED_SIMD: path.noRelaxed };
      beforeAll(() => {
        for (const [name, on] of Object.entries(vars)) {
          saved[name] = process.env[name];
          if (on) process.env[name] = '1';
          else delete process.env[name];
        }
      });
      afterAll(() => {
        for (const name of Object.keys(vars)) {
          if (saved[name] === undefined) delete process.env[name];
          else process.env[name] = saved[name];
        }
      });
      body(path);
    });
  }
}
