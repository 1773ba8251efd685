/**
 * Base64 to bytes with the fastest decoder the runtime has: Uint8Array.fromBase64 (recent browsers),
 * Node's Buffer, else atob and a loop. The result owns a fresh ArrayBuffer starting at offset 0 (so it can
 * be viewed as Float64Array). Generated data (WebAssembly kernels, the kernel table) is shipped this way.
 */
export function base64Bytes(b64: string): Uint8Array<ArrayBuffer> {
  const g = globalThis as {
    Buffer?: { from(s: string, enc: 'base64'): Uint8Array };
  };
  const fromBase64 = (Uint8Array as unknown as { fromBase64?: (s: string) => Uint8Array }).fromBase64;
  const decoded = fromBase64 ? fromBase64(b64) : g.Buffer ? g.Buffer.from(b64, 'base64') : null;
  if (decoded) {
    const out = new Uint8Array(new ArrayBuffer(decoded.length));
    out.set(decoded);
    return out;
  }
  const bin = atob(b64);
  const bytes = new Uint8Array(new ArrayBuffer(bin.length));
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return bytes;
}

/** Whether this platform stores numbers little-endian (typed arrays use the platform's order). */
export const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
