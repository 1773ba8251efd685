/**
 * CRC-32 as zip files use it (polynomial 0xEDB88320 reflected, initial and final XOR 0xFFFFFFFF;
 * PKWARE APPNOTE.TXT §4.4.7, the same CRC as ISO 3309 / ITU-T V.42), table-driven, incremental.
 */

const TABLE = (() => {
  const t = new Int32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[n] = c;
  }
  return t;
})();

/** Continues a CRC over `b` (start with crc32Update(0, …)); returns the CRC of all bytes so far (unsigned). */
export function crc32Update(crc: number, b: Uint8Array): number {
  let c = ~crc;
  for (let i = 0; i < b.length; i++) c = TABLE[(c ^ b[i]) & 0xff] ^ (c >>> 8);
  return ~c >>> 0;
}
