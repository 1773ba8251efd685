/**
 * The WebAssembly number formatter (engine/wasm/as/textFormat.ts): rows of doubles to CSV bytes, byte for
 * byte what Number.prototype.toPrecision(17) and String(v) write. Compiled lazily on first use with the
 * synchronous `new WebAssembly.Module` and instantiated once per thread (module-level cache: each worker
 * has its own). Returns null where WebAssembly is unavailable or disabled (globalThis.TORUSGRAV_NO_WASM =
 * true, or env TORUSGRAV_NO_WASM=1 in Node); callers then use toPrecision.
 */
import { TEXT_FORMAT_WASM_BASE64 } from './textFormatBinary';
import { wasmCompile, wasmDisabled } from './compile';

export interface TextFormatExports {
  memory: WebAssembly.Memory;
  /**
   * Rows [firstRow, firstRow + rows) → CSV bytes at outPtr; column c is described by three u32 at
   * colsPtr + 12c (address of its row-0 f64, stride in values, 1 if integer). Returns the bytes written
   * (see formatStopRow).
   */
  formatRows(colsPtr: number, firstRow: number, rows: number, cols: number, outPtr: number): number;
  /** Row of the last formatRows call that was not written (a value it does not handle), or −1. */
  formatStopRow(): number;
  /** One double as toPrecision(17) at outPtr (room: 25 + TEXT_FORMAT_SLACK); returns its length, 0 for NaN/±Infinity. */
  formatDouble(v: number, outPtr: number): number;
  /** First byte after the module's static data. */
  textFormatHeapBase(): number;
  textFormatVersion(): number;
}

/** Bytes one value may take in formatRows' output, separator included (toPrecision(17) needs ≤ 25). */
export const TEXT_FORMAT_BYTES_PER_VALUE = 26;

/** Room formatRows needs after its output's end (it may write scratch bytes there). */
export const TEXT_FORMAT_SLACK = 32;

/** Where callers may put their buffers: above the module's static data and stack. */
export const TEXT_FORMAT_BASE = 65536;

let instance: TextFormatExports | null | undefined;

/** This thread's formatter instance, or null when WebAssembly cannot or must not be used. */
export function textFormatInstance(): TextFormatExports | null {
  if (wasmDisabled()) return null;
  if (instance !== undefined) return instance;
  const mod = wasmCompile(TEXT_FORMAT_WASM_BASE64);
  if (!mod) return (instance = null);
  try {
    const inst = new WebAssembly.Instance(mod, {
      env: {
        abort: () => {
          throw new Error('wasm text formatter aborted');
        },
      },
    });
    const ex = inst.exports as unknown as TextFormatExports;
    instance = ex.textFormatHeapBase() <= TEXT_FORMAT_BASE ? ex : null;
  } catch {
    instance = null;
  }
  return instance;
}

/** Grows the formatter's memory to at least `bytes`; returns the (possibly new) buffer. */
export function textFormatReserve(ex: TextFormatExports, bytes: number): ArrayBuffer {
  const need = bytes - ex.memory.buffer.byteLength;
  if (need > 0) ex.memory.grow(Math.ceil(need / 65536));
  return ex.memory.buffer;
}
