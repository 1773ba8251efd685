/**
 * Relaxed SIMD for the engine's kernels (fused multiply-add; engine/wasm/module.ts picks that build where
 * it validates). Browsers ship it; Node 20's V8 has it behind a flag. Where the relaxed build does not
 * validate as is, this sets the flag, compiles the kernel module (kept for the process; worker threads get
 * it from the main thread) and sets the flag back. A module keeps the features it was compiled with.
 * Leaving V8's flags changed is not free: every later compile of one of Node's built-in modules (all of a
 * worker thread's start-up) checks the flag set and misses its code cache when it differs. Measured
 * 2026-12-02 (N = 16384, 2 threads): the worker reached its first line 88–97 ms after it was started
 * instead of 118–134 ms, and the whole command took 0.53–0.56 s instead of 0.55–0.59 s.
 * With TORUSGRAV_NO_RELAXED_SIMD=1 (or TORUSGRAV_NO_WASM=1) V8 is left as it is.
 */
import { setFlagsFromString } from 'node:v8';
import { wasmDisabled, wasmRelaxedDisabled } from '../../engine/wasm/compile';
import { kernelModule, kernelsRelaxedValidate } from '../../engine/wasm/module';

export function relaxedSimdEnable(): void {
  if (wasmDisabled() || wasmRelaxedDisabled() || kernelsRelaxedValidate()) return;
  setFlagsFromString('--experimental-wasm-relaxed-simd');
  try {
    kernelModule();
  } finally {
    setFlagsFromString('--no-experimental-wasm-relaxed-simd');
  }
}
