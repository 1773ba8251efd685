/**
 * The list of known snapshot formats and the dispatch over it: the first reader whose sniff accepts
 * the file reads it. New formats are added to SNAPSHOT_READERS (most specific first).
 */
import { csvReader } from './csv';
import type { SnapshotReader } from './reader';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';

/** Known readers, most specific first (binary formats with magic bytes before text formats). */
export const SNAPSHOT_READERS: readonly SnapshotReader[] = [csvReader];

/** The reader for a file (by content and name); throws SnapshotFormatError when none fits. */
export function snapshotReaderFind(bytes: Uint8Array, fileName: string, readers: readonly SnapshotReader[] = SNAPSHOT_READERS): SnapshotReader {
  for (const r of readers) if (r.sniff(bytes, fileName)) return r;
  const known = readers.map((r) => `${r.name} (${r.description})`).join('; ');
  throw new SnapshotFormatError(fileName, `not a snapshot format torusgrav reads; known formats: ${known}`);
}

/** Reads a snapshot in any known format; throws SnapshotFormatError (file, row, column) on bad input. */
export async function snapshotRead(
  bytes: Uint8Array,
  fileName: string,
  mapping: ColumnMapping = {},
  readers: readonly SnapshotReader[] = SNAPSHOT_READERS,
): Promise<Snapshot> {
  return snapshotReaderFind(bytes, fileName, readers).read(bytes, fileName, mapping);
}
