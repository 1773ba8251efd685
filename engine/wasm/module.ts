/**
 * Loads the engine's WebAssembly kernels (SIMD) once per thread. Two builds of the same source: with
 * relaxed SIMD (fused multiply-add: 10–15 % faster on the project machine) where the engine validates it
 * (browsers; Node 20 after the CLI sets V8's flag, app/cli/wasmFeatures.ts), else plain SIMD. Returns null
 * where WebAssembly SIMD is unavailable or disabled (globalThis.TORUSGRAV_NO_WASM = true, or env
 * TORUSGRAV_NO_WASM=1 in Node), and callers then use the JavaScript twins of the kernels;
 * TORUSGRAV_NO_RELAXED_SIMD likewise keeps the plain SIMD build.
 */
import { KERNELS_WASM_BASE64 } from './kernelsBinary';
import { KERNELS_RELAXED_WASM_BASE64 } from './kernelsRelaxedBinary';
import { wasmCompile, wasmDisabled, wasmRelaxedDisabled } from './compile';
import { base64Bytes } from '../util/base64';

export interface KernelExports {
  memory: WebAssembly.Memory;
  structurePaired: (...args: number[]) => void;
  fourierPaired: (...args: number[]) => void;
}

/** Which build of the kernels a thread runs. */
export type KernelVariant = 'relaxed-simd' | 'simd';

let relaxed: WebAssembly.Module | null | undefined;
let plain: WebAssembly.Module | null | undefined;
let shared: WebAssembly.Module | null = null;

/** The build kernelModule() returns here, or null (JavaScript twins). */
export function kernelVariant(): KernelVariant | null {
  if (wasmDisabled()) return null;
  if (!wasmRelaxedDisabled()) {
    if (relaxed === undefined) relaxed = wasmCompile(KERNELS_RELAXED_WASM_BASE64);
    if (relaxed) return 'relaxed-simd';
  }
  if (plain === undefined) plain = wasmCompile(KERNELS_WASM_BASE64);
  return plain ? 'simd' : null;
}

/** The compiled kernel module, or null when WebAssembly SIMD cannot be used here. */
export function kernelModule(): WebAssembly.Module | null {
  if (wasmDisabled()) return null;
  if (shared) return shared;
  const v = kernelVariant();
  return v === 'relaxed-simd' ? relaxed! : v === 'simd' ? plain! : null;
}

/**
 * Uses an already compiled kernel module (e.g. the main thread's, sent to a worker): threads that share
 * one module share its compiled code, including the optimised tier. Ignored where the kernels are off.
 */
export function kernelModuleShare(mod: WebAssembly.Module | null): void {
  if (!wasmDisabled() && mod) shared = mod;
}

/** A fresh instance (own linear memory) of the kernels, or null. */
export function kernelInstance(): KernelExports | null {
  const mod = kernelModule();
  if (!mod) return null;
  const instance = new WebAssembly.Instance(mod, {
    env: {
      abort: () => {
        throw new Error('wasm kernel aborted');
      },
    },
  });
  return instance.exports as unknown as KernelExports;
}

/** Bump allocator over a kernel instance's memory: 16-byte aligned regions above the first 64 KiB. */
export class WasmArena {
  private top = 65536;
  constructor(readonly k: KernelExports) {}

  /** Reserves `bytes` and returns the byte offset; grows memory as needed. */
  alloc(bytes: number): number {
    const at = this.top;
    this.top = (this.top + bytes + 15) & ~15;
    const need = this.top - this.k.memory.buffer.byteLength;
    if (need > 0) this.k.memory.grow(Math.ceil(need / 65536));
    return at;
  }

  f64(ptr: number, length: number): Float64Array {
    return new Float64Array(this.k.memory.buffer, ptr, length);
  }

  i32(ptr: number, length: number): Int32Array {
    return new Int32Array(this.k.memory.buffer, ptr, length);
  }
}

/** Whether this engine validates the kernels' relaxed-SIMD build as is (no compilation, nothing cached). */
export function kernelsRelaxedValidate(): boolean {
  return typeof WebAssembly !== 'undefined' && WebAssembly.validate(base64Bytes(KERNELS_RELAXED_WASM_BASE64));
}
