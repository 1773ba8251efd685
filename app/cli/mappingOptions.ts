/**
 * The mapping options of `torusgrav forces` (--positions, --masses, --accelerations, --ids,
 * --softening-column, --box @PATH) and the load options (--every, --max-size) turned into the
 * engine's ColumnMapping and LoadOptions; every mistake is a UsageError naming the option.
 */
import type { ColumnMapping, FieldRef, VectorRef } from '../../engine/formats/snapshot';
import { UsageError } from './cliErrors';

/** One reference: a 0-based column number (digits only) or a name / path. */
export function fieldRefParse(text: string, option: string, command: string): FieldRef {
  const t = text.trim();
  if (t === '') throw new UsageError(`--${option}: empty column, array or dataset name`, command);
  return /^\d+$/.test(t) ? Number(t) : t;
}

/** x,y,z (three references) or one name of an N×3 array / dataset. */
export function vectorRefParse(text: string, option: string, command: string): VectorRef {
  const parts = text.split(',');
  if (parts.length === 1) return fieldRefParse(parts[0], option, command);
  if (parts.length !== 3) {
    throw new UsageError(`--${option} takes three columns (x,y,z or 0,1,2) or one array/dataset name of shape (N,3), got ${parts.length} parts in ${JSON.stringify(text)}`, command);
  }
  return parts.map((p) => fieldRefParse(p, option, command)) as unknown as VectorRef;
}

/** The mapping from the parsed option values (absent options keep the format's defaults). */
export function mappingFromOptions(values: ReadonlyMap<string, string>, command: string): ColumnMapping {
  const get = (k: string) => values.get(k);
  const positions = get('positions');
  const masses = get('masses');
  const acc = get('accelerations');
  const ids = get('ids');
  const soft = get('softening-column');
  const box = get('box');
  return {
    ...(positions !== undefined ? { positions: vectorRefParse(positions, 'positions', command) } : {}),
    ...(masses !== undefined ? { mass: masses.trim().toLowerCase() === 'none' ? null : fieldRefParse(masses, 'masses', command) } : {}),
    ...(acc !== undefined ? { accelerations: vectorRefParse(acc, 'accelerations', command) } : {}),
    ...(ids !== undefined ? { ids: fieldRefParse(ids, 'ids', command) } : {}),
    ...(soft !== undefined ? { softening: fieldRefParse(soft, 'softening-column', command) } : {}),
    ...(box !== undefined && box.trim().startsWith('@') ? { box: boxRefParse(box, command) } : {}),
  };
}

/** --box @PATH: an HDF5 dataset path, "path#attribute", or an .npz array name. */
function boxRefParse(text: string, command: string): string {
  const ref = text.trim().slice(1).trim();
  if (ref === '') throw new UsageError('--box @PATH needs a dataset path (/header/box), an attribute (/header#BoxSize) or an .npz array name after the @', command);
  return ref;
}

const SIZE_UNITS: Record<string, number> = { '': 1, b: 1, kb: 1e3, mb: 1e6, gb: 1e9, tb: 1e12, kib: 2 ** 10, mib: 2 ** 20, gib: 2 ** 30, tib: 2 ** 40, k: 2 ** 10, m: 2 ** 20, g: 2 ** 30, t: 2 ** 40 };

/** --max-size SIZE: bytes, or a number with a unit (500MB, 2GiB, 4G = 4 GiB). */
export function sizeParse(text: string, option: string, command: string): number {
  const m = /^\s*(\d+(?:\.\d+)?)\s*([a-zA-Z]*)\s*$/.exec(text);
  const unit = m ? SIZE_UNITS[m[2].toLowerCase()] : undefined;
  if (!m || unit === undefined) throw new UsageError(`--${option} takes a size such as 800MB, 2GiB or 4G (GiB), got ${JSON.stringify(text)}`, command);
  const v = Number(m[1]) * unit;
  if (!(v >= 1)) throw new UsageError(`--${option} must be at least 1 byte, got ${JSON.stringify(text)}`, command);
  return v;
}
