/**
 * The list of known snapshot formats and the dispatch over it: the first reader whose sniff accepts
 * the file's first bytes reads it; failing that, a binary format whose file-name ending matches takes
 * it (so that a .npy with a wrong magic number hears so). New formats are added to SNAPSHOT_READERS.
 */
import { type ByteSource, bytesSource } from './byteSource';
import { csvReader } from './csv';
import type { LoadOptions, SnapshotDescription } from './description';
import { hdf5Reader } from './hdf5';
import { npyReader } from './npy';
import { npzReader } from './npz';
import type { SnapshotReader } from './reader';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';
import { structureSignature } from './signature';

/** Known readers, most specific first (binary formats with magic bytes before text). */
export const SNAPSHOT_READERS: readonly SnapshotReader[] = [npyReader, npzReader, hdf5Reader, csvReader];

/** Bytes needed for sniffing. */
export const SNIFF_BYTES = 4096;

/** The reader for a file (by content, then by name); throws SnapshotFormatError when none fits. */
export function snapshotReaderFind(bytes: Uint8Array, fileName: string, readers: readonly SnapshotReader[] = SNAPSHOT_READERS): SnapshotReader {
  for (const r of readers) if (r.sniff(bytes, fileName)) return r;
  const lower = fileName.toLowerCase();
  for (const r of readers) {
    if (r === csvReader) continue;
    if (r.extensions.some((e) => lower.endsWith(e))) return r;
  }
  const known = readers.map((r) => `${r.name} (${r.description})`).join('; ');
  const gz = bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
  const hint = gz ? ' (gzip is read for text files only: decompress it with gunzip first)' : '';
  throw new SnapshotFormatError(fileName, `not a snapshot format torusgrav reads${hint}; known formats: ${known}`);
}

/** A ByteSource from bytes or a source. */
function asSource(input: Uint8Array | ByteSource): ByteSource {
  return input instanceof Uint8Array ? bytesSource(input) : input;
}

/** Reads a snapshot in any known format; throws SnapshotFormatError (file, row, column) on bad input. */
export async function snapshotRead(
  bytes: Uint8Array,
  fileName: string,
  mapping: ColumnMapping = {},
  readers: readonly SnapshotReader[] = SNAPSHOT_READERS,
): Promise<Snapshot> {
  return snapshotReaderFind(bytes.subarray(0, SNIFF_BYTES), fileName, readers).read(bytes, fileName, mapping);
}

/**
 * Loads a snapshot from bytes or a ByteSource (streaming), in file units. Format by content (then
 * name); mapping as in ColumnMapping (unmapped positions and mass follow the format's defaults);
 * options: load limit, subsampling, progress. Throws SnapshotFormatError naming file and place.
 */
export async function snapshotLoad(
  input: Uint8Array | ByteSource,
  fileName: string,
  mapping: ColumnMapping = {},
  options: LoadOptions = {},
  readers: readonly SnapshotReader[] = SNAPSHOT_READERS,
): Promise<Snapshot> {
  const source = asSource(input);
  const head = await source.read(0, SNIFF_BYTES);
  const reader = snapshotReaderFind(head, fileName, readers);
  if (reader.load) return reader.load(source, fileName, mapping, options);
  return reader.read(source.bytes ?? (await source.read(0, source.size)), fileName, mapping);
}

/**
 * Describes a file without reading all of it: arrays (text columns, .npy columns, .npz arrays, HDF5
 * datasets) with shapes and types, attributes, a proposed mapping and the structure signature.
 */
export async function snapshotDescribe(
  input: Uint8Array | ByteSource,
  fileName: string,
  options: LoadOptions = {},
  readers: readonly SnapshotReader[] = SNAPSHOT_READERS,
): Promise<SnapshotDescription> {
  const source = asSource(input);
  const head = await source.read(0, SNIFF_BYTES);
  const reader = snapshotReaderFind(head, fileName, readers);
  if (reader.describe) return reader.describe(source, fileName, options);
  const s = await reader.read(source.bytes ?? (await source.read(0, source.size)), fileName, {});
  const arrays = s.columns.map((c) => ({ name: c, label: `column ${JSON.stringify(c)}`, shape: [s.count], dtype: 'number', kind: 'float' as const, usable: true }));
  return {
    format: reader.name,
    fileName,
    size: source.size,
    arrays,
    attributes: [],
    proposal: {
      mapping: {},
      candidates: { positions: [], mass: [], accelerations: [], ids: [], softening: [], box: [] },
      count: s.count,
      complete: true,
      notes: ['read with the format defaults'],
    },
    signature: structureSignature(reader.name, arrays, []),
  };
}
