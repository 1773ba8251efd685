/**
 * NumPy .npz snapshots: a zip archive of .npy members (stored by numpy.savez, deflated by
 * numpy.savez_compressed), one array per field ("pos" N×3, "mass" N, or "x", "y", "z" …). Members are
 * streamed (inflated piece by piece) and checked against their CRC-32.
 */
import type { ArrayStore, StoredArray } from './arrayStore';
import { storeAssemble } from './assemble';
import { type ByteSource, bytesSource } from './byteSource';
import { crc32Update } from './crc32';
import { type ArrayInfo, type LoadOptions, type SnapshotDescription, loadLimitError, loadLimitExceeded } from './description';
import { type NpyHeader, npyHeaderLength, npyHeaderParse, shapeText } from './npyHeader';
import { arrayScatterMake } from './npyScatter';
import { npyArrayInfo, rowsCols } from './npy';
import { storeProposal } from './propose';
import type { SnapshotReader } from './reader';
import { structureSignature } from './signature';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';
import { type ZipEntry, isZip, zipDataOffset, zipEntries } from './zip';

const PIECE = 4 << 20;

/**
 * Streams a member's uncompressed bytes to `sink` (stops when it returns false); returns the CRC-32 and
 * byte count of what was produced (complete only when the sink never stopped).
 */
async function memberStream(
  source: ByteSource,
  entry: ZipEntry,
  start: number,
  fileName: string,
  label: string,
  sink: (piece: Uint8Array) => boolean | void,
  piece = PIECE,
): Promise<{ crc: number; produced: number; stopped: boolean }> {
  let crc = 0;
  let produced = 0;
  let stopped = false;
  const take = (chunk: Uint8Array) => {
    if (stopped) return;
    crc = crc32Update(crc, chunk);
    produced += chunk.length;
    if (sink(chunk) === false) stopped = true;
  };
  if (entry.method === 0) {
    const into = source.bytes ? undefined : new Uint8Array(Math.min(piece, entry.compressedSize));
    for (let at = start; at < start + entry.compressedSize && !stopped; ) {
      const b = await source.read(at, Math.min(piece, start + entry.compressedSize - at), into);
      if (b.length === 0) break;
      at += b.length;
      take(b);
    }
    return { crc, produced, stopped };
  }
  const { Inflate } = await import('fflate'); // loaded only for deflated entries
  let failure: unknown = null;
  const inflate = new Inflate((chunk) => {
    try {
      take(chunk);
    } catch (e) {
      failure ??= e;
      stopped = true;
    }
  });
  const end = start + entry.compressedSize;
  try {
    for (let at = start; at < end && !stopped; ) {
      const b = await source.read(at, Math.min(piece, end - at));
      if (b.length === 0) break;
      at += b.length;
      inflate.push(b, at >= end);
    }
  } catch (e) {
    if (failure) throw failure;
    throw new SnapshotFormatError(
      fileName,
      `the compressed data are damaged (${e instanceof Error ? e.message : String(e)}) after ${produced} bytes; the file is corrupt or truncated: save it again`,
      { array: label },
    );
  }
  if (failure) throw failure;
  return { crc, produced, stopped };
}

/** The npy header at the start of a member (inflating only as much as it needs). */
async function memberHeader(source: ByteSource, entry: ZipEntry, start: number, fileName: string, label: string): Promise<NpyHeader> {
  let buf = new Uint8Array(0);
  let need: number | null = null;
  await memberStream(
    source,
    entry,
    start,
    fileName,
    label,
    (chunk) => {
      const joined = new Uint8Array(buf.length + chunk.length);
      joined.set(buf);
      joined.set(chunk, buf.length);
      buf = joined;
      need ??= npyHeaderLength(buf, fileName, { array: label });
      if (need === null && buf.length >= 12) need = npyHeaderLength(buf, fileName, { array: label });
      return need === null || buf.length < need;
    },
    4096,
  );
  return npyHeaderParse(buf, fileName, { array: label });
}

/** A member as a StoredArray. */
function memberArray(source: ByteSource, entry: ZipEntry, start: number, h: NpyHeader, info: ArrayInfo, fileName: string): StoredArray {
  return {
    info,
    async read(picks, every) {
      const [rows, cols] = rowsCols(h.shape);
      const scatter = arrayScatterMake(h.dtype, rows, cols, h.fortran, picks, every);
      let skip = h.dataOffset;
      const r = await memberStream(source, entry, start, fileName, info.label, (chunk) => {
        if (skip >= chunk.length) {
          skip -= chunk.length;
          return;
        }
        scatter.push(skip > 0 ? chunk.subarray(skip) : chunk);
        skip = 0;
      });
      if (r.produced !== entry.size) {
        throw new SnapshotFormatError(fileName, `the member holds ${r.produced} bytes, the zip directory says ${entry.size}: the archive is damaged`, { array: info.label });
      }
      if (r.crc !== entry.crc) {
        throw new SnapshotFormatError(fileName, `the data fail their CRC-32 check (${r.crc.toString(16)} ≠ ${entry.crc.toString(16)}): the file is corrupt; copy or save it again`, { array: info.label });
      }
      if (scatter.consumed !== scatter.needed) {
        throw new SnapshotFormatError(fileName, `the header announces ${shapeText(h.shape)} ${h.dtype.name} = ${scatter.needed} data bytes, the member holds ${scatter.consumed}`, { array: info.label });
      }
    },
  };
}

