/**
 * Reading a snapshot file from disk through the engine's format readers: a ByteSource over an open
 * file (read at offsets, so nothing holds the whole file), h5wasm/node for HDF5 (opens the path on the
 * host file system), one-line errors.
 */
import { closeSync, fstatSync, openSync, readSync, statSync } from 'node:fs';
import { resolve } from 'node:path';
import type { ByteSource } from '../../engine/formats/byteSource';
import type { LoadOptions } from '../../engine/formats/description';
import { snapshotLoad } from '../../engine/formats/registry';
import type { ColumnMapping, Snapshot } from '../../engine/formats/snapshot';
import { CliError } from './cliErrors';

const READ_ERRORS: Record<string, string> = {
  ENOENT: 'no such file',
  EISDIR: 'it is a folder, not a file',
  EACCES: 'permission denied',
};

function readError(path: string, e: unknown): CliError {
  const code = (e as NodeJS.ErrnoException).code ?? '';
  return new CliError(`cannot read ${path}: ${READ_ERRORS[code] ?? (e instanceof Error ? e.message : String(e))}`, 2);
}

/**
 * Opens a file as a ByteSource; CliError (exit 2) naming the file when it cannot be read. The reads are
 * synchronous on purpose: the thread has nothing else to do meanwhile, and each asynchronous call is a
 * round trip through libuv's thread pool, which costs milliseconds while worker threads start.
 */
export async function fileSourceOpen(path: string): Promise<{ source: ByteSource; close: () => Promise<void> }> {
  let fd: number;
  let size: number;
  try {
    if (statSync(path).isDirectory()) throw Object.assign(new Error('folder'), { code: 'EISDIR' });
    fd = openSync(path, 'r');
    size = fstatSync(fd).size;
  } catch (e) {
    throw readError(path, e);
  }
  const source: ByteSource = {
    size,
    path: resolve(path),
    async read(offset, length, into) {
      const n = Math.max(0, Math.min(length, size - offset));
      const buf = into && into.length >= n ? into : new Uint8Array(n);
      let got = 0;
      try {
        while (got < n) {
          const bytesRead = readSync(fd, buf, got, n - got, offset + got);
          if (bytesRead === 0) break;
          got += bytesRead;
        }
      } catch (e) {
        throw readError(path, e);
      }
      return new Uint8Array(buf.buffer, buf.byteOffset, got);
    },
  };
  return { source, close: async () => closeSync(fd) };
}

/** h5wasm for Node: opens paths on the host file system (loaded on first use). */
export const h5wasmNode = (): Promise<unknown> => import('h5wasm/node');

/** Reads and parses a snapshot (streaming); SnapshotFormatError (file, place) propagates for bad content. */
export async function snapshotFileRead(path: string, mapping: ColumnMapping = {}, options: LoadOptions = {}): Promise<Snapshot> {
  const { source, close } = await fileSourceOpen(path);
  try {
    return await snapshotLoad(source, path, mapping, { h5wasm: h5wasmNode, ...options });
  } finally {
    await close();
  }
}

/** "line 12 (particle 10)" for particle p, using the snapshot's line numbers when it has them. */
export function particlePlace(snapshot: Snapshot, p: number): string {
  if (snapshot.lines) return `line ${snapshot.lines[p]} (particle ${p})`;
  return `particle ${p * (snapshot.every ?? 1)}`;
}
