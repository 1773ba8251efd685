/**
 * Binary formats' common step: mapping references → arrays and columns (checked: present, numeric, one
 * row per particle), then one read per array into flat Float64Arrays, then the checks every value
 * gets (finite; ids integer), subsampling's mass scale, and the box from the file.
 */
import type { Box } from '../box';
import type { ArrayStore, StoredArray } from './arrayStore';
import { type LoadOptions, LOAD_LIMIT_BYTES, type MappingProposal, loadLimitError } from './description';
import type { ColumnPick } from './npyScatter';
import { shapeText } from './npyHeader';
import { type ColumnMapping, type FieldRef, type Snapshot, SnapshotFormatError, type VectorRef } from './snapshot';

/** One column of one array. */
export interface FieldSource {
  readonly array: StoredArray;
  readonly column: number;
}

/** "pos (1000, 3) float64, mass (1000,) float64, …" (at most 12 shown). */
export function arraysListText(store: ArrayStore): string {
  const shown = store.arrays.slice(0, 12).map((a) => `${a.info.name || '(the array)'} ${shapeText(a.info.shape)} ${a.info.dtype}`);
  if (store.arrays.length > 12) shown.push(`… (${store.arrays.length} in all)`);
  return shown.length ? shown.join(', ') : 'no arrays at all';
}

/** The array a named reference points at, and the column its [k] suffix picks (null: none given). */
function arrayFind(store: ArrayStore, fileName: string, ref: FieldRef, what: string): { array: StoredArray; column: number | null } {
  if (store.columnsOf) {
    const a = store.columnsOf;
    const t = typeof ref === 'number' ? ref : /^\s*\d+\s*$/.test(ref) ? Number(ref) : NaN;
    const cols = a.info.shape.length === 2 ? a.info.shape[1] : 1;
    if (!Number.isInteger(t)) {
      throw new SnapshotFormatError(fileName, `${what} is mapped to ${JSON.stringify(ref)}, but a .npy file has no names: choose columns by number, 0 to ${cols - 1}`);
    }
    if (t < 0 || t >= cols) throw new SnapshotFormatError(fileName, `${what} is mapped to column ${t}, but the array ${shapeText(a.info.shape)} has columns 0 to ${cols - 1}`);
    return { array: a, column: t };
  }
  const text = String(ref).trim();
  const m = /^(.*?)\s*\[\s*(\d+)\s*\]$/.exec(text);
  const name = m ? m[1] : text;
  const column = m ? Number(m[2]) : null;
  const variants = (n: string) => [n, n.replace(/^\/+/, ''), `/${n.replace(/^\/+/, '')}`, n.replace(/\.npy$/i, '')];
  const wanted = new Set(variants(name));
  let hit = store.arrays.find((a) => wanted.has(a.info.name));
  if (!hit) {
    const lower = new Set([...wanted].map((n) => n.toLowerCase()));
    const loose = store.arrays.filter((a) => lower.has(a.info.name.toLowerCase()));
    if (loose.length === 1) hit = loose[0];
  }
  if (!hit) {
    const kind = store.format === 'hdf5' ? 'dataset' : 'array';
    throw new SnapshotFormatError(fileName, `no ${kind} ${JSON.stringify(name)} (needed for ${what}); the file has: ${arraysListText(store)}`);
  }
  return { array: hit, column };
}

/** Refuses arrays that cannot be read as numbers. */
function usableCheck(a: StoredArray, fileName: string, what: string): void {
  if (!a.info.usable) throw new SnapshotFormatError(fileName, `cannot be used for ${what}: it ${a.info.note ?? 'is not numeric'}`, { array: a.info.label });
}

