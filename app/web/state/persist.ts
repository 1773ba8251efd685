/**
 * The session across reloads: the form (browser local storage, as JSON) and the last loaded file
 * snapshot (IndexedDB, as typed arrays) when it is not too large. Failures (private mode, quota) are
 * silent: the page then simply starts fresh.
 */
import { boxMake } from '../../../engine/box';
import { DEFAULT_DRAFT, type Draft, draftFromQuery, draftToQuery } from './settings';
import type { Snapshot } from './types';

const DRAFT_KEY = 'torusgrav:draft';
const DB_NAME = 'torusgrav';
const STORE = 'snapshot';
const LAST = 'last';

/** Largest snapshot kept for the next visit (bytes of its arrays). */
export const SNAPSHOT_STORE_LIMIT = 96 * 1024 * 1024;

/** Saves the form (with every field, including the demo's size when a file is loaded). */
export function draftSave(draft: Draft): void {
  try {
    localStorage.setItem(DRAFT_KEY, JSON.stringify({ query: draftToQuery(draft, null), box: draft.box }));
  } catch {
    /* storage unavailable: nothing kept */
  }
}

/** The saved form, or null. Values go through the same reader as a URL, so stale entries are harmless. */
export function draftLoad(): Draft | null {
  try {
    const raw = localStorage.getItem(DRAFT_KEY);
    if (!raw) return null;
    const v = JSON.parse(raw) as { query?: unknown; box?: unknown };
    if (typeof v.query !== 'string') return null;
    const d = draftFromQuery(v.query, DEFAULT_DRAFT);
    return typeof v.box === 'string' ? { ...d, box: v.box } : d;
  } catch {
    return null;
  }
}

function dbOpen(): Promise<IDBDatabase> {
  return new Promise((resolve, reject) => {
    const req = indexedDB.open(DB_NAME, 1);
    req.onupgradeneeded = () => req.result.createObjectStore(STORE);
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
}

function txDone(tx: IDBTransaction): Promise<void> {
  return new Promise((resolve, reject) => {
    tx.oncomplete = () => resolve();
    tx.onerror = () => reject(tx.error);
    tx.onabort = () => reject(tx.error);
  });
}

/** Bytes of a snapshot's arrays. */
export function snapshotBytes(s: Snapshot): number {
  return s.positions.byteLength + s.masses.byteLength + (s.accelerations?.byteLength ?? 0) + (s.ids?.byteLength ?? 0);
}

/** What is kept: the snapshot's small fields, and its arrays packed in one Blob (stored by reference). */
interface Kept {
  readonly meta: Omit<Snapshot, 'positions' | 'masses' | 'accelerations' | 'ids'>;
  readonly lengths: readonly [number, number, number, number];
  readonly data: Blob;
}

/** Bytes copied into one Blob part per task while a snapshot is kept (a few ms of copying each). */
const BLOB_PART_BYTES = 2 * 1024 * 1024;

/** Ends the current task and resumes in a new one. */
function yieldTask(): Promise<void> {
  return new Promise((r) => setTimeout(r, 0));
}

let saving = 0;

/**
 * The arrays as one Blob, copied in parts of BLOB_PART_BYTES, one task each (a Blob made of Blobs
 * references them without copying); null when a newer save started meanwhile.
 */
async function blobSliced(arrays: readonly Float64Array[], gen: number): Promise<Blob | null> {
  const parts: Blob[] = [];
  for (const a of arrays) {
    const step = BLOB_PART_BYTES / 8;
    for (let b = 0; b < a.length; b += step) {
      if (parts.length > 0) await yieldTask();
      if (gen !== saving) return null;
      parts.push(new Blob([a.subarray(b, Math.min(a.length, b + step)) as BlobPart]));
    }
  }
  return new Blob(parts);
}

/**
 * Keeps a file snapshot for the next visit (the demo is remade from its seed, so it clears the slot).
 * The arrays go into a Blob first: structured-cloning large typed arrays into IndexedDB would hold the
 * page's main thread for a noticeable time; a Blob is stored by reference, and it is copied in parts of
 * a few ms each (10⁶ particles are 32–64 MB), so that keeping a snapshot makes no long task.
 */
export async function snapshotSave(s: Snapshot | null): Promise<void> {
  const gen = ++saving;
  try {
    let kept: Kept | null = null;
    if (s && s.kind === 'file' && snapshotBytes(s) <= SNAPSHOT_STORE_LIMIT) {
      const { positions, masses, accelerations, ids, ...meta } = s;
      const parts = [positions, masses, accelerations ?? new Float64Array(0), ids ?? new Float64Array(0)];
      const data = await blobSliced(parts, gen);
      if (!data) return;
      kept = { meta, lengths: parts.map((p) => p.length) as unknown as Kept['lengths'], data };
    }
    const db = await dbOpen();
    if (gen !== saving) {
      db.close();
      return;
    }
    const tx = db.transaction(STORE, 'readwrite');
    if (kept) tx.objectStore(STORE).put(kept, LAST);
    else tx.objectStore(STORE).delete(LAST);
    await txDone(tx);
    db.close();
  } catch {
    /* not kept */
  }
}

/** The snapshot kept by the last visit, or null. */
export async function snapshotRestore(): Promise<Snapshot | null> {
  try {
    const db = await dbOpen();
    const tx = db.transaction(STORE, 'readonly');
    const req = tx.objectStore(STORE).get(LAST);
    const value = await new Promise<unknown>((resolve, reject) => {
      req.onsuccess = () => resolve(req.result);
      req.onerror = () => reject(req.error);
    });
    db.close();
    const k = value as Kept | undefined;
    if (!k || !k.meta || k.meta.kind !== 'file' || !(k.data instanceof Blob) || !Array.isArray(k.lengths)) return null;
    const [np, nm, na, ni] = k.lengths;
    if (k.data.size !== 8 * (np + nm + na + ni) || np !== 3 * nm || (na !== 0 && na !== np) || (ni !== 0 && ni !== nm)) return null;
    // each array read by itself from its part of the Blob (no copy of the whole on the page's thread)
    let o = 0;
    const take = async (len: number) => new Float64Array(await k.data.slice(8 * o, 8 * (o += len)).arrayBuffer());
    const positions = await take(np), masses = await take(nm), acc = await take(na), ids = await take(ni);
    return {
      ...k.meta,
      positions,
      masses,
      accelerations: na ? acc : null,
      ids: ni ? ids : null,
      box: boxMake(k.meta.box.lx, k.meta.box.ly, k.meta.box.lz),
    };
  } catch {
    return null;
  }
}

/** Forgets the kept form and snapshot. */
export async function sessionForget(): Promise<void> {
  try {
    localStorage.removeItem(DRAFT_KEY);
  } catch {
    /* nothing */
  }
  await snapshotSave(null);
}
