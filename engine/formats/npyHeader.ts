/**
 * The header of a NumPy .npy file (format versions 1.0, 2.0, 3.0, as specified in numpy's
 * "numpy.lib.format" documentation): magic "\x93NUMPY", version bytes, header length (2 bytes little
 * endian in 1.0, 4 bytes in 2.0/3.0), then a Python dict literal {'descr': …, 'fortran_order': …,
 * 'shape': (…)} padded with spaces and ending in a newline.
 */
import { type Dtype, dtypeParse } from './npyDtype';
import { SnapshotFormatError, type SnapshotPlace } from './snapshot';

/** \x93NUMPY */
export const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

/** A parsed header. */
export interface NpyHeader {
  readonly dtype: Dtype;
  readonly fortran: boolean;
  readonly shape: readonly number[];
  /** Byte offset of the data from the start of the .npy stream. */
  readonly dataOffset: number;
  /** Number of elements (product of the shape). */
  readonly elements: number;
}

/** Whether bytes start with the .npy magic string. */
export function isNpy(b: Uint8Array): boolean {
  return b.length >= 6 && NPY_MAGIC.every((m, i) => b[i] === m);
}

/**
 * How many bytes the header needs (magic + version + length + dict), from the first 12 bytes; null
 * when fewer than 12 are given. Throws for a wrong magic number or an unknown version.
 */
export function npyHeaderLength(b: Uint8Array, fileName: string, place: SnapshotPlace = {}): number | null {
  if (b.length >= 6 && !isNpy(b)) {
    const got = Array.from(b.subarray(0, 6), (c) => c.toString(16).padStart(2, '0')).join(' ');
    throw new SnapshotFormatError(fileName, `wrong magic number (${got}); a .npy file starts with 93 4e 55 4d 50 59 ("\\x93NUMPY"): this is not a NumPy array file`, place);
  }
  if (b.length < 12) return null;
  const major = b[6];
  if (major === 1) return 10 + (b[8] | (b[9] << 8));
  if (major === 2 || major === 3) return 12 + (b[8] | (b[9] << 8) | (b[10] << 16)) + b[11] * 2 ** 24;
  throw new SnapshotFormatError(fileName, `unknown .npy format version ${major}.${b[7]} (torusgrav reads 1.0, 2.0 and 3.0); save the array with numpy.save`, place);
}

/** The value text of `key` in a Python dict literal, or null. */
function dictValue(dict: string, key: string): string | null {
  const m = new RegExp(`['"]${key}['"]\\s*:\\s*`).exec(dict);
  if (!m) return null;
  let i = m.index + m[0].length;
  const start = i;
  let depth = 0;
  let quote = '';
  for (; i < dict.length; i++) {
    const c = dict[i];
    if (quote) {
      if (c === quote) quote = '';
      continue;
    }
    if (c === "'" || c === '"') quote = c;
    else if (c === '(' || c === '[' || c === '{') depth++;
    else if (c === ')' || c === ']' || c === '}') {
      if (depth === 0) break;
      depth--;
    } else if (c === ',' && depth === 0) break;
  }
  return dict.slice(start, i).trim();
}

/** Parses a complete header (b holds at least npyHeaderLength bytes). */
export function npyHeaderParse(b: Uint8Array, fileName: string, place: SnapshotPlace = {}): NpyHeader {
  const length = npyHeaderLength(b, fileName, place);
  if (length === null || b.length < length) {
    throw new SnapshotFormatError(fileName, `the .npy header is cut off (the file has ${b.length} bytes, the header alone needs ${length ?? 12}): the file is truncated`, place);
  }
  const start = b[6] === 1 ? 10 : 12;
  const encoding = b[6] === 3 ? 'utf-8' : 'latin1';
  const dict = new TextDecoder(encoding).decode(b.subarray(start, length)).trim();
  const bad = (why: string) => new SnapshotFormatError(fileName, `the .npy header is damaged (${why}): ${JSON.stringify(dict.slice(0, 120))}`, place);
  if (!dict.startsWith('{') || !dict.endsWith('}')) throw bad('not a dictionary');
  const descr = dictValue(dict, 'descr');
  const fortranText = dictValue(dict, 'fortran_order');
  const shapeText = dictValue(dict, 'shape');
  if (descr === null || fortranText === null || shapeText === null) throw bad("a key of 'descr', 'fortran_order', 'shape' is missing");
  if (fortranText !== 'True' && fortranText !== 'False') throw bad(`fortran_order is ${fortranText}`);
  const sm = /^\(\s*((?:\d+\s*,\s*)*\d*)\s*,?\s*\)$/.exec(shapeText);
  if (!sm) throw bad(`shape ${shapeText} is not a tuple of integers`);
  const shape = sm[1].split(',').map((t) => t.trim()).filter((t) => t.length > 0).map(Number);
  if (shape.some((d) => !Number.isSafeInteger(d))) throw bad(`shape ${shapeText} has a dimension that is too large`);
  const dtype = dtypeParse(descr, fileName, place);
  const elements = shape.reduce((a, d) => a * d, 1);
  return { dtype, fortran: fortranText === 'True', shape, dataOffset: length, elements };
}

/** Shape as numpy prints it: (1000, 3), (5,). */
export function shapeText(shape: readonly number[]): string {
  return shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
}