/** A per-particle number: a 1-D array, an N×1 array, or one column of a 2-D array. */
export function scalarResolve(store: ArrayStore, fileName: string, ref: FieldRef, what: string): FieldSource {
  const { array, column } = arrayFind(store, fileName, ref, what);
  usableCheck(array, fileName, what);
  const shape = array.info.shape;
  if (shape.length === 1) {
    if (column !== null && column !== 0) throw new SnapshotFormatError(fileName, `has shape ${shapeText(shape)}: it has no column ${column} (needed for ${what})`, { array: array.info.label });
    return { array, column: 0 };
  }
  if (shape.length === 2) {
    if (column !== null) {
      if (column >= shape[1]) throw new SnapshotFormatError(fileName, `has shape ${shapeText(shape)}: columns 0 to ${shape[1] - 1}, not ${column} (needed for ${what})`, { array: array.info.label });
      return { array, column };
    }
    if (shape[1] === 1) return { array, column: 0 };
    throw new SnapshotFormatError(fileName, `has shape ${shapeText(shape)}, several numbers per particle; for ${what} pick one column, e.g. ${array.info.name}[0]`, { array: array.info.label });
  }
  throw new SnapshotFormatError(fileName, `has shape ${shapeText(shape)}; ${what} need one number per particle (shape (N,) or (N, k) with a column)`, { array: array.info.label });
}

/** A per-particle 3-vector: one N×3 array or three per-particle numbers. */
export function vectorResolve(store: ArrayStore, fileName: string, ref: VectorRef, what: string): [FieldSource, FieldSource, FieldSource] {
  if (Array.isArray(ref)) {
    const r = ref as readonly FieldRef[];
    if (r.length !== 3) throw new SnapshotFormatError(fileName, `${what} need three references (x, y, z), got ${r.length}`);
    return [0, 1, 2].map((d) => scalarResolve(store, fileName, r[d], `${what} ${'xyz'[d]}`)) as [FieldSource, FieldSource, FieldSource];
  }
  const single = ref as FieldRef;
  if (store.columnsOf) {
    throw new SnapshotFormatError(fileName, `${what} need three columns of the .npy array (e.g. 0,1,2), got only ${JSON.stringify(single)}`);
  }
  const { array, column } = arrayFind(store, fileName, single, what);
  if (column !== null) return vectorResolve(store, fileName, [`${array.info.name}[${column}]`, `${array.info.name}[${column + 1}]`, `${array.info.name}[${column + 2}]`], what);
  usableCheck(array, fileName, what);
  const shape = array.info.shape;
  if (shape.length === 2 && shape[1] === 3) return [0, 1, 2].map((c) => ({ array, column: c })) as [FieldSource, FieldSource, FieldSource];
  if (shape.length === 2 && shape[1] > 3) {
    const n = array.info.name;
    throw new SnapshotFormatError(fileName, `has shape ${shapeText(shape)}: ${shape[1]} columns, not 3; name the three ${what} columns, e.g. ${n}[0],${n}[1],${n}[2]`, { array: array.info.label });
  }
  throw new SnapshotFormatError(
    fileName,
    `has shape ${shapeText(shape)}; ${what} need an N×3 array or three arrays (x, y, z), one row per particle`,
    { array: array.info.label },
  );
}

/** Rows of a source array. */
function rowsOf(s: FieldSource): number {
  return s.array.info.shape[0];
}

/** "dataset "/pos"" or "dataset "/data", columns 0, 1, 2" for reports. */
function sourceText(parts: readonly FieldSource[]): string {
  const arrays = [...new Set(parts.map((p) => p.array))];
  if (arrays.length === 1) {
    const a = arrays[0];
    const full = a.info.shape.length === 2 && a.info.shape[1] === parts.length && parts.every((p, k) => p.column === k);
    if (full || a.info.shape.length === 1) return a.info.label;
    return `${a.info.label}, column${parts.length > 1 ? 's' : ''} ${parts.map((p) => p.column).join(', ')}`;
  }
  return parts.map((p) => (p.array.info.shape.length === 1 ? p.array.info.label : `${p.array.info.label} column ${p.column}`)).join(' / ');
}

