/**
 * NumPy .npy snapshots: one array, float32/float64 (either byte order; integers too), C or Fortran
 * order, shape (N,), (N, 3), (N, 4) or (N, k). Columns are chosen by number. Streams the data: memory
 * is the output arrays plus one piece.
 */
import type { ArrayStore, StoredArray } from './arrayStore';
import { storeAssemble } from './assemble';
import { type ByteSource, bytesSource, sourceForEach } from './byteSource';
import { type ArrayInfo, type LoadOptions, type SnapshotDescription, loadLimitError, loadLimitExceeded } from './description';
import { type Dtype, dtypeRefusal } from './npyDtype';
import { type NpyHeader, isNpy, npyHeaderLength, npyHeaderParse, shapeText } from './npyHeader';
import { type ColumnPick, arrayScatterMake } from './npyScatter';
import { storeProposal } from './propose';
import type { SnapshotReader } from './reader';
import { structureSignature } from './signature';
import { type ColumnMapping, type Snapshot, SnapshotFormatError, type SnapshotPlace } from './snapshot';

const PIECE = 8 << 20;

/** ArrayInfo for an array of this header (name and label given). */
export function npyArrayInfo(h: NpyHeader, name: string, label: string): ArrayInfo {
  const d: Dtype = h.dtype;
  let note: string | undefined;
  if (!d.numeric) note = dtypeRefusal(d);
  else if (h.shape.length === 0) note = 'is a single number (shape ()), not one per particle';
  else if (h.shape.length > 2) note = `has ${h.shape.length} dimensions ${shapeText(h.shape)}; per-particle data have shape (N,) or (N, k)`;
  return { name, label, shape: h.shape, dtype: d.name, kind: d.kind, usable: note === undefined, ...(note ? { note } : {}) };
}

/** Rows and columns of a 1-D or 2-D array. */
export function rowsCols(shape: readonly number[]): [number, number] {
  return [shape[0] ?? 1, shape.length === 2 ? shape[1] : 1];
}

/**
 * Feeds the data region [begin, begin + needed) of a source through a scatter; `fileName` and `place`
 * label the truncation and trailing-bytes errors; `end` is where the region must end (file size, or
 * the member's end inside a zip).
 */
export async function npyDataRead(
  source: ByteSource,
  h: NpyHeader,
  begin: number,
  end: number,
  picks: readonly ColumnPick[],
  every: number,
  fileName: string,
  place: SnapshotPlace,
): Promise<void> {
  const [rows, cols] = rowsCols(h.shape);
  const scatter = arrayScatterMake(h.dtype, rows, cols, h.fortran, picks, every);
  const have = end - begin;
  if (have < scatter.needed) {
    throw new SnapshotFormatError(
      fileName,
      `the data are cut off: the header announces shape ${shapeText(h.shape)} ${h.dtype.name} = ${scatter.needed} bytes, but only ${have} follow (a partial download or copy?)`,
      place,
    );
  }
  if (have > scatter.needed) {
    throw new SnapshotFormatError(
      fileName,
      `${have - scatter.needed} bytes follow the data of shape ${shapeText(h.shape)} ${h.dtype.name}; the file is not one .npy array (several saved into one file?)`,
      place,
    );
  }
  await sourceForEach(source, begin, end, PIECE, (piece) => scatter.push(piece));
}

/** Reads the header of an .npy stream at `at` in a source. */
export async function npyHeaderAt(source: ByteSource, at: number, end: number, fileName: string, place: SnapshotPlace = {}): Promise<NpyHeader> {
  const first = await source.read(at, Math.min(12, end - at));
  const length = npyHeaderLength(first, fileName, place);
  if (length === null || length > end - at) {
    throw new SnapshotFormatError(fileName, `the .npy header is cut off (${end - at} bytes, the header needs ${length ?? 12}): the file is truncated`, place);
  }
  return npyHeaderParse(await source.read(at, length), fileName, place);
}

/** The store of a .npy file: one array whose columns are referenced by number. */
export async function npyStoreOpen(source: ByteSource, fileName: string): Promise<{ store: ArrayStore; header: NpyHeader }> {
  if (source.size < 6) throw new SnapshotFormatError(fileName, `the file has only ${source.size} bytes; a .npy file starts with a 10-byte preamble and a header: the file is truncated`);
  const h = await npyHeaderAt(source, 0, source.size, fileName);
  const info = npyArrayInfo(h, '', 'the array');
  const array: StoredArray = {
    info,
    read: (picks, every) => npyDataRead(source, h, h.dataOffset, source.size, picks, every, fileName, {}),
  };
  const store: ArrayStore = { format: 'npy', arrays: [array], attributes: [], columnsOf: array, readSmall: async () => null, close: () => undefined };
  return { store, header: h };
}

/** Describes a .npy file from its header. */
export async function npyDescribe(source: ByteSource, fileName: string): Promise<SnapshotDescription> {
  const { store } = await npyStoreOpen(source, fileName);
  const arrays = store.arrays.map((a) => a.info);
  return { format: 'npy', fileName, size: source.size, arrays, attributes: [], proposal: storeProposal(store), signature: structureSignature('npy', arrays, []) };
}

/** Loads a .npy snapshot (streaming). */
export async function npyLoad(source: ByteSource, fileName: string, mapping: ColumnMapping = {}, options: LoadOptions = {}): Promise<Snapshot> {
  const { store, header } = await npyStoreOpen(source, fileName);
  const data = header.elements * header.dtype.size;
  if (loadLimitExceeded(data, options)) throw loadLimitError(fileName, `the array ${shapeText(header.shape)} ${header.dtype.name} holds`, data, options);
  if (!store.arrays[0].info.usable) throw new SnapshotFormatError(fileName, `the array ${store.arrays[0].info.note}`);
  if (mapping.box !== undefined) throw new SnapshotFormatError(fileName, `a .npy file holds one array and no box entry (${JSON.stringify(mapping.box)}); enter the box side instead`);
  return storeAssemble(store, fileName, mapping, storeProposal(store), options);
}

/** The .npy reader. */
export const npyReader: SnapshotReader = {
  name: 'npy',
  description: 'NumPy .npy array of shape (N,3) x,y,z, (N,4) x,y,z,m, or (N,k) with columns chosen by number',
  extensions: ['.npy'],
  sniff: (bytes) => isNpy(bytes),
  read: (bytes, fileName, mapping) => npyLoad(bytesSource(bytes), fileName, mapping),
  describe: (source, fileName) => npyDescribe(source, fileName),
  load: npyLoad,
};
