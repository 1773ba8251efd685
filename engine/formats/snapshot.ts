/**
 * What every snapshot reader returns, how columns are chosen, and the error a reader throws.
 * Units are the file's own; nothing here converts or wraps positions.
 */

/** A column chosen by header name (case-insensitive) or by 0-based position in the row. */
export type ColumnRef = string | number;

/**
 * Which columns hold what. Every field is optional; readers fill in their defaults (CSV: positions
 * x,y,z; masses from a column named m or mass, else `massDefault`; no accelerations, no ids).
 */
export interface ColumnMapping {
  /** The three position columns (length units). */
  readonly positions?: readonly [ColumnRef, ColumnRef, ColumnRef];
  /** Mass column; undefined = look for m or mass; null = ignore any mass column, use massDefault. */
  readonly mass?: ColumnRef | null;
  /** Mass of every particle when no mass column is used (default 1). */
  readonly massDefault?: number;
  /** Acceleration columns to read (e.g. the user's own code's forces); not read unless given. */
  readonly accelerations?: readonly [ColumnRef, ColumnRef, ColumnRef];
  /** Particle-id column (integers up to 2^53); not read unless given. */
  readonly ids?: ColumnRef;
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
  /** All column names the file offers, in file order (header names, or "0","1",… without a header). */
  readonly columns: readonly string[];
  /** The column the masses came from, or null when every particle got massDefault. */
  readonly massColumn: string | null;
  /** 1-based line in the file of each particle, for text formats (lets callers point at a row). */
  readonly lines?: Int32Array;
}

/** Where in a file a problem sits; every part optional. */
export interface SnapshotPlace {
  /** 1-based line number in the file (text formats) or record number. */
  readonly row?: number;
  /** 0-based particle index (the data record), when the problem belongs to one particle. */
  readonly particle?: number;
  /** Column name (or number as text). */
  readonly column?: string;
}

/** One-line description "file: line R (particle P), column "c": reason". */
export function snapshotErrorText(file: string, reason: string, place: SnapshotPlace = {}): string {
  const parts: string[] = [];
  if (place.row !== undefined) parts.push(place.particle !== undefined ? `line ${place.row} (particle ${place.particle})` : `line ${place.row}`);
  else if (place.particle !== undefined) parts.push(`particle ${place.particle}`);
  if (place.column !== undefined) parts.push(`column ${JSON.stringify(place.column)}`);
  const where = parts.length ? `${file}: ${parts.join(', ')}` : file;
  return `${where}: ${reason}`.replace(/\s*[\r\n]+\s*/g, ' ');
}

/** A file that cannot be read as a snapshot; `message` is one line naming file, row and column. */
export class SnapshotFormatError extends Error {
  readonly file: string;
  readonly row?: number;
  readonly particle?: number;
  readonly column?: string;
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
  }
}
