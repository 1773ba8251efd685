/**
 * HDF5 snapshots through h5wasm (loaded on first use with a dynamic import, so it is in no first
 * bundle). Every dataset of the file is listed with its shape and type and every attribute with its
 * value; nothing is assumed about group layout. Datasets are read in blocks of rows (hyperslabs), with
 * a row stride when subsampling. HDF5's own error stack becomes the reason of a SnapshotFormatError.
 */
import type { ArrayStore, StoredArray } from './arrayStore';
import { storeAssemble } from './assemble';
import { type ByteSource, bytesSource, sourceAll } from './byteSource';
import { type ArrayInfo, type AttributeInfo, type LoadOptions, type SnapshotDescription, type ValueKind, loadLimitError, loadLimitExceeded } from './description';
import { storeProposal } from './propose';
import type { SnapshotReader } from './reader';
import { structureSignature } from './signature';
import { type ColumnMapping, type Snapshot, SnapshotFormatError } from './snapshot';

/** The parts of h5wasm's module used here (h5wasm or h5wasm/node). */
interface H5Api {
  readonly ready: Promise<{ FS: { writeFile(p: string, d: Uint8Array): void; unlink(p: string): void }; activate_throwing_error_handler?: () => number }>;
  readonly File: new (path: string, mode?: string) => H5Group & { close(): number };
  readonly Group: abstract new (...a: never[]) => H5Group;
  readonly Dataset: abstract new (...a: never[]) => H5Dataset;
}
interface H5Meta {
  type: number;
  size: number;
  signed: boolean;
  littleEndian: boolean;
  vlen: boolean;
  shape: number[] | null;
  compound_type?: { members: { name: string; type: number; size: number }[] };
}
interface H5Attr {
  readonly metadata: H5Meta;
  readonly shape: number[] | null;
  readonly value: unknown;
}
interface H5Object {
  readonly path: string;
  readonly attrs: Record<string, H5Attr>;
}
interface H5Group extends H5Object {
  keys(): string[];
  get(name: string): unknown;
}
interface H5Dataset extends H5Object {
  readonly metadata: H5Meta;
  readonly shape: number[] | null;
  slice(ranges: ([number, number] | [number, number, number] | [])[]): unknown;
  readonly value: unknown;
}

/** HDF5 files start with \x89HDF\r\n\x1a\n (HDF5 File Format Specification, superblock signature). */
const HDF5_MAGIC = [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a];

/** Whether bytes start with the HDF5 signature (at offset 0; user blocks of 512·2^k bytes are not sniffed). */
export function isHdf5(b: Uint8Array): boolean {
  return b.length >= 8 && HDF5_MAGIC.every((m, i) => b[i] === m);
}

const ready = new WeakSet<object>();

/** Loads h5wasm (the provider, or the browser/Node-neutral 'h5wasm' build) and makes its errors throw. */
async function h5Load(options: LoadOptions): Promise<H5Api> {
  const mod = (options.h5wasm ? await options.h5wasm() : await import('h5wasm')) as H5Api & { default?: H5Api };
  const api = (mod.File ? mod : mod.default) as H5Api;
  const module = await api.ready;
  if (!ready.has(module)) {
    // Turns HDF5's printed error stack into thrown errors (nothing reaches stderr).
    module.activate_throwing_error_handler?.();
    ready.add(module);
  }
  return api;
}

