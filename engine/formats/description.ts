/**
 * What a file offers, before anything is read in full: its arrays (text columns, .npy columns, .npz
 * members, HDF5 datasets) with shapes and types, HDF5 attributes, and a proposed mapping.
 */
import { type ColumnMapping, type FieldRef, SnapshotFormatError, type VectorRef } from './snapshot';

/** What the elements of an array are. Only 'float', 'int' and 'uint' can be read as numbers. */
export type ValueKind = 'float' | 'int' | 'uint' | 'bool' | 'complex' | 'string' | 'compound' | 'other';

/** One array (or text column) of a file. */
export interface ArrayInfo {
  /** How to name it in a mapping: header name, column number as text ("0"), .npz name, HDF5 path. */
  readonly name: string;
  /** For messages and panels: 'column "x"', 'array "pos"', 'dataset "/bodies/pos"'. */
  readonly label: string;
  /** Shape; for text columns [rows] with rows estimated from the file size until the file is read. */
  readonly shape: readonly number[];
  /** Element type as people write it: 'float64', 'float32', 'int64', 'complex128', 'string', … */
  readonly dtype: string;
  readonly kind: ValueKind;
  /** Whether torusgrav can read it as per-particle numbers (numeric, 1-D or 2-D). */
  readonly usable: boolean;
  /** Why not, when not usable. */
  readonly note?: string;
  /** The values of a tiny numeric array (1 to 3 elements; a box side), when the reader knows them. */
  readonly value?: number | readonly number[];
}

/** One HDF5 attribute (or other small named value). */
export interface AttributeInfo {
  /** Path of the object that carries it ("/", "/bodies", "/bodies/pos"). */
  readonly path: string;
  readonly name: string;
  /** The box reference for a mapping: "path#name". */
  readonly ref: string;
  readonly shape: readonly number[];
  readonly dtype: string;
  readonly kind: ValueKind;
  /** The value when it is numeric with at most 16 elements, or a short string. */
  readonly value?: number | readonly number[] | string;
}

/** A proposed mapping plus the other plausible choices for each quantity (for a mapping panel). */
export interface MappingProposal {
  /** The proposed choice; positions undefined when nothing fits (then the user must choose). */
  readonly mapping: ColumnMapping;
  /** Plausible alternatives for each quantity, best first (the proposed one included). */
  readonly candidates: {
    readonly positions: readonly VectorRef[];
    readonly mass: readonly FieldRef[];
    readonly accelerations: readonly VectorRef[];
    readonly ids: readonly FieldRef[];
    readonly softening: readonly FieldRef[];
    /** Box references (dataset paths, "path#attribute") with their values. */
    readonly box: readonly { readonly ref: string; readonly value: number | readonly number[] }[];
  };
  /** Particle count N implied by the proposed positions (null: unknown, e.g. text before reading). */
  readonly count: number | null;
  /** Whether positions were found (else the user must choose them). */
  readonly complete: boolean;
  /** Sentences explaining guesses and gaps, e.g. 'no header: columns 0, 1, 2 taken as x, y, z'. */
  readonly notes: readonly string[];
}

/** Text layout facts. */
export interface TextLayout {
  readonly delimiter: 'comma' | 'tab' | 'whitespace';
  /** Whether column names were found (a header row, or a # comment line right above the data). */
  readonly header: boolean;
  readonly columns: readonly string[];
  /** Whether the file was gzip-compressed. */
  readonly gzip: boolean;
}

/** Everything describe returns. */
export interface SnapshotDescription {
  /** Reader name: 'text', 'npy', 'npz', 'hdf5'. */
  readonly format: string;
  readonly fileName: string;
  /** File size in bytes. */
  readonly size: number;
  readonly arrays: readonly ArrayInfo[];
  readonly attributes: readonly AttributeInfo[];
  readonly text?: TextLayout;
  readonly proposal: MappingProposal;
  /** Structure signature (see snapshotStructureSignature): same value ⇔ same layout, any N. */
  readonly signature: string;
}

/** Options for loading. */
export interface LoadOptions {
  /**
   * Largest amount of data to load, in bytes of the file (uncompressed stream for .gz/.npz), after
   * subsampling: a file of S bytes read with `every` = K needs S/K ≤ maxBytes. Default LOAD_LIMIT_BYTES.
   */
  readonly maxBytes?: number;
  /** Keep every K-th particle (K ≥ 1, default 1); masses are multiplied by N/N_kept. */
  readonly every?: number;
  /** Loads h5wasm (default: import('h5wasm')); the CLI passes h5wasm/node to open files by path. */
  readonly h5wasm?: () => Promise<unknown>;
  /** Called now and then with the fraction of the file read, in [0, 1]. */
  readonly onProgress?: (fraction: number) => void;
  /** What the load-limit error advises (the CLI names its options); has a default. */
  readonly limitAdvice?: string;
}

/** Default load limit: 1 GiB of file data (2^30 bytes). */
export const LOAD_LIMIT_BYTES = 2 ** 30;

/** The error for data above the load limit: "<what> <size>, above the load limit of <limit>; <advice>". */
export function loadLimitError(fileName: string, what: string, bytes: number, options: LoadOptions): SnapshotFormatError {
  const limit = options.maxBytes ?? LOAD_LIMIT_BYTES;
  const every = options.every ?? 1;
  const advice = options.limitAdvice ?? 'raise the limit if the machine has the memory, or keep every K-th particle (subsample)';
  const kept = every > 1 ? ` (${bytesText(bytes / every)} when keeping every ${every}th particle)` : '';
  return new SnapshotFormatError(fileName, `${what} ${bytesText(bytes)}${kept}, above the load limit of ${bytesText(limit)}; ${advice}`);
}

/** Whether `bytes` of data, subsampled by options.every, exceed the load limit. */
export function loadLimitExceeded(bytes: number, options: LoadOptions): boolean {
  return bytes / (options.every ?? 1) > (options.maxBytes ?? LOAD_LIMIT_BYTES);
}

/** "1.50 GiB", "12.0 MiB", "512 bytes". */
export function bytesText(n: number): string {
  if (n >= 2 ** 30) return `${(n / 2 ** 30).toFixed(2)} GiB`;
  if (n >= 2 ** 20) return `${(n / 2 ** 20).toFixed(1)} MiB`;
  if (n >= 2 ** 10) return `${(n / 2 ** 10).toFixed(1)} KiB`;
  return `${n} bytes`;
}
