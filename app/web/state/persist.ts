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

/**
 * Keeps a file snapshot for the next visit (the demo is remade from its seed, so it clears the slot).
 * The arrays go into a Blob first: structured-cloning large typed arrays into IndexedDB would hold the
 * page's main thread for a noticeable time; a Blob is copied once and stored by reference.
 */
export async function snapshotSave(s: Snapshot | null): Promise<void> {
  try {
    let kept: Kept | null = null;
    if (s && s.kind === 'file' && snapshotBytes(s) <= SNAPSHOT_STORE_LIMIT) {
      const { positions, masses, accelerations, ids, ...meta } = s;
      const parts = [positions, masses, accelerations ?? new Float64Array(0), ids ?? new Float64Array(0)];
      kept = { meta, lengths: parts.map((p) => p.length) as unknown as Kept['lengths'], data: new Blob(parts as BlobPart[]) };
    }
    const db = await dbOpen();
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
    const all = new Float64Array(await k.data.arrayBuffer());
    const [np, nm, na, ni] = k.lengths;
    if (all.length !== np + nm + na + ni || np !== 3 * nm || (na !== 0 && na !== np) || (ni !== 0 && ni !== nm)) return null;
    let o = 0;
    const take = (len: number) => all.slice(o, (o += len));
    const positions = take(np), masses = take(nm), acc = take(na), ids = take(ni);
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
