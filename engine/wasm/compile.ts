/**
 * Switching the engine's WebAssembly modules off, and compiling one. Off: globalThis.TORUSGRAV_NO_WASM =
 * true, or env TORUSGRAV_NO_WASM=1 in Node; callers then use their JavaScript twins (tests run both paths
 * this way).
 */
import { base64Bytes } from '../util/base64';

/** Whether the engine's WebAssembly modules are switched off. */
export function wasmDisabled(): boolean {
  const g = globalThis as { TORUSGRAV_NO_WASM?: boolean; process?: { env?: Record<string, string | undefined> } };
  return g.TORUSGRAV_NO_WASM === true || g.process?.env?.TORUSGRAV_NO_WASM === '1';
}

/**
 * Whether the kernels' relaxed-SIMD build (fused multiply-add) is switched off, so that the plain SIMD
 * build runs even where relaxed SIMD validates: globalThis.TORUSGRAV_NO_RELAXED_SIMD = true, or env
 * TORUSGRAV_NO_RELAXED_SIMD=1 in Node (tests run every kernel path this way).
 */
export function wasmRelaxedDisabled(): boolean {
  const g = globalThis as { TORUSGRAV_NO_RELAXED_SIMD?: boolean; process?: { env?: Record<string, string | undefined> } };
  return g.TORUSGRAV_NO_RELAXED_SIMD === true || g.process?.env?.TORUSGRAV_NO_RELAXED_SIMD === '1';
}

/**
 * The module whose binary is `base64`, compiled synchronously; null when switched off, when there is no
 * WebAssembly, or when this engine refuses it (e.g. no SIMD). Callers cache it per thread.
 */
export function wasmCompile(base64: string): WebAssembly.Module | null {
  if (wasmDisabled() || typeof WebAssembly === 'undefined') return null;
  try {
    const bytes = base64Bytes(base64);
    return WebAssembly.validate(bytes) ? new WebAssembly.Module(bytes) : null;
  } catch {
    return null;
  }
}
