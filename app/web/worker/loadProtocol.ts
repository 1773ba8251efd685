/**
 * The two file requests of the compute worker: `describe` (what a file offers and a proposed mapping)
 * and `load` (the particles, read with a chosen mapping, with progress). The file travels as a File or
 * Blob (structured-cloned by reference, read in slices inside the worker) or as bytes.
 */
import type { Box } from '../../../engine/box';
import type { SnapshotDescription } from '../../../engine/formats/description';
import type { ColumnMapping } from '../../../engine/formats/snapshot';

/** What the loader advises when a file is above the load limit (the page reopens the mapping step). */
export const LIMIT_ADVICE = 'keep every K-th particle (the "keep every" field of the mapping step)';

/** Lists the arrays, columns or datasets of a file, its attributes and a proposed mapping. */
export interface DescribeRequest {
  readonly type: 'describe';
  readonly file: Blob | Uint8Array;
  readonly fileName: string;
}

/** Reads the particles of a file with a mapping; the box comes from the file, else `box`, else a guess. */
export interface LoadRequest {
  readonly type: 'load';
  readonly file: Blob | Uint8Array;
  readonly fileName: string;
  readonly mapping: ColumnMapping;
  /** The box the user typed (used when the mapping names no box entry of the file); null: guess. */
  readonly box: Box | null;
  /** Keep every K-th particle (default 1). */
  readonly every?: number;
  /** Load limit in bytes of file data (default: the engine's). */
  readonly maxBytes?: number;
}

export interface DescribePayload {
  readonly kind: 'describe';
  readonly description: SnapshotDescription;
}

export interface LoadPayload {
  readonly kind: 'load';
  /** Reader name ('text', 'npy', 'npz', 'hdf5'). */
  readonly format: string;
  readonly count: number;
  /** Particles in the file (before subsampling) and the stride kept. */
  readonly total: number;
  readonly every: number;
  /** Flat xyz, the file's length units, as read (not wrapped). */
  readonly positions: Float64Array;
  readonly masses: Float64Array;
  readonly accelerations: Float64Array | null;
  readonly ids: Float64Array | null;
  readonly softening: Float64Array | null;
  /** The box used, where it came from, and as text for the form. */
  readonly box: Box;
  readonly boxFrom: 'file' | 'typed' | 'guessed';
  readonly boxText: string;
  /** Particles outside [0,Lx)×[0,Ly)×[0,Lz) (wrapped before computing). */
  readonly outside: number;
  readonly columns: readonly string[];
  readonly massColumn: string | null;
  /** Short names of the acceleration components for labels ("ax, ay, az"; "/run/acc[0]…"). */
  readonly accelerationColumns: readonly [string, string, string] | null;
  /** Where each quantity came from (engine wording, e.g. 'dataset "/bodies/pos"'). */
  readonly sources: Readonly<Record<string, string>>;
}
