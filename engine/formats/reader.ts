/**
 * The contract every snapshot format implements. A format is one object: adding a format means adding
 * a reader to the list in registry.ts, nothing else.
 */
import type { ByteSource } from './byteSource';
import type { LoadOptions, SnapshotDescription } from './description';
import type { ColumnMapping, Snapshot } from './snapshot';

export interface SnapshotReader {
  /** Short name shown to users and stored in Snapshot.format (e.g. 'text', 'npy'). */
  readonly name: string;
  /** One-line description for help texts. */
  readonly description: string;
  /** File-name endings it claims, lower case, with the dot (e.g. ['.csv']). */
  readonly extensions: readonly string[];
  /**
   * Whether these bytes look like this format. `bytes` may be only the start of the file (callers pass
   * at least the first 4096 bytes or the whole file); must be cheap and must not throw.
   */
  sniff(bytes: Uint8Array, fileName: string): boolean;
  /** Parses the whole file; throws SnapshotFormatError naming file, row and column on bad input. */
  read(bytes: Uint8Array, fileName: string, mapping?: ColumnMapping): Snapshot | Promise<Snapshot>;
  /** Lists what the file offers and proposes a mapping, reading as little as it can. */
  describe?(source: ByteSource, fileName: string, options?: LoadOptions): Promise<SnapshotDescription>;
  /** Reads the particles, streaming from the source; errors as for read. */
  load?(source: ByteSource, fileName: string, mapping: ColumnMapping, options?: LoadOptions): Promise<Snapshot>;
}
