/**
 * Zip archives (what numpy.savez writes): the central directory, with zip64 records and extra fields
 * for members or archives beyond 4 GiB, and each member's data location (PKWARE APPNOTE.TXT 6.3,
 * §4.3.6–4.3.16, §4.5.3). Damaged or truncated archives get a SnapshotFormatError.
 */
import type { ByteSource } from './byteSource';
import { SnapshotFormatError } from './snapshot';

/** One member. */
export interface ZipEntry {
  readonly name: string;
  /** 0 stored, 8 deflated. */
  readonly method: number;
  readonly crc: number;
  readonly compressedSize: number;
  readonly size: number;
  /** Offset of the member's local header. */
  readonly localOffset: number;
  readonly encrypted: boolean;
}

/** Whether bytes start with a zip local header signature "PK\3\4" (or an empty archive's "PK\5\6"). */
export function isZip(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && ((b[2] === 3 && b[3] === 4) || (b[2] === 5 && b[3] === 6));
}

function u16(b: Uint8Array, i: number): number {
  return b[i] | (b[i + 1] << 8);
}
function u32(b: Uint8Array, i: number): number {
  return (b[i] | (b[i + 1] << 8) | (b[i + 2] << 16)) + b[i + 3] * 2 ** 24;
}
function u64(b: Uint8Array, i: number): number {
  return u32(b, i) + u32(b, i + 4) * 2 ** 32;
}

/** Reads the central directory. */
export async function zipEntries(source: ByteSource, fileName: string): Promise<ZipEntry[]> {
  const size = source.size;
  const tailLength = Math.min(size, 22 + 65535 + 20);
  const tail = await source.read(size - tailLength, tailLength);
  let eocd = -1;
  for (let i = tail.length - 22; i >= 0; i--) {
    if (tail[i] === 0x50 && tail[i + 1] === 0x4b && tail[i + 2] === 5 && tail[i + 3] === 6) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) {
    throw new SnapshotFormatError(fileName, 'the zip archive has no end-of-directory record: the file is truncated or not a complete .npz; save it again with numpy.savez');
  }
  let count = u16(tail, eocd + 10);
  let cdSize = u32(tail, eocd + 12);
  let cdOffset = u32(tail, eocd + 16);
  if (count === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) {
    const loc = eocd - 20;
    if (loc < 0 || u32(tail, loc) !== 0x07064b50) throw new SnapshotFormatError(fileName, 'the zip64 end-of-directory locator is missing: the archive is damaged');
    const at = u64(tail, loc + 8);
    const z = await source.read(at, 56);
    if (z.length < 56 || u32(z, 0) !== 0x06064b50) throw new SnapshotFormatError(fileName, 'the zip64 end-of-directory record is missing: the archive is damaged', { offset: at });
    count = u64(z, 32);
    cdSize = u64(z, 40);
    cdOffset = u64(z, 48);
  }
  if (cdOffset + cdSize > size) {
    throw new SnapshotFormatError(fileName, `the zip directory lies beyond the end of the file (${cdOffset + cdSize} > ${size} bytes): the file is truncated`);
  }
  const cd = await source.read(cdOffset, cdSize);
  const entries: ZipEntry[] = [];
  let p = 0;
  for (let k = 0; k < count; k++) {
    if (p + 46 > cd.length || u32(cd, p) !== 0x02014b50) {
      throw new SnapshotFormatError(fileName, `zip directory entry ${k} is damaged (no signature)`, { offset: cdOffset + p });
    }
    const flags = u16(cd, p + 8);
    const method = u16(cd, p + 10);
    const crc = u32(cd, p + 16);
    let compressedSize = u32(cd, p + 20);
    let uncompressed = u32(cd, p + 24);
    const nameLength = u16(cd, p + 28);
    const extraLength = u16(cd, p + 30);
    const commentLength = u16(cd, p + 32);
    let localOffset = u32(cd, p + 42);
    const nameBytes = cd.subarray(p + 46, p + 46 + nameLength);
    const name = new TextDecoder(flags & 0x800 ? 'utf-8' : 'latin1').decode(nameBytes);
    // zip64 extended information extra field (header id 1): only the fields that overflowed, in order.
    let e = p + 46 + nameLength;
    const extraEnd = e + extraLength;
    while (e + 4 <= extraEnd) {
      const id = u16(cd, e);
      const len = u16(cd, e + 2);
      if (id === 1) {
        let q = e + 4;
        if (uncompressed === 0xffffffff) {
          uncompressed = u64(cd, q);
          q += 8;
        }
        if (compressedSize === 0xffffffff) {
          compressedSize = u64(cd, q);
          q += 8;
        }
        if (localOffset === 0xffffffff) localOffset = u64(cd, q);
      }
      e += 4 + len;
    }
    entries.push({ name, method, crc, compressedSize, size: uncompressed, localOffset, encrypted: (flags & 1) !== 0 });
    p = extraEnd + commentLength;
  }
  return entries;
}

/** Offset of a member's data (after its local header). */
export async function zipDataOffset(source: ByteSource, entry: ZipEntry, fileName: string): Promise<number> {
  const h = await source.read(entry.localOffset, 30);
  if (h.length < 30 || u32(h, 0) !== 0x04034b50) {
    throw new SnapshotFormatError(fileName, `the zip member ${JSON.stringify(entry.name)} has no local header where the directory says: the archive is damaged`, { offset: entry.localOffset });
  }
  const start = entry.localOffset + 30 + u16(h, 26) + u16(h, 28);
  if (start + entry.compressedSize > source.size) {
    throw new SnapshotFormatError(fileName, `the zip member ${JSON.stringify(entry.name)} runs past the end of the file: the file is truncated`, { offset: start });
  }
  return start;
}
