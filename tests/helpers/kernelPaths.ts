/**
 * The engine runs its real-space and Fourier sums in WebAssembly where available and in JavaScript twins
 * otherwise (engine/wasm/module.ts; switched off by the environment variable TORUSGRAV_NO_WASM=1, read on
 * every setup). `describeKernelPaths` registers a suite once per path so both twins meet the same checks.
 */
import { afterAll, beforeAll, describe } from 'vitest';

export const KERNEL_PATHS = [
  { label: 'WebAssembly kernels', noWasm: false },
  { label: 'JavaScript kernels', noWasm: true },
] as const;

/** describe(`${title} [path]`, body) for each kernel path, with TORUSGRAV_NO_WASM set accordingly. */
export function describeKernelPaths(title: string, body: (path: (typeof KERNEL_PATHS)[number]) => void): void {
  for (const path of KERNEL_PATHS) {
    describe(`${title} [${path.label}]`, () => {
      let saved: string | undefined;
      beforeAll(() => {
        saved = process.env.TORUSGRAV_NO_WASM;
        if (path.noWasm) process.env.TORUSGRAV_NO_WASM = '1';
        else delete process.env.TORUSGRAV_NO_WASM;
      });
      afterAll(() => {
        if (saved === undefined) delete process.env.TORUSGRAV_NO_WASM;
        else process.env.TORUSGRAV_NO_WASM = saved;
      });
      body(path);
    });
  }
}
