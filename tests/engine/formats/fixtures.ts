/**
 * Test-side writers for snapshot fixtures, independent of the readers under test: .npy (format
 * 1.0/2.0/3.0, any dtype listed, either byte order, C or Fortran order), zip archives (own writer,
 * stored or deflated members via fflate, optional zip64 extra fields as numpy.savez writes them, CRC from
 * node:zlib), gzip (fflate), and HDF5 written by h5wasm in its in-memory file system.
 */
import { deflateSync } from 'fflate';
import { crc32 } from 'node:zlib';

export type NpyType = 'f8' | 'f4' | 'i4' | 'i8' | 'u2' | 'c16' | 'U8';

export interface NpyOptions {
  readonly type?: NpyType;
  readonly bigEndian?: boolean;
  readonly fortran?: boolean;
  readonly version?: 1 | 2 | 3;
  /** Write the header only (for sparse files whose data is all zeros). */
  readonly headerOnly?: boolean;
}

const SIZES: Record<NpyType, number> = { f8: 8, f4: 4, i4: 4, i8: 8, u2: 2, c16: 16, U8: 32 };

/** A .npy file holding `values` (row-major, C order) with `shape`. */
export function npyBytes(values: ArrayLike<number>, shape: readonly number[], o: NpyOptions = {}): Uint8Array {
  const type = o.type ?? 'f8';
  const size = SIZES[type];
  const order = type === 'U8' ? '<' : o.bigEndian ? '>' : '<';
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  const version = o.version ?? 1;
  const pre = version === 1 ? 10 : 12;
  let dict = `{'descr': '${order}${type}', 'fortran_order': ${o.fortran ? 'True' : 'False'}, 'shape': ${shapeText}, }`;
  while ((pre + dict.length + 1) % 64 !== 0) dict += ' ';
  dict += '\n';
  const rows = shape[0] ?? 1;
  const cols = shape.length === 2 ? shape[1] : 1;
  const count = o.headerOnly ? 0 : shape.reduce((a, d) => a * d, 1);
  const data = new Uint8Array(count * size);
  const view = new DataView(data.buffer);
  const le = !o.bigEndian;
  for (let e = 0; e < count; e++) {
    // Storage position of row-major element e.
    const r = Math.floor(e / cols);
    const c = e % cols;
    const at = (o.fortran ? c * rows + r : e) * size;
    const v = values[e];
    if (type === 'f8') view.setFloat64(at, v, le);
    else if (type === 'f4') view.setFloat32(at, v, le);
    else if (type === 'i4') view.setInt32(at, v, le);
    else if (type === 'i8') view.setBigInt64(at, BigInt(v), le);
    else if (type === 'u2') view.setUint16(at, v, le);
    else if (type === 'c16') view.setFloat64(at, v, le);
  }
  const out = new Uint8Array(pre + dict.length + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
  const hv = new DataView(out.buffer);
  if (version === 1) hv.setUint16(8, dict.length, true);
  else hv.setUint32(8, dict.length, true);
  out.set(new TextEncoder().encode(dict), pre);
  out.set(data, pre + dict.length);
  return out;
}

export interface ZipMember {
  readonly name: string;
  readonly data: Uint8Array;
  readonly deflate?: boolean;
}

/** A zip archive; zip64 adds zip64 extra fields with sizes 0xFFFFFFFF in the headers (numpy's force_zip64). */
export function zipBytes(members: readonly ZipMember[], zip64 = false): Uint8Array {
  const parts: Uint8Array[] = [];
  const central: Uint8Array[] = [];
  let offset = 0;
  const enc = new TextEncoder();
  for (const m of members) {
    const name = enc.encode(m.name);
    const body = m.deflate ? deflateSync(m.data) : m.data;
    const crc = crc32(m.data) >>> 0;
    const extra = zip64 ? new Uint8Array(20) : new Uint8Array(0);
    if (zip64) {
      const ev = new DataView(extra.buffer);
      ev.setUint16(0, 1, true);
      ev.setUint16(2, 16, true);
      ev.setBigUint64(4, BigInt(m.data.length), true);
      ev.setBigUint64(12, BigInt(body.length), true);
    }
    const local = new Uint8Array(30 + name.length + extra.length);
    const lv = new DataView(local.buffer);
    lv.setUint32(0, 0x04034b50, true);
    lv.setUint16(4, zip64 ? 45 : 20, true);
    lv.setUint16(8, m.deflate ? 8 : 0, true);
    lv.setUint32(14, crc, true);
    lv.setUint32(18, zip64 ? 0xffffffff : body.length, true);
    lv.setUint32(22, zip64 ? 0xffffffff : m.data.length, true);
    lv.setUint16(26, name.length, true);
    lv.setUint16(28, extra.length, true);
    local.set(name, 30);
    local.set(extra, 30 + name.length);
    const cd = new Uint8Array(46 + name.length);
    const cv = new DataView(cd.buffer);
    cv.setUint32(0, 0x02014b50, true);
    cv.setUint16(4, 20, true);
    cv.setUint16(6, 20, true);
    cv.setUint16(10, m.deflate ? 8 : 0, true);
    cv.setUint32(16, crc, true);
    cv.setUint32(20, body.length, true);
    cv.setUint32(24, m.data.length, true);
    cv.setUint16(28, name.length, true);
    cv.setUint32(42, offset, true);
    cd.set(name, 46);
    central.push(cd);
    parts.push(local, body);
    offset += local.length + body.length;
  }
  const cdSize = central.reduce((a, c) => a + c.length, 0);
  const end = new Uint8Array(22);
  const ev = new DataView(end.buffer);
  ev.setUint32(0, 0x06054b50, true);
  ev.setUint16(8, members.length, true);
  ev.setUint16(10, members.length, true);
  ev.setUint32(12, cdSize, true);
  ev.setUint32(16, offset, true);
  const all = [...parts, ...central, end];
  const out = new Uint8Array(all.reduce((a, p) => a + p.length, 0));
  let at = 0;
  for (const p of all) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** The parts of h5wasm the fixtures use. */
interface H5 {
  ready: Promise<{ FS: { readFile(p: string): Uint8Array; unlink(p: string): void } }>;
  File: new (p: string, m: string) => H5File;
}
export interface H5File {
  create_group(name: string): unknown;
  create_dataset(o: { name: string; data: unknown; shape?: number[] | null; dtype?: string }): unknown;
  create_attribute(name: string, data: unknown, shape?: number[] | null, dtype?: string | null): unknown;
  get(path: string): H5File;
  close(): void;
}

let h5count = 0;

/** An HDF5 file built by `build` (h5wasm, in memory), as bytes. */
export async function hdf5Bytes(build: (f: H5File) => void): Promise<Uint8Array> {
  const h5 = (await import('h5wasm')) as unknown as H5;
  const module = await h5.ready;
  const path = `/fixture-${process.pid}-${++h5count}.h5`;
  const f = new h5.File(path, 'w');
  build(f);
  f.close();
  const bytes = module.FS.readFile(path).slice();
  module.FS.unlink(path);
  return bytes;
}

/** Seeded uniform numbers in [0, 1) (mulberry32; independent of the engine's generator). */
export function seededUniform(n: number, seed: number): Float64Array {
  let a = seed >>> 0;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    out[i] = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  return out;
}

/** Text of a table: header names, rows of numbers joined by `sep`, 17 significant digits. */
export function tableText(names: readonly string[], columns: readonly ArrayLike<number>[], sep = ','): string {
  const n = columns[0].length;
  const lines = [names.join(sep)];
  for (let r = 0; r < n; r++) lines.push(columns.map((c) => c[r].toPrecision(17)).join(sep));
  return lines.join('\n') + '\n';
}