/** The box from a small entry: one side (cube) or three, each a positive finite number. */
async function boxRead(store: ArrayStore, fileName: string, ref: string): Promise<Box> {
  const values = await store.readSmall(ref);
  if (values === null) {
    const attrs = store.attributes.slice(0, 12).map((a) => `${a.ref} = ${JSON.stringify(a.value ?? a.dtype)}`);
    throw new SnapshotFormatError(
      fileName,
      `no box entry ${JSON.stringify(ref)} (write "/path" for a dataset or "/path#name" for an attribute)${attrs.length ? `; attributes: ${attrs.join(', ')}` : ''}`,
    );
  }
  const count = Array.isArray(values) ? values.length : (values as { elements: number }).elements;
  if (!Array.isArray(values) || (count !== 1 && count !== 3)) {
    throw new SnapshotFormatError(fileName, `the box entry ${JSON.stringify(ref)} holds ${count} values; a box is one number (cube side) or three (sides)`);
  }
  for (const v of values) {
    if (!(Number.isFinite(v) && v > 0)) throw new SnapshotFormatError(fileName, `the box entry ${JSON.stringify(ref)} holds ${v}; box sides must be positive finite numbers`);
  }
  return values.length === 1 ? { lx: values[0], ly: values[0], lz: values[0] } : { lx: values[0], ly: values[1], lz: values[2] };
}

/**
 * Reads the mapped arrays of a store into a Snapshot. Unmapped positions and mass come from the
 * proposal; accelerations, ids and softening are read only when mapped.
 */
