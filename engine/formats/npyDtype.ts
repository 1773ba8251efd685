/**
 * NumPy dtype strings ("array protocol" type strings such as '<f8', '>f4', '|u1', '<i8', '<c16',
 * '<U10'): which can be read as numbers, and decoding runs of them into doubles.
 */
import type { ValueKind } from './description';
import { SnapshotFormatError, type SnapshotPlace } from './snapshot';

/** A parsed dtype. */
export interface Dtype {
  /** As written in the file, e.g. '<f8'. */
  readonly descr: string;
  /** Readable name: float64, int32, complex128, unicode string, … */
  readonly name: string;
  readonly kind: ValueKind;
  /** Bytes per element. */
  readonly size: number;
  readonly little: boolean;
  /** Whether torusgrav can read it as numbers. */
  readonly numeric: boolean;
}

const KIND_NAMES: Record<string, [ValueKind, string]> = {
  f: ['float', 'float'],
  i: ['int', 'int'],
  u: ['uint', 'uint'],
  b: ['bool', 'bool'],
  c: ['complex', 'complex'],
  U: ['string', 'unicode string'],
  S: ['string', 'byte string'],
  a: ['string', 'byte string'],
  O: ['other', 'Python object'],
  V: ['other', 'raw void'],
  M: ['other', 'datetime'],
  m: ['other', 'timedelta'],
};

/** Parses a descr value from a header (a quoted type string; a list means a structured dtype). */
export function dtypeParse(descrText: string, fileName: string, place: SnapshotPlace = {}): Dtype {
  const t = descrText.trim();
  if (t.startsWith('[')) {
    const fields = [...t.matchAll(/\(\s*'([^']*)'/g)].map((m) => m[1]);
    return {
      descr: t,
      name: `structured (fields ${fields.join(', ') || '?'})`,
      kind: 'compound',
      size: 0,
      little: true,
      numeric: false,
    };
  }
  const m = /^['"]([<>|=])?([a-zA-Z])(\d*)(\[[^\]]*\])?['"]$/.exec(t);
  if (!m) throw new SnapshotFormatError(fileName, `the .npy header has an unreadable dtype ${t}`, place);
  const [, order = '=', code, sizeText] = m;
  const known = KIND_NAMES[code];
  if (!known) throw new SnapshotFormatError(fileName, `the .npy header has an unknown dtype ${t}`, place);
  const size = sizeText === '' ? (code === 'b' ? 1 : 0) : Number(sizeText);
  const [kind, base] = known;
  const numeric =
    (kind === 'float' && (size === 2 || size === 4 || size === 8)) ||
    ((kind === 'int' || kind === 'uint') && (size === 1 || size === 2 || size === 4 || size === 8));
  const bits = kind === 'string' || kind === 'other' ? '' : String(8 * size);
  return { descr: t.slice(1, -1), name: `${base}${bits}`, kind, size: code === 'U' ? 4 * size : size, little: order !== '>', numeric };
}

/** Why a dtype cannot be read, and what to do (for a SnapshotFormatError). */
export function dtypeRefusal(d: Dtype): string {
  if (d.kind === 'complex') return `holds complex numbers (${d.name}); torusgrav reads real numbers: save the real part (a.real) or separate arrays`;
  if (d.kind === 'string') return `holds text (${d.name}), not numbers: convert it with a.astype(float)`;
  if (d.kind === 'compound') return `has a ${d.name} dtype; save each field as its own array (numpy.savez(file, x=a['x'], …))`;
  if (d.kind === 'bool') return 'holds booleans, not numbers';
  if (d.kind === 'float') return `holds ${d.name} numbers, which torusgrav does not read (float16, float32, float64 are read): convert with a.astype(float)`;
  return `has dtype ${d.descr} (${d.name}), which torusgrav does not read; use float64, float32 or an integer type`;
}

/** Half-precision bits → double (IEEE 754 binary16). */
function halfToDouble(h: number): number {
  const s = h & 0x8000 ? -1 : 1;
  const e = (h >> 10) & 0x1f;
  const f = h & 0x3ff;
  if (e === 0) return s * f * 2 ** -24;
  if (e === 31) return f ? NaN : s * Infinity;
  return s * (1 + f / 1024) * 2 ** (e - 15);
}

/**
 * Decodes `count` elements of `d` from b[offset…] into out[0…count): a typed-array view when the bytes
 * are aligned and native (little-endian), DataView otherwise. Integers of 8 bytes beyond 2^53 lose
 * precision (they become the nearest double).
 */
export function dtypeDecode(d: Dtype, b: Uint8Array, offset: number, count: number, out: Float64Array): void {
  const at = b.byteOffset + offset;
  const size = d.size;
  if (d.little && at % size === 0) {
    const buf = b.buffer;
    if (d.kind === 'float' && size === 8) return out.set(new Float64Array(buf, at, count));
    if (d.kind === 'float' && size === 4) return out.set(new Float32Array(buf, at, count));
    if (d.kind === 'int' && size === 4) return out.set(new Int32Array(buf, at, count));
    if (d.kind === 'uint' && size === 4) return out.set(new Uint32Array(buf, at, count));
    if (d.kind === 'int' && size === 2) return out.set(new Int16Array(buf, at, count));
    if (d.kind === 'uint' && size === 2) return out.set(new Uint16Array(buf, at, count));
  }
  if (size === 1) {
    if (d.kind === 'int') for (let k = 0; k < count; k++) out[k] = (b[offset + k] << 24) >> 24;
    else for (let k = 0; k < count; k++) out[k] = b[offset + k];
    return;
  }
  const v = new DataView(b.buffer, at, count * size);
  const le = d.little;
  if (d.kind === 'float') {
    if (size === 8) for (let k = 0; k < count; k++) out[k] = v.getFloat64(8 * k, le);
    else if (size === 4) for (let k = 0; k < count; k++) out[k] = v.getFloat32(4 * k, le);
    else for (let k = 0; k < count; k++) out[k] = halfToDouble(v.getUint16(2 * k, le));
  } else if (d.kind === 'int') {
    if (size === 8) for (let k = 0; k < count; k++) out[k] = Number(v.getBigInt64(8 * k, le));
    else if (size === 4) for (let k = 0; k < count; k++) out[k] = v.getInt32(4 * k, le);
    else for (let k = 0; k < count; k++) out[k] = v.getInt16(2 * k, le);
  } else {
    if (size === 8) for (let k = 0; k < count; k++) out[k] = Number(v.getBigUint64(8 * k, le));
    else if (size === 4) for (let k = 0; k < count; k++) out[k] = v.getUint32(4 * k, le);
    else for (let k = 0; k < count; k++) out[k] = v.getUint16(2 * k, le);
  }
}
