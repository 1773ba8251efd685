/** base64Bytes against the test vectors of RFC 4648 §10, on the runtime's decoder and on the atob fallback. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { base64Bytes, LITTLE_ENDIAN } from '../../engine/util/base64';

// RFC 4648 §10: BASE64("f") = "Zg==", …, BASE64("foobar") = "Zm9vYmFy".
const VECTORS: [string, string][] = [
  ['', ''],
  ['f', 'Zg=='],
  ['fo', 'Zm8='],
  ['foo', 'Zm9v'],
  ['foob', 'Zm9vYg=='],
  ['fooba', 'Zm9vYmE='],
  ['foobar', 'Zm9vYmFy'],
];

const text = (b: Uint8Array) => String.fromCharCode(...b);

describe('base64Bytes', () => {
  afterEach(() => vi.unstubAllGlobals());

  it('decodes the RFC 4648 vectors into a fresh, whole ArrayBuffer', () => {
    for (const [plain, encoded] of VECTORS) {
      const b = base64Bytes(encoded);
      expect(text(b)).toBe(plain);
      expect(b.byteOffset).toBe(0);
      expect(b.buffer.byteLength).toBe(plain.length);
    }
  });

  it('decodes them the same without Buffer (the atob fallback, as in browsers without Uint8Array.fromBase64)', () => {
    vi.stubGlobal('Buffer', undefined);
    for (const [plain, encoded] of VECTORS) expect(text(base64Bytes(encoded))).toBe(plain);
    expect(text(base64Bytes('/+8='))).toBe('\xff\xef'); // bytes ≥ 128 (the last two alphabet letters)
  });

  it('LITTLE_ENDIAN matches what a DataView reads back', () => {
    const f = new Float64Array([1.5]);
    expect(new DataView(f.buffer).getFloat64(0, LITTLE_ENDIAN)).toBe(1.5);
  });
});
