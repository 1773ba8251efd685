/**
 * Which columns of a dropped text snapshot hold the user's accelerations and particle ids, guessed from
 * the header names (until the format readers propose mappings themselves). Only the first line is read.
 */
import { NUMBER_LIKE, headerName } from '../../../engine/formats/csvColumns';

/** Acceleration column triples we recognise, lower case, tried in this order. */
const ACC_TRIPLES: readonly (readonly [string, string, string])[] = [
  ['ax', 'ay', 'az'],
  ['acc_x', 'acc_y', 'acc_z'],
  ['accx', 'accy', 'accz'],
  ['a_x', 'a_y', 'a_z'],
  ['accel_x', 'accel_y', 'accel_z'],
  ['gx', 'gy', 'gz'],
];

const ID_NAMES = ['id', 'pid', 'particle_id', 'ids'];

/** Column names of the first meaningful line of comma-separated text, or null when it holds numbers only. */
export function csvHeaderPeek(bytes: Uint8Array): string[] | null {
  const head = new TextDecoder('utf-8').decode(bytes.subarray(0, Math.min(bytes.length, 1 << 16))).replace(/^\uFEFF/, '');
  for (const raw of head.split('\n')) {
    const line = raw.replace(/\r$/, '');
    const t = line.trim();
    if (t === '' || t.startsWith('#')) continue;
    const cells = line.split(',');
    if (cells.every((c) => NUMBER_LIKE.test(c.trim()))) return null;
    return cells.map(headerName);
  }
  return null;
}

export interface ColumnGuess {
  /** Header names (as written) of the three acceleration columns, or null. */
  readonly accelerations: [string, string, string] | null;
  readonly id: string | null;
}

/** Finds an acceleration triple and an id column among header names (case-insensitive). */
export function columnsGuess(columns: readonly string[]): ColumnGuess {
  const lower = columns.map((c) => c.toLowerCase());
  const once = (name: string) => lower.indexOf(name) >= 0 && lower.indexOf(name) === lower.lastIndexOf(name);
  let accelerations: [string, string, string] | null = null;
  for (const triple of ACC_TRIPLES) {
    if (triple.every(once)) {
      accelerations = triple.map((n) => columns[lower.indexOf(n)]) as [string, string, string];
      break;
    }
  }
  const idName = ID_NAMES.find(once);
  return { accelerations, id: idName ? columns[lower.indexOf(idName)] : null };
}
