/**
 * Random-access bytes: what the readers stream from. The whole file in memory (bytesSource), a Blob or
 * File (blobSource; reads slices, so a large File is never held whole), or a file on disk (the CLI's).
 */

export interface ByteSource {
  /** Total size in bytes. */
  readonly size: number;
  /**
   * Bytes [offset, offset + length) (fewer only at the end of the source). May return a view. When
   * `into` (at least `length` bytes) is given, the source may fill it and return a view of it, so a
   * caller that is done with each piece before the next read can reuse one buffer.
   */
  read(offset: number, length: number, into?: Uint8Array): Promise<Uint8Array>;
  /**
   * A path under which the same bytes can be opened directly by a library with its own file access
   * (h5wasm in Node with the host file system, or a WORKERFS mount in a web worker); optional.
   */
  readonly path?: string;
  /** The whole content when it is already in memory (lets readers skip copying). */
  readonly bytes?: Uint8Array;
}

/** A ByteSource over bytes in memory (views, no copies). */
export function bytesSource(bytes: Uint8Array): ByteSource {
  return {
    size: bytes.length,
    bytes,
    read: async (offset, length) => bytes.subarray(Math.max(0, offset), Math.min(bytes.length, offset + Math.max(0, length))),
  };
}

/** A ByteSource over a Blob or File (web worker or Node ≥ 18): each read is a slice of it. */
export function blobSource(blob: Blob): ByteSource {
  return {
    size: blob.size,
    read: async (offset, length) => new Uint8Array(await blob.slice(offset, Math.min(blob.size, offset + length)).arrayBuffer()),
  };
}

/** Every byte of a source (a view when it is in memory). */
export async function sourceAll(source: ByteSource): Promise<Uint8Array> {
  if (source.bytes) return source.bytes;
  return source.read(0, source.size);
}

/**
 * Calls `f` on consecutive pieces of [begin, end) of at most `chunk` bytes each, in order. The pieces
 * may share one buffer: `f` must be done with a piece when it returns (copy what it keeps).
 */
export async function sourceForEach(
  source: ByteSource,
  begin: number,
  end: number,
  chunk: number,
  f: (piece: Uint8Array, offset: number) => void,
): Promise<void> {
  const into = source.bytes ? undefined : new Uint8Array(Math.min(chunk, Math.max(0, end - begin)));
  for (let at = begin; at < end; ) {
    const piece = await source.read(at, Math.min(chunk, end - at), into);
    if (piece.length === 0) break;
    f(piece, at);
    at += piece.length;
  }
}
