/**
 * Checks a loaded snapshot is fit for a periodic force calculation: masses > 0, softening lengths
 * ≥ 0 and finite, no two particles at one position without softening (after wrapping), and how many
 * particles lie outside the box (they are wrapped; the caller tells the user how many).
 */
import { type Box, positionsWrap } from '../box';
import { cellListBuild } from '../ewald/cellList';
import { cellListFindCoincident } from '../ewald/ewald';
import { type Snapshot, SnapshotFormatError, type SnapshotPlace } from './snapshot';

/** Where particle p of a snapshot sits in its file, for the quantity `what`. */
export function snapshotPlace(s: Snapshot, p: number, what: 'positions' | 'masses' | 'softening' = 'positions'): SnapshotPlace {
  if (s.lines) {
    const column = what === 'masses' ? (s.massColumn ?? undefined) : what === 'softening' ? s.sources?.softening?.replace(/^column "(.*)"$/, '$1') : undefined;
    return { row: s.lines[p], particle: p, ...(column !== undefined ? { column } : {}) };
  }
  const array = s.sources?.[what];
  return { ...(array ? { array } : {}), particle: p * (s.every ?? 1) };
}

/** Result of snapshotValidate. */
export interface SnapshotValidation {
  /** Particles outside the home cell [0,Lx)×[0,Ly)×[0,Lz) (wrapped by the force calculation). */
  readonly outside: number;
  /** The first of them (snapshot index), or −1. */
  readonly firstOutside: number;
}

/** Options of snapshotValidate. */
export interface SnapshotValidateOptions {
  /** Whether a softening will be used (then coincident particles are allowed). */
  readonly softened: boolean;
  /** Look for coincident particles when not softened (O(N log N)); default true. */
  readonly coincident?: boolean;
}

/**
 * Checks masses (> 0), per-particle softening (finite, ≥ 0), coincident positions without softening,
 * and counts particles outside `box` (length units). Throws SnapshotFormatError naming file and place.
 */
export function snapshotValidate(s: Snapshot, fileName: string, box: Box, options: SnapshotValidateOptions): SnapshotValidation {
  const m = s.masses;
  for (let p = 0; p < m.length; p++) {
    if (!(m[p] > 0)) {
      const why = m[p] === 0 ? 'mass 0: massless particles feel forces but exert none; remove them, or give them a mass' : `mass ${m[p]} is negative`;
      throw new SnapshotFormatError(fileName, why, snapshotPlace(s, p, 'masses'));
    }
  }
  if (s.softening) {
    const e = s.softening;
    for (let p = 0; p < e.length; p++) {
      if (!(e[p] >= 0) || !Number.isFinite(e[p])) throw new SnapshotFormatError(fileName, `softening length ${e[p]} must be a finite number ≥ 0`, snapshotPlace(s, p, 'softening'));
    }
  }
  const checkCoincident = !options.softened && options.coincident !== false && s.count > 1;
  // Particles outside [0, L) on some axis: those positionsWrap moves (counted without a copy when no
  // wrapped copy is needed for the coincidence search).
  const sides = [box.lx, box.ly, box.lz];
  const xyz = s.positions;
  let outside = 0;
  let firstOutside = -1;
  for (let i = 0; i < xyz.length; i += 3) {
    if (xyz[i] < 0 || xyz[i] >= sides[0] || xyz[i + 1] < 0 || xyz[i + 1] >= sides[1] || xyz[i + 2] < 0 || xyz[i + 2] >= sides[2]) {
      if (outside === 0) firstOutside = i / 3;
      outside++;
    }
  }
  if (checkCoincident) {
    const wrapped = s.positions.slice();
    positionsWrap(wrapped, box);
    const g = Math.max(1, Math.min(256, Math.round(Math.cbrt(s.count / 4))));
    const cells = cellListBuild(wrapped, s.masses, box, [g, g, g], Math.min(box.lx, box.ly, box.lz) / g);
    const pair = cellListFindCoincident(cells);
    if (pair) {
      const [a, b] = pair.map((p) => snapshotPlace(s, p));
      const where = (q: SnapshotPlace) => (q.row !== undefined ? `line ${q.row} (particle ${q.particle})` : `particle ${q.particle}`);
      throw new SnapshotFormatError(
        fileName,
        `${where(a)} and ${where(b)} sit at the same position${outside > 0 ? ' (after wrapping into the box)' : ''}; without softening their force is infinite: remove one, or use a softening`,
        a.array ? { array: a.array } : {},
      );
    }
  }
  return { outside, firstOutside };
}
