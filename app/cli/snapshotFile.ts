/** Reading a snapshot file from disk through the engine's format readers, with one-line errors. */
import { readFileSync } from 'node:fs';
import { snapshotRead } from '../../engine/formats/registry';
import type { ColumnMapping, Snapshot } from '../../engine/formats/snapshot';
import { CliError } from './cliErrors';

const READ_ERRORS: Record<string, string> = {
  ENOENT: 'no such file',
  EISDIR: 'it is a folder, not a file',
  EACCES: 'permission denied',
  ERR_FS_FILE_TOO_LARGE: 'the file is too large to read at once (over 2 GiB)',
};

/** The file's bytes; CliError (exit 2) naming the file when it cannot be read. */
export function fileBytesRead(path: string): Uint8Array {
  try {
    return readFileSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? '';
    throw new CliError(`cannot read ${path}: ${READ_ERRORS[code] ?? (e instanceof Error ? e.message : String(e))}`, 2);
  }
}

/** Reads and parses a snapshot; SnapshotFormatError (file, row, column) propagates for bad content. */
export async function snapshotFileRead(path: string, mapping: ColumnMapping = {}): Promise<Snapshot> {
  return snapshotRead(fileBytesRead(path), path, mapping);
}

/** "line 12 (particle 10)" for particle p, using the snapshot's line numbers when it has them. */
export function particlePlace(snapshot: Snapshot, p: number): string {
  return snapshot.lines ? `line ${snapshot.lines[p]} (particle ${p})` : `particle ${p}`;
}
