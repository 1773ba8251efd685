/**
 * The contract every snapshot format implements. A format is one object: adding .npy, HDF5 or a
 * decompressing wrapper means adding a reader to the list in registry.ts, nothing else.
 */
import type { ColumnMapping, Snapshot } from './snapshot';

export interface SnapshotReader {
  /** Short name shown to users and stored in Snapshot.format (e.g. 'csv'). */
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
}
