/**
 * Loads the engine's WebAssembly kernels (SIMD) once per thread. Returns null where WebAssembly SIMD is
 * unavailable or disabled (globalThis.TORUSGRAV_NO_WASM = true, or env TORUSGRAV_NO_WASM=1 in Node), and
 * callers then use the JavaScript twins of the kernels.
 */
import { KERNELS_WASM_BASE64 } from './kernelsBinary';
import { wasmCompile, wasmDisabled } from './compile';

export interface KernelExports {
  memory: WebAssembly.Memory;
  structureFactor: (...args: number[]) => void;
  fourierTargets: (...args: number[]) => void;
}

let cached: WebAssembly.Module | null | undefined;

/** The compiled kernel module, or null when WebAssembly SIMD cannot be used here. */
export function kernelModule(): WebAssembly.Module | null {
  if (wasmDisabled()) return null;
  if (cached === undefined) cached = wasmCompile(KERNELS_WASM_BASE64);
  return cached;
}

/**
 * Uses an already compiled kernel module (e.g. the main thread's, sent to a worker): threads that share
 * one module share its compiled code, including the optimised tier. Ignored where the kernels are off.
 */
export function kernelModuleShare(mod: WebAssembly.Module | null): void {
  if (!wasmDisabled() && mod) cached = mod;
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
