/**
 * Mappings the user confirmed, remembered in the browser's local storage by structure signature (same
 * layout, any particle count), newest first, at most MAPPINGS_KEPT. Unreadable or stale entries are
 * dropped silently; storage failures (private mode, quota) only mean nothing is remembered.
 */
import type { ColumnMapping, FieldRef } from '../../../engine/formats/snapshot';
import type { LoadChoice } from './mappingChoice';

export const MAPPINGS_KEY = 'torusgrav:mappings';
export const MAPPINGS_KEPT = 40;

/** The part of Storage used here (tests pass a Map-backed one). */
export interface KeyValueStore {
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
}

export interface RememberedMapping {
  readonly signature: string;
  /** The file the mapping was confirmed for (shown to the user). */
  readonly fileName: string;
  /** Date.now() when confirmed. */
  readonly savedAt: number;
  readonly choice: LoadChoice;
}

function defaultStore(): KeyValueStore | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null;
  }
}

const isRef = (r: unknown): r is FieldRef => typeof r === 'string' || (typeof r === 'number' && Number.isInteger(r) && r >= 0);
const isVector = (v: unknown) => isRef(v) || (Array.isArray(v) && v.length === 3 && v.every(isRef));

/** Whether a stored value is a well-formed mapping (so a stale or edited entry cannot break a load). */
export function mappingWellFormed(m: unknown): m is ColumnMapping {
  if (typeof m !== 'object' || m === null) return false;
  const o = m as Record<string, unknown>;
  if (!isVector(o.positions)) return false;
  if (o.accelerations !== undefined && !isVector(o.accelerations)) return false;
  if (o.mass !== undefined && o.mass !== null && !isRef(o.mass)) return false;
  for (const k of ['ids', 'softening']) if (o[k] !== undefined && !isRef(o[k])) return false;
  if (o.massDefault !== undefined && !(typeof o.massDefault === 'number' && o.massDefault > 0)) return false;
  if (o.box !== undefined && typeof o.box !== 'string') return false;
  return true;
}

function entryWellFormed(e: unknown): e is RememberedMapping {
  if (typeof e !== 'object' || e === null) return false;
  const o = e as Record<string, unknown>;
  const c = o.choice as Record<string, unknown> | undefined;
  return (
    typeof o.signature === 'string' &&
    typeof o.fileName === 'string' &&
    typeof o.savedAt === 'number' &&
    typeof c === 'object' &&
    c !== null &&
    mappingWellFormed(c.mapping) &&
    (c.boxText === null || typeof c.boxText === 'string') &&
    typeof c.units === 'string' &&
    typeof c.G === 'string' &&
    typeof c.every === 'number' &&
    Number.isSafeInteger(c.every) &&
    c.every >= 1
  );
}

/** Every remembered mapping, newest first. */
export function mappingsAll(store: KeyValueStore | null = defaultStore()): RememberedMapping[] {
  try {
    const raw = store?.getItem(MAPPINGS_KEY);
    if (!raw) return [];
    const list: unknown = JSON.parse(raw);
    if (!Array.isArray(list)) return [];
    return list.filter(entryWellFormed).sort((a, b) => b.savedAt - a.savedAt);
  } catch {
    return [];
  }
}

/** The mapping confirmed for this structure signature, or null. */
export function mappingRecall(signature: string, store: KeyValueStore | null = defaultStore()): RememberedMapping | null {
  return mappingsAll(store).find((e) => e.signature === signature) ?? null;
}

/** Remembers a confirmed mapping (replacing the one of the same signature; the oldest beyond the cap go). */
export function mappingRemember(entry: RememberedMapping, store: KeyValueStore | null = defaultStore()): void {
  const list = [entry, ...mappingsAll(store).filter((e) => e.signature !== entry.signature)].slice(0, MAPPINGS_KEPT);
  try {
    store?.setItem(MAPPINGS_KEY, JSON.stringify(list));
  } catch {
    /* storage full or unavailable: nothing remembered */
  }
}

/** Forgets the mapping of one signature. */
export function mappingForget(signature: string, store: KeyValueStore | null = defaultStore()): void {
  const list = mappingsAll(store).filter((e) => e.signature !== signature);
  try {
    store?.setItem(MAPPINGS_KEY, JSON.stringify(list));
  } catch {
    /* nothing to do */
  }
}