/** The innermost reason of an h5wasm/HDF5 error ("truncated file: eof = 1500, …"). */
export function h5Reason(e: unknown): string {
  const text = e instanceof Error ? e.message : String(e);
  const lines = [...text.matchAll(/#\d+: .*? in [\w]+\(\): (.*)/g)].map((m) => m[1].trim());
  const minor = [...text.matchAll(/minor: (.*)/g)].map((m) => m[1].trim());
  const last = lines.length ? lines[lines.length - 1] : text.split('\n')[0];
  const tail = minor.length ? ` (${minor[minor.length - 1]})` : '';
  return `${last}${tail}`.replace(/\s+/g, ' ').slice(0, 300);
}

/** Kind and readable name of an HDF5 type. */
function typeOf(m: H5Meta): { kind: ValueKind; name: string; numeric: boolean } {
  if (m.type === 3) return { kind: 'string', name: 'string', numeric: false };
  if (m.vlen) return { kind: 'other', name: 'variable-length', numeric: false };
  if (m.type === 1) return { kind: 'float', name: `float${8 * m.size}`, numeric: m.size === 4 || m.size === 8 };
  if (m.type === 0) return { kind: m.signed ? 'int' : 'uint', name: `${m.signed ? 'int' : 'uint'}${8 * m.size}`, numeric: true };
  if (m.type === 3) return { kind: 'string', name: 'string', numeric: false };
  if (m.type === 11) return { kind: 'complex', name: `complex${8 * m.size}`, numeric: false };
  if (m.type === 6) {
    const names = (m.compound_type?.members ?? []).map((x) => x.name);
    const lower = names.map((x) => x.toLowerCase());
    if (names.length === 2 && ((lower[0] === 'r' && lower[1] === 'i') || (lower[0].startsWith('real') && lower[1].startsWith('imag')))) {
      return { kind: 'complex', name: `complex${8 * m.size}`, numeric: false };
    }
    return { kind: 'compound', name: `compound (fields ${names.join(', ')})`, numeric: false };
  }
  if (m.type === 8) return { kind: 'bool', name: 'enum', numeric: false };
  const names = ['integer', 'float', 'time', 'string', 'bitfield', 'opaque', 'compound', 'reference', 'enum', 'variable-length', 'array'];
  return { kind: 'other', name: names[m.type] ?? `HDF5 class ${m.type}`, numeric: false };
}

/** Why a dataset of this type cannot be read, and what to do. */
function refusal(t: { kind: ValueKind; name: string }): string {
  if (t.kind === 'complex') return `holds complex numbers (${t.name}); torusgrav reads real numbers: store the real part as its own dataset`;
  if (t.kind === 'string') return 'holds strings, not numbers';
  if (t.kind === 'compound') return `has a ${t.name} type; store each field as its own dataset`;
  return `has type ${t.name}, which torusgrav does not read; use float64, float32 or an integer type`;
}

/** Attribute value: numbers (≤ 16), or a short string; undefined otherwise. */
function attrValue(a: H5Attr): number | number[] | string | undefined {
  let v: unknown;
  try {
    v = a.value;
  } catch {
    return undefined;
  }
  if (typeof v === 'number') return v;
  if (typeof v === 'bigint') return Number(v);
  if (typeof v === 'string') return v.slice(0, 200);
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
    const arr = v as unknown as ArrayLike<number | bigint>;
    if (arr.length > 16 || v instanceof Uint8Array) return undefined;
    return Array.from(arr, (x) => Number(x));
  }
  if (Array.isArray(v) && v.length <= 16 && v.every((x) => typeof x === 'string')) return v.join(', ').slice(0, 200);
  return undefined;
}

const MAX_OBJECTS = 100_000;
const MAX_DEPTH = 64;

/** An HDF5 file opened as a store. */
function h5Store(api: H5Api, file: H5Group & { close(): number }, fileName: string, onClose: () => void): ArrayStore {
  const arrays: StoredArray[] = [];
  const attributes: AttributeInfo[] = [];
  const datasets = new Map<string, H5Dataset>();
  let objects = 0;

  const attrsOf = (obj: H5Object, path: string) => {
    let names: string[];
    try {
      names = Object.keys(obj.attrs);
    } catch {
      return;
    }
    for (const name of names) {
      try {
        const a = obj.attrs[name];
        const t = typeOf(a.metadata);
        const value = attrValue(a);
        attributes.push({
          path,
          name,
          ref: `${path}#${name}`,
          shape: a.shape ?? [],
          dtype: t.name,
          kind: t.kind,
          ...(value !== undefined ? { value } : {}),
        });
      } catch {
        // an attribute h5wasm cannot describe is left out
      }
    }
  };

  const visit = (group: H5Group, path: string, depth: number) => {
    attrsOf(group, path);
    if (depth > MAX_DEPTH) return;
    for (const key of group.keys()) {
      if (++objects > MAX_OBJECTS) throw new SnapshotFormatError(fileName, `more than ${MAX_OBJECTS} objects in the file; torusgrav lists at most that many`);
      const childPath = path === '/' ? `/${key}` : `${path}/${key}`;
      let child: unknown;
      try {
        child = group.get(key);
      } catch {
        continue; // external or broken links are not followed
      }
      if (child instanceof api.Dataset) {
        const ds = child as H5Dataset;
        const m = ds.metadata;
        const t = typeOf(m);
        const shape = ds.shape ?? [];
        let note: string | undefined;
        if (!t.numeric) note = refusal(t);
        else if (shape.length === 0) note = 'is a single number (a scalar dataset), not one per particle';
        else if (shape.length > 2) note = `has ${shape.length} dimensions (${shape.join(', ')}); per-particle data have shape (N,) or (N, k)`;
        const elements = shape.reduce((p, d) => p * d, 1);
        let value: number | number[] | undefined;
        if (t.numeric && elements >= 1 && elements <= 3 && shape.length <= 1) {
          try {
            const v = ds.value as ArrayLike<number | bigint> | number | bigint;
            value = typeof v === 'number' || typeof v === 'bigint' ? Number(v) : elements === 1 ? Number(v[0]) : Array.from(v, (x) => Number(x));
          } catch {
            value = undefined;
          }
        }
        const info: ArrayInfo = {
          name: childPath,
          label: `dataset ${JSON.stringify(childPath)}`,
          shape,
          dtype: t.name,
          kind: t.kind,
          usable: note === undefined,
          ...(note ? { note } : {}),
          ...(value !== undefined ? { value } : {}),
        };
        datasets.set(childPath, ds);
        arrays.push({ info, read: (picks, every) => datasetRead(ds, info, picks, every, fileName) });
        attrsOf(ds, childPath);
      } else if (child instanceof api.Group) {
        visit(child as H5Group, childPath, depth + 1);
      }
    }
  };
  try {
    visit(file, '/', 0);
  } catch (e) {
    if (e instanceof SnapshotFormatError) throw e;
    throw new SnapshotFormatError(fileName, `the HDF5 file is damaged: ${h5Reason(e)}`);
  }

  return {
    format: 'hdf5',
    arrays,
    attributes,
    async readSmall(ref: string) {
      const hash = ref.lastIndexOf('#');
      if (hash >= 0) {
        const path = ref.slice(0, hash).trim() || '/';
        const name = ref.slice(hash + 1).trim();
        const norm = path === '/' ? '/' : `/${path.replace(/^\/+|\/+$/g, '')}`;
        const a = attributes.find((x) => x.path === norm && x.name === name);
        if (!a) return null;
        if (typeof a.value === 'number') return [a.value];
        if (Array.isArray(a.value)) return [...a.value];
        return { elements: a.shape.reduce((p, d) => p * d, 1) };
      }
      const norm = `/${ref.trim().replace(/^\/+/, '')}`;
      const a = arrays.find((x) => x.info.name === norm);
      if (!a) return null;
      const v = a.info.value;
      if (v === undefined) return { elements: a.info.shape.reduce((p, d) => p * d, 1) };
      return typeof v === 'number' ? [v] : [...v];
    },
    close() {
      try {
        file.close();
      } catch {
        // already closed
      }
      onClose();
    },
  };
}

/** Rows per hyperslab block: about 2^20 elements (8 MiB of float64 in the wasm heap, and its copy). */
function blockRows(cols: number): number {
  return Math.max(1, Math.floor((1 << 20) / Math.max(1, cols)));
}

/** Reads picked columns of rows 0, every, 2·every, … of a dataset, block by block. */
async function datasetRead(ds: H5Dataset, info: ArrayInfo, picks: readonly { column: number; out: Float64Array; stride: number; offset: number }[], every: number, fileName: string): Promise<void> {
  const shape = info.shape;
  const rows = shape[0];
  const cols = shape.length === 2 ? shape[1] : 1;
  const step = blockRows(cols) * every;
  for (let begin = 0; begin < rows; begin += step) {
    const end = Math.min(rows, begin + step);
    const rowRange: [number, number] | [number, number, number] = every > 1 ? [begin, end, every] : [begin, end];
    let block: ArrayLike<number | bigint>;
    try {
      block = ds.slice(shape.length === 2 ? [rowRange, []] : [rowRange]) as ArrayLike<number | bigint>;
    } catch (e) {
      throw new SnapshotFormatError(fileName, `cannot read rows ${begin} to ${end - 1}: ${h5Reason(e)}`, { array: info.label });
    }
    const kept = Math.ceil((end - begin) / every);
    if (!block || block.length !== kept * cols) {
      throw new SnapshotFormatError(fileName, `reading rows ${begin} to ${end - 1} gave ${block ? block.length : 0} values, expected ${kept * cols}: the file is damaged`, { array: info.label });
    }
    const p0 = begin / every;
    const big = typeof block[0] === 'bigint';
    for (const pick of picks) {
      const { out, stride, offset, column } = pick;
      if (big) for (let r = 0; r < kept; r++) out[offset + stride * (p0 + r)] = Number(block[r * cols + column]);
      else {
        const b = block as ArrayLike<number>;
        for (let r = 0; r < kept; r++) out[offset + stride * (p0 + r)] = b[r * cols + column];
      }
    }
    await Promise.resolve();
  }
}

let tempCount = 0;

/**
 * Opens an HDF5 source: by its path through the given h5wasm (source.path with options.h5wasm, e.g.
 * h5wasm/node on the host file system), else by copying its bytes into h5wasm's in-memory file system.
 */
export async function hdf5StoreOpen(source: ByteSource, fileName: string, options: LoadOptions = {}): Promise<ArrayStore> {
  const api = await h5Load(options);
  let path: string;
  let cleanup = () => undefined as void;
  if (source.path !== undefined && options.h5wasm) path = source.path;
  else {
    const bytes = await sourceAll(source);
    if (!isHdf5(bytes)) {
      const got = Array.from(bytes.subarray(0, 8), (c) => c.toString(16).padStart(2, '0')).join(' ');
      throw new SnapshotFormatError(fileName, `wrong magic number (${got || 'empty file'}); an HDF5 file starts with 89 48 44 46 0d 0a 1a 0a ("\\x89HDF"): this is not an HDF5 file`);
    }
    const module = await api.ready;
    path = `/torusgrav-${Date.now().toString(36)}-${++tempCount}.h5`;
    module.FS.writeFile(path, bytes);
    cleanup = () => {
      try {
        module.FS.unlink(path);
      } catch {
        // gone
      }
    };
  }
  let file: H5Group & { close(): number };
  try {
    file = new api.File(path, 'r');
  } catch (e) {
    cleanup();
    throw new SnapshotFormatError(fileName, `cannot open the HDF5 file: ${h5Reason(e)}; the file is damaged or truncated`);
  }
  try {
    return h5Store(api, file, fileName, cleanup);
  } catch (e) {
    try {
      file.close();
    } catch {
      // ignore
    }
    cleanup();
    throw e;
  }
}

/** Lists every dataset and attribute of an HDF5 file and proposes a mapping. */
export async function hdf5Describe(source: ByteSource, fileName: string, options: LoadOptions = {}): Promise<SnapshotDescription> {
  const store = await hdf5StoreOpen(source, fileName, options);
  try {
    const arrays = store.arrays.map((a) => a.info);
    return {
      format: 'hdf5',
      fileName,
      size: source.size,
      arrays,
      attributes: store.attributes,
      proposal: storeProposal(store),
      signature: structureSignature('hdf5', arrays, store.attributes),
    };
  } finally {
    store.close();
  }
}

/** Loads an HDF5 snapshot. */
export async function hdf5Load(source: ByteSource, fileName: string, mapping: ColumnMapping = {}, options: LoadOptions = {}): Promise<Snapshot> {
  if (loadLimitExceeded(source.size, options)) throw loadLimitError(fileName, 'the file holds', source.size, options);
  const store = await hdf5StoreOpen(source, fileName, options);
  try {
    return await storeAssemble(store, fileName, mapping, storeProposal(store), options);
  } finally {
    store.close();
  }
}

/** The HDF5 reader. */
export const hdf5Reader: SnapshotReader = {
  name: 'hdf5',
  description: 'HDF5 file: datasets of shape (N,3) or three (N,) datasets for positions, chosen by path (/group/pos)',
  extensions: ['.h5', '.hdf5', '.hdf', '.he5'],
  sniff: (bytes) => isHdf5(bytes),
  read: (bytes, fileName, mapping) => hdf5Load(bytesSource(bytes), fileName, mapping),
  describe: hdf5Describe,
  load: hdf5Load,
};
