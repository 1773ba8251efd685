/**
 * Text header → which column feeds which particle field, from a ColumnMapping; mistakes (a missing or
 * doubled column) are SnapshotFormatErrors that name the header line and the column.
 */
import { type ColumnMapping, type ColumnRef, SnapshotFormatError, type VectorRef } from './snapshot';

/** A cell of a numbers-only first line (then the file has no header). */
export const NUMBER_LIKE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$/i;

/** Header cell → column name: trimmed, surrounding double quotes removed. */
export function headerName(cell: string): string {
  const t = cell.trim();
  return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).trim() : t;
}

/** Slots a column can feed: 0–2 position, 3 mass, 4–6 acceleration, 7 id, 8 softening. */
export const SLOT_NAMES = ['position x', 'position y', 'position z', 'mass', 'acceleration x', 'acceleration y', 'acceleration z', 'id', 'softening'];

/** Result of layoutResolve. */
export interface Layout {
  /** Slot of each column up to the last used one (−1 = unused). */
  readonly slotOf: Int32Array;
  readonly massColumn: string | null;
  readonly hasAcc: boolean;
  readonly hasIds: boolean;
  readonly hasSoftening: boolean;
}

/** The three references of a vector for a text file (a single name cannot hold three columns). */
function textVector(file: string, ref: VectorRef, what: string): readonly [ColumnRef, ColumnRef, ColumnRef] {
  if (typeof ref === 'string' || typeof ref === 'number') {
    throw new SnapshotFormatError(file, `${what} need three columns (x, y, z), got the single column ${JSON.stringify(ref)}; name three, e.g. x,y,z or 0,1,2`);
  }
  return ref;
}

/** Resolves the mapping against the header (or, without one, against column numbers only). */
export function layoutResolve(file: string, columns: readonly string[], header: boolean, headerRow: number, mapping: ColumnMapping): Layout {
  const lower = columns.map((c) => c.toLowerCase());
  const place = header ? { row: headerRow } : {};
  const find = (ref: ColumnRef, what: string): number => {
    // A number written as text ("3") means a column number unless the header has a column of that name.
    if (typeof ref === 'string' && /^\d+$/.test(ref.trim()) && (!header || !lower.includes(ref.trim()))) ref = Number(ref.trim());
    if (typeof ref === 'number') {
      if (!Number.isInteger(ref) || ref < 0 || ref >= columns.length) {
        throw new SnapshotFormatError(file, `${what} is mapped to column ${ref}, but the rows have columns 0 to ${columns.length - 1}`, { ...place, column: String(ref) });
      }
      return ref;
    }
    if (!header) {
      throw new SnapshotFormatError(
        file,
        `the first data line holds numbers, not column names: add a header row naming the columns (x,y,z and optionally m), or choose columns by number (0,1,2)`,
        { row: headerRow },
      );
    }
    const key = ref.toLowerCase();
    const at = lower.indexOf(key);
    if (at < 0) {
      const shown = columns.length > 20 ? `${columns.slice(0, 20).join(', ')}, … (${columns.length} in all)` : columns.join(', ');
      throw new SnapshotFormatError(file, `the header names no column "${ref}" (needed for ${what}); it has: ${shown}`, { ...place, column: ref });
    }
    const again = lower.indexOf(key, at + 1);
    if (again >= 0) throw new SnapshotFormatError(file, `column "${ref}" appears twice in the header (columns ${at} and ${again}), so ${what} is ambiguous`, { ...place, column: ref });
    return at;
  };
  const wanted: [number, number][] = [];
  const pos = textVector(file, mapping.positions ?? ['x', 'y', 'z'], 'positions');
  pos.forEach((ref, d) => wanted.push([find(ref, SLOT_NAMES[d]), d]));
  let massColumn: string | null = null;
  if (mapping.mass !== null) {
    let ref: ColumnRef | undefined = mapping.mass;
    if (ref === undefined && header) {
      const hasM = lower.includes('m');
      const hasMass = lower.includes('mass');
      if (hasM && hasMass) throw new SnapshotFormatError(file, 'the header has both an "m" and a "mass" column; keep one', { ...place, column: 'mass' });
      ref = hasM ? 'm' : hasMass ? 'mass' : undefined;
    }
    if (ref !== undefined) {
      const k = find(ref, 'mass');
      wanted.push([k, 3]);
      massColumn = columns[k];
    }
  }
  if (mapping.accelerations !== undefined) textVector(file, mapping.accelerations, 'accelerations').forEach((ref, d) => wanted.push([find(ref, SLOT_NAMES[4 + d]), 4 + d]));
  if (mapping.ids !== undefined) wanted.push([find(mapping.ids, 'id'), 7]);
  if (mapping.softening !== undefined) wanted.push([find(mapping.softening, 'softening'), 8]);
  const last = Math.max(...wanted.map(([k]) => k));
  const slotOf = new Int32Array(last + 1).fill(-1);
  for (const [k, slot] of wanted) {
    if (slotOf[k] >= 0) {
      throw new SnapshotFormatError(file, `column ${k} is mapped to both ${SLOT_NAMES[slotOf[k]]} and ${SLOT_NAMES[slot]}`, { ...place, column: columns[k] });
    }
    slotOf[k] = slot;
  }
  return { slotOf, massColumn, hasAcc: mapping.accelerations !== undefined, hasIds: mapping.ids !== undefined, hasSoftening: mapping.softening !== undefined };
}
