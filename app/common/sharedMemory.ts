/**
 * Shared memory for threads, for both front ends (no node: imports, no DOM): typed arrays in
 * SharedArrayBuffers without needless copies, and paging fresh buffers in ahead of use.
 */

/** A typed array in shared memory: itself when it already fills a SharedArrayBuffer, else a copy. */
export function sharedArray<T extends Float64Array | Int32Array>(a: T): T {
  const b = sharedCopy(a);
  if (b === a.buffer) return a;
  return (a instanceof Float64Array ? new Float64Array(b) : new Int32Array(b)) as T;
}

/** The typed array's bytes in shared memory: its own buffer when it already is one (whole), else a copy. */
export function sharedCopy(a: Float64Array | Int32Array): SharedArrayBuffer {
  if (a.buffer instanceof SharedArrayBuffer && a.byteOffset === 0 && a.byteLength === a.buffer.byteLength) return a.buffer;
  const buf = new SharedArrayBuffer(a.byteLength);
  new Uint8Array(buf).set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  return buf;
}

/** Bytes per unit of pagesTouch. */
const TOUCH_BLOCK = 1 << 20;

/** Units of pagesTouch over these buffers (1 MiB blocks). */
export function pagesTouchUnits(buffers: readonly SharedArrayBuffer[]): number {
  return buffers.reduce((s, b) => s + Math.ceil(b.byteLength / TOUCH_BLOCK), 0);
}

/**
 * Writes a zero into every 4 KiB page of the buffers (still all zero), taking 1 MiB blocks from
 * counter[0] until none are left: the operating system supplies fresh memory on first write, at
 * ~3 ms per MB on the project machine, and this lets an idle thread pay that ahead of time. Returns the
 * blocks this thread touched.
 */
export function pagesTouch(buffers: readonly SharedArrayBuffer[], counter: Int32Array): number {
  const total = pagesTouchUnits(buffers);
  for (let ran = 0; ; ran++) {
    let k = Atomics.add(counter, 0, 1);
    if (k >= total) return ran;
    for (const b of buffers) {
      const blocks = Math.ceil(b.byteLength / TOUCH_BLOCK);
      if (k >= blocks) {
        k -= blocks;
        continue;
      }
      const bytes = new Uint8Array(b, k * TOUCH_BLOCK, Math.min(TOUCH_BLOCK, b.byteLength - k * TOUCH_BLOCK));
      for (let o = 0; o < bytes.length; o += 4096) bytes[o] = 0;
      break;
    }
  }
}
