/**
 * What every snapshot reader returns, how columns are chosen, and the error a reader throws.
 * Units are the file's own; nothing here converts or wraps positions.
 */

import type { Box } from '../box';

/**
 * Where one quantity sits in a file. Text: a header name (case-insensitive) or a 0-based column
 * number. 2-D .npy: a column number. .npz: an array name; HDF5: a dataset path ("/bodies/pos").
 * A name may end in [k] to pick column k of a 2-D array ("/data[3]", "pv[0]").
 */
export type ColumnRef = string | number;
/** Same as ColumnRef (the name used for binary formats). */
export type FieldRef = ColumnRef;
/** A 3-vector per particle: one N×3 array, or three references (x, y, z) to N-long columns or arrays. */
export type VectorRef = FieldRef | readonly [FieldRef, FieldRef, FieldRef];

/**
 * Which columns, arrays or datasets hold what. Every field is optional; readers fill in their
 * defaults (text: positions x,y,z; masses from a column named m or mass, else `massDefault`; binary
 * formats: the proposal of snapshotPropose). Accelerations, ids and softening are read only if given.
 */
export interface ColumnMapping {
  /** Positions (length units). */
  readonly positions?: VectorRef;
  /** Masses; undefined = the default (text: a column m or mass); null = no mass column, use massDefault. */
  readonly mass?: FieldRef | null;
  /** Mass of every particle when no mass column is used (default 1). */
  readonly massDefault?: number;
  /** Accelerations of the code under test (length/time² in the file's units). */
  readonly accelerations?: VectorRef;
  /** Particle ids (integers up to 2^53). */
  readonly ids?: FieldRef;
  /** Per-particle softening lengths (length units). */
  readonly softening?: FieldRef;
  /**
   * The periodic box read from the file: an HDF5 dataset path or "path#attribute" ("/bodies#side";
   * "/#BoxSize" or "#BoxSize" is an attribute of the root group), or an .npz array name. The entry
   * holds one side (cube) or three sides.
   */
  readonly box?: string;
}

/** Particles as flat typed arrays, in file order: particle p is the p-th data record (0-based). */
export interface Snapshot {
  /** Name of the reader that produced it (e.g. 'csv'). */
  readonly format: string;
  /** Number of particles N. */
  readonly count: number;
  /** Positions, flat x0,y0,z0,x1,… (3N), file units. */
  readonly positions: Float64Array;
  /** Masses (N), file units; massDefault for every particle when the file has no mass column. */
  readonly masses: Float64Array;
  /** Accelerations (3N) when the mapping asked for them. */
  readonly accelerations?: Float64Array;
  /** Particle ids (N) when the mapping asked for them. */
  readonly ids?: Float64Array;
  /** Per-particle softening lengths (N) when the mapping asked for them. */
  readonly softening?: Float64Array;
  /** The box when the mapping named a box entry in the file. */
  readonly box?: Box;
  /** All column names the file offers, in file order (header names, or "0","1",… without a header). */
  readonly columns: readonly string[];
  /** The column the masses came from, or null when every particle got massDefault. */
  readonly massColumn: string | null;
  /** 1-based line in the file of each particle, for text formats (lets callers point at a row). */
  readonly lines?: Int32Array;
  /** Where each quantity came from, for reports: e.g. { positions: 'dataset "/bodies/pos"' }. */
  readonly sources?: Readonly<Partial<Record<'positions' | 'masses' | 'accelerations' | 'ids' | 'softening' | 'box', string>>>;
  /** Particles in the file (before subsampling; equals count when every particle was read). */
  readonly total?: number;
  /** Subsampling stride: particle p of the snapshot is particle p·every of the file (1 = all read). */
  readonly every?: number;
}

/** Where in a file a problem sits; every part optional. */
export interface SnapshotPlace {
  /** The array or dataset, already labelled: 'array "pos"', 'dataset "/bodies/pos"'. */
  readonly array?: string;
  /** Byte offset in the file (or in the decompressed stream), for damaged binary files. */
  readonly offset?: number;
  /** 1-based line number in the file (text formats) or record number. */
  readonly row?: number;
  /** 0-based particle index (the data record), when the problem belongs to one particle. */
  readonly particle?: number;
  /** Column name (or number as text). */
  readonly column?: string;
}

/** One-line description "file: array "a", line R (particle P), column "c", byte B: reason". */
export function snapshotErrorText(file: string, reason: string, place: SnapshotPlace = {}): string {
  const parts: string[] = [];
  if (place.array !== undefined) parts.push(place.array);
  if (place.row !== undefined) parts.push(place.particle !== undefined ? `line ${place.row} (particle ${place.particle})` : `line ${place.row}`);
  else if (place.particle !== undefined) parts.push(`particle ${place.particle}`);
  if (place.column !== undefined) parts.push(`column ${JSON.stringify(place.column)}`);
  if (place.offset !== undefined) parts.push(`byte ${place.offset}`);
  const where = parts.length ? `${file}: ${parts.join(', ')}` : file;
  return `${where}: ${reason}`.replace(/\s*[\r\n]+\s*/g, ' ');
}

/** A file that cannot be read as a snapshot; `message` is one line naming file, row and column. */
export class SnapshotFormatError extends Error {
  readonly file: string;
  readonly row?: number;
  readonly particle?: number;
  readonly column?: string;
  readonly array?: string;
  readonly offset?: number;
  /** The message without the place. */
  readonly reason: string;

  constructor(file: string, reason: string, place: SnapshotPlace = {}) {
    super(snapshotErrorText(file, reason, place));
    this.name = 'SnapshotFormatError';
    this.file = file;
    this.reason = reason;
    this.row = place.row;
    this.particle = place.particle;
    this.column = place.column;
    this.array = place.array;
    this.offset = place.offset;
  }
}
