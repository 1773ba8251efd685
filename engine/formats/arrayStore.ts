/**
 * What a binary format (.npy, .npz, HDF5) hands to the common assembly step: its arrays, each readable
 * by picked columns and kept rows, its attributes, and small values (a box side) by reference.
 */
import type { ArrayInfo, AttributeInfo } from './description';
import type { ColumnPick } from './npyScatter';

export interface StoredArray {
  readonly info: ArrayInfo;
  /** Writes the picked columns (0 for a 1-D array) of rows 0, every, 2·every, … into the picks' outputs. */
  read(picks: readonly ColumnPick[], every: number): Promise<void>;
}

export interface ArrayStore {
  /** Reader name ('npy', 'npz', 'hdf5'). */
  readonly format: string;
  readonly arrays: readonly StoredArray[];
  readonly attributes: readonly AttributeInfo[];
  /**
   * Set for .npy: the single array whose columns references name by number (0, 1, 2); otherwise
   * references name arrays (with an optional [k] column suffix).
   */
  readonly columnsOf?: StoredArray;
  /**
   * The numbers of a small entry (a box): an array name / dataset path or "path#attribute"; null if
   * absent; { elements } when it holds too many numbers (or non-numbers) to be a box.
   */
  readSmall(ref: string): Promise<number[] | { readonly elements: number } | null>;
  /** Releases resources (h5wasm file handles). */
  close(): void;
}
