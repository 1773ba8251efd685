/**
 * Copies of large typed arrays made a slice at a time, yielding to the page between slices, so that
 * handing a 10⁶-particle snapshot to a worker never holds the page's thread for long.
 */

/** Elements copied per slice (512 kB of doubles: about a millisecond on an idle machine). */
export const COPY_SLICE = 1 << 16;

/**
 * Ends the current task and resumes in a new one: a message to ourselves (no 4 ms clamp, unlike nested
 * timers), or a timer where there is no MessageChannel.
 */
export function yieldTask(): Promise<void> {
  if (typeof MessageChannel === 'undefined') return new Promise((resolve) => setTimeout(resolve, 0));
  return new Promise((resolve) => {
    const { port1, port2 } = new MessageChannel();
    port1.onmessage = () => {
      port1.close();
      resolve();
    };
    port2.postMessage(null);
  });
}

/** A copy of `a` (same type), made in slices of `slice` elements with a yield between them. */
export async function copyChunked<T extends Float64Array | Int32Array>(a: T, slice: number = COPY_SLICE): Promise<T> {
  if (a.length <= slice) return a.slice() as T;
  const out = new (a.constructor as { new (n: number): T })(a.length);
  for (let b = 0; b < a.length; b += slice) {
    if (b > 0) await yieldTask();
    out.set(a.subarray(b, Math.min(a.length, b + slice)) as never, b);
  }
  return out;
}