/** Opens an .npz file as a store: one array per .npy member, named without ".npy". */
export async function npzStoreOpen(source: ByteSource, fileName: string): Promise<{ store: ArrayStore; dataBytes: number }> {
  const entries = await zipEntries(source, fileName);
  const arrays: StoredArray[] = [];
  let dataBytes = 0;
  for (const entry of entries) {
    if (entry.name.endsWith('/')) continue;
    const name = entry.name.replace(/\.npy$/i, '');
    const label = `array ${JSON.stringify(name)}`;
    if (entry.encrypted) throw new SnapshotFormatError(fileName, 'the member is encrypted; save the arrays without a password', { array: label });
    if (entry.method !== 0 && entry.method !== 8) {
      throw new SnapshotFormatError(fileName, `the member is compressed with zip method ${entry.method}; torusgrav reads stored and deflated members (numpy.savez, numpy.savez_compressed)`, { array: label });
    }
    const start = await zipDataOffset(source, entry, fileName);
    if (!/\.npy$/i.test(entry.name)) {
      arrays.push({
        info: { name, label, shape: [], dtype: 'not an array', kind: 'other', usable: false, note: 'is not a .npy member' },
        read: async () => undefined,
      });
      continue;
    }
    const h = await memberHeader(source, entry, start, fileName, label);
    const needed = h.dataOffset + h.elements * h.dtype.size;
    if (h.dtype.numeric && entry.size !== needed) {
      throw new SnapshotFormatError(
        fileName,
        `the member holds ${entry.size} bytes but its header announces ${shapeText(h.shape)} ${h.dtype.name} = ${needed} bytes: the member is ${entry.size < needed ? 'truncated' : 'followed by extra bytes'}`,
        { array: label },
      );
    }
    let info = npyArrayInfo(h, name, label);
    const member = memberArray(source, entry, start, h, info, fileName);
    if (h.dtype.numeric && h.elements >= 1 && h.elements <= 3 && h.shape.length <= 1) {
      const out = new Float64Array(h.elements);
      await member.read([{ column: 0, out, stride: 1, offset: 0 }], 1);
      info = { ...info, value: h.elements === 1 ? out[0] : Array.from(out) };
    }
    if (info.usable) dataBytes += entry.size;
    arrays.push({ ...member, info });
  }
  const byName = new Map(arrays.map((a) => [a.info.name, a]));
  const store: ArrayStore = {
    format: 'npz',
    arrays,
    attributes: [],
    async readSmall(ref: string) {
      const a = byName.get(ref.replace(/\.npy$/i, '')) ?? byName.get(ref.replace(/^\/+/, ''));
      if (!a) return null;
      const v = a.info.value;
      if (v === undefined) return { elements: a.info.shape.reduce((p, d) => p * d, 1) };
      return typeof v === 'number' ? [v] : [...v];
    },
    close: () => undefined,
  };
  return { store, dataBytes };
}

/** Describes an .npz file: its arrays with shapes and types, and a proposal. */
export async function npzDescribe(source: ByteSource, fileName: string): Promise<SnapshotDescription> {
  const { store } = await npzStoreOpen(source, fileName);
  const arrays = store.arrays.map((a) => a.info);
  return { format: 'npz', fileName, size: source.size, arrays, attributes: [], proposal: storeProposal(store), signature: structureSignature('npz', arrays, []) };
}

/** Loads an .npz snapshot (streaming each member it needs). */
export async function npzLoad(source: ByteSource, fileName: string, mapping: ColumnMapping = {}, options: LoadOptions = {}): Promise<Snapshot> {
  const { store, dataBytes } = await npzStoreOpen(source, fileName);
  if (loadLimitExceeded(dataBytes, options)) throw loadLimitError(fileName, 'the arrays hold (uncompressed)', dataBytes, options);
  return storeAssemble(store, fileName, mapping, storeProposal(store), options);
}

/** The .npz reader. */
export const npzReader: SnapshotReader = {
  name: 'npz',
  description: 'NumPy .npz archive (numpy.savez or savez_compressed), one array per field, e.g. pos (N,3) and mass (N,)',
  extensions: ['.npz'],
  sniff: (bytes, fileName) => isZip(bytes) && (fileName.toLowerCase().endsWith('.npz') || !/\.(zip|jar|docx|xlsx)$/i.test(fileName)),
  read: (bytes, fileName, mapping) => npzLoad(bytesSource(bytes), fileName, mapping),
  describe: (source, fileName) => npzDescribe(source, fileName),
  load: npzLoad,
};