export async function storeAssemble(
  store: ArrayStore,
  fileName: string,
  mapping: ColumnMapping,
  proposal: MappingProposal,
  options: LoadOptions = {},
): Promise<Snapshot> {
  const every = options.every ?? 1;
  if (!Number.isInteger(every) || every < 1) throw new RangeError(`every must be a positive integer, got ${every}`);
  const massDefault = mapping.massDefault ?? 1;
  if (!Number.isFinite(massDefault)) throw new SnapshotFormatError(fileName, `default mass must be finite, got ${massDefault}`);
  const posRef = mapping.positions ?? (proposal.complete ? proposal.mapping.positions : undefined);
  if (posRef === undefined && store.columnsOf) {
    throw new SnapshotFormatError(fileName, `${proposal.notes.join('; ')}; save positions as an (N, 3) array, or choose three columns by number`);
  }
  if (posRef === undefined) {
    const kind = store.format === 'hdf5' ? 'dataset' : 'array';
    throw new SnapshotFormatError(
      fileName,
      `no ${kind} of shape (N, 3) and no x, y, z ${kind}s found for the positions (${proposal.notes.join('; ') || 'nothing fits'}); ` +
        `the file has: ${arraysListText(store)}; choose the positions yourself (one N×3 ${kind} or three ${kind}s)`,
    );
  }
  const pos = vectorResolve(store, fileName, posRef, 'positions');
  const massRef = mapping.mass === null ? undefined : (mapping.mass ?? proposal.mapping.mass ?? undefined);
  const mass = massRef === undefined || massRef === null ? null : scalarResolve(store, fileName, massRef, 'masses');
  const acc = mapping.accelerations === undefined ? null : vectorResolve(store, fileName, mapping.accelerations, 'accelerations');
  const ids = mapping.ids === undefined ? null : scalarResolve(store, fileName, mapping.ids, 'ids');
  const soft = mapping.softening === undefined ? null : scalarResolve(store, fileName, mapping.softening, 'softening');

  const n = rowsOf(pos[0]);
  const named: [string, FieldSource][] = [
    ...pos.map((s, d): [string, FieldSource] => [`positions ${'xyz'[d]}`, s]),
    ...(mass ? [['masses', mass] as [string, FieldSource]] : []),
    ...(acc ? acc.map((s, d): [string, FieldSource] => [`accelerations ${'xyz'[d]}`, s]) : []),
    ...(ids ? [['ids', ids] as [string, FieldSource]] : []),
    ...(soft ? [['softening', soft] as [string, FieldSource]] : []),
  ];
  for (const [what, s] of named) {
    if (rowsOf(s) !== n) {
      throw new SnapshotFormatError(
        fileName,
        `mismatched lengths: positions (${pos[0].array.info.label}) have ${n} rows but ${what} (${s.array.info.label}) have ${rowsOf(s)}; every array of a snapshot needs one row per particle`,
      );
    }
  }
  if (n === 0) throw new SnapshotFormatError(fileName, 'the arrays have no rows (N = 0): no particles', { array: pos[0].array.info.label });
  const count = Math.ceil(n / every);
  // The outputs hold 8 bytes per number; a (damaged) header announcing far more rows than the data
  // limit allows is refused before anything is allocated.
  const outputBytes = 8 * count * (4 + (acc ? 3 : 0) + (ids ? 1 : 0) + (soft ? 1 : 0));
  if (outputBytes > 2 * (options.maxBytes ?? LOAD_LIMIT_BYTES)) {
    throw loadLimitError(fileName, `the arrays announce ${n} rows, which need`, outputBytes * every, options);
  }

  const positions = new Float64Array(3 * count);
  const masses = new Float64Array(count);
  const accelerations = acc ? new Float64Array(3 * count) : undefined;
  const idsOut = ids ? new Float64Array(count) : undefined;
  const softOut = soft ? new Float64Array(count) : undefined;
  // Every output component: its source, output array, stride and offset, and what it is.
  const targets: { src: FieldSource; out: Float64Array; stride: number; offset: number; what: string }[] = [];
  pos.forEach((src, d) => targets.push({ src, out: positions, stride: 3, offset: d, what: 'position' }));
  if (mass) targets.push({ src: mass, out: masses, stride: 1, offset: 0, what: 'mass' });
  if (acc) acc.forEach((src, d) => targets.push({ src, out: accelerations!, stride: 3, offset: d, what: 'acceleration' }));
  if (ids) targets.push({ src: ids, out: idsOut!, stride: 1, offset: 0, what: 'id' });
  if (soft) targets.push({ src: soft, out: softOut!, stride: 1, offset: 0, what: 'softening' });

  const byArray = new Map<StoredArray, ColumnPick[]>();
  for (const t of targets) {
    const list = byArray.get(t.src.array) ?? [];
    list.push({ column: t.src.column, out: t.out, stride: t.stride, offset: t.offset });
    byArray.set(t.src.array, list);
  }
  let done = 0;
  for (const [array, picks] of byArray) {
    await array.read(picks, every);
    options.onProgress?.(++done / byArray.size);
  }

  for (const t of targets) {
    const { out, stride, offset } = t;
    const info = t.src.array.info;
    const place = (p: number) => ({ array: info.label, particle: p * every, ...(info.shape.length === 2 ? { column: String(t.src.column) } : {}) });
    for (let p = 0; p < count; p++) {
      const v = out[offset + stride * p];
      if (!Number.isFinite(v)) throw new SnapshotFormatError(fileName, `${t.what} ${v} is not a finite number (NaN and Inf are not allowed)`, place(p));
      if (t.what === 'id' && !Number.isSafeInteger(v)) throw new SnapshotFormatError(fileName, `id ${v} is not an integer below 2^53`, place(p));
    }
  }

  if (!mass) masses.fill(massDefault);
  if (count < n) {
    const scale = n / count;
    for (let p = 0; p < count; p++) masses[p] *= scale;
  }
  const box = mapping.box !== undefined ? await boxRead(store, fileName, mapping.box) : undefined;
  return {
    format: store.format,
    count,
    positions,
    masses,
    ...(accelerations ? { accelerations } : {}),
    ...(idsOut ? { ids: idsOut } : {}),
    ...(softOut ? { softening: softOut } : {}),
    ...(box ? { box } : {}),
    columns: store.arrays.map((a) => a.info.name),
    massColumn: mass ? sourceText([mass]) : null,
    sources: {
      positions: sourceText(pos),
      ...(mass ? { masses: sourceText([mass]) } : {}),
      ...(acc ? { accelerations: sourceText(acc) } : {}),
      ...(ids ? { ids: sourceText([ids]) } : {}),
      ...(soft ? { softening: sourceText([soft]) } : {}),
      ...(mapping.box !== undefined ? { box: mapping.box } : {}),
    },
    total: n,
    every,
  };
}
