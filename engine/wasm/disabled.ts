/**
 * Whether the engine's WebAssembly modules are switched off: globalThis.TORUSGRAV_NO_WASM = true, or env
 * TORUSGRAV_NO_WASM=1 in Node. Callers then use their JavaScript twins (tests run both paths this way).
 */
export function wasmDisabled(): boolean {
  const g = globalThis as { TORUSGRAV_NO_WASM?: boolean; process?: { env?: Record<string, string | undefined> } };
  return g.TORUSGRAV_NO_WASM === true || g.process?.env?.TORUSGRAV_NO_WASM === '1';
}
