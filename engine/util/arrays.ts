/** A zeroed Float64Array, in a SharedArrayBuffer when `shared` (for threads: posted without a copy). */
export function float64s(length: number, shared: boolean): Float64Array {
  return shared ? new Float64Array(new SharedArrayBuffer(8 * length)) : new Float64Array(length);
}

/** A zeroed Int32Array, in a SharedArrayBuffer when `shared`. */
export function int32s(length: number, shared: boolean): Int32Array {
  return shared ? new Int32Array(new SharedArrayBuffer(4 * length)) : new Int32Array(length);
}
