/**
 * Relaxed SIMD for the engine's kernels (fused multiply-add; engine/wasm/module.ts picks that build where
 * it validates). Browsers ship it; Node 20's V8 has it behind a flag, which this sets for the process and
 * its worker threads, before any kernel module is compiled, when the relaxed build does not validate as
 * is. With TORUSGRAV_NO_RELAXED_SIMD=1 (or TORUSGRAV_NO_WASM=1) V8 is left as it is.
 */
import { setFlagsFromString } from 'node:v8';
import { wasmDisabled, wasmRelaxedDisabled } from '../../engine/wasm/compile';
import { kernelsRelaxedValidate } from '../../engine/wasm/module';

export function relaxedSimdEnable(): void {
  if (wasmDisabled() || wasmRelaxedDisabled() || kernelsRelaxedValidate()) return;
  setFlagsFromString('--experimental-wasm-relaxed-simd');
}
