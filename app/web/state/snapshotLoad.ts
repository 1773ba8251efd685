/** Snapshots for the store: the built-in demo, and a parsed file with a guessed or given box. */
import { type Box, boxMake } from '../../../engine/box';
import { demoSnapshot } from '../../../engine/demo/demoSnapshot';
import type { LoadPayload } from '../worker/loadProtocol';
import type { Snapshot } from './types';

function sum(a: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s;
}

/** Particles outside [0,Lx)×[0,Ly)×[0,Lz). */
export function countOutside(positions: Float64Array, box: Box): number {
  const L = [box.lx, box.ly, box.lz];
  let c = 0;
  for (let i = 0; i < positions.length; i += 3) {
    for (let d = 0; d < 3; d++) {
      const x = positions[i + d];
      if (x < 0 || x >= L[d]) {
        c++;
        break;
      }
    }
  }
  return c;
}

let demoMemo: Snapshot | null = null;

/**
 * Larger demos are made in the worker (demoSnapshotFrom), not on the page's thread. 10⁵ take ~80 ms on
 * an idle machine; lowering this to 2¹⁵ made tests/e2e/cancel.mjs see a second live compute worker
 * (not yet understood), so it stays at 10⁵ for now.
 */
export const DEMO_ON_PAGE_MAX = 100_000;

/** The built-in demo snapshot “three knots and a thread” (unit box, equal masses summing to 1; memoised). */
export function demoSnapshotLoad(n: number, seed: number): Snapshot {
  if (demoMemo && demoMemo.n === n && demoMemo.seed === seed) return demoMemo;
  const d = demoSnapshot(n, seed);
  return demoSnapshotFrom(n, seed, d.positions, d.masses);
}

/** The demo snapshot from arrays made elsewhere (the worker), remembered like demoSnapshotLoad's. */
export function demoSnapshotFrom(n: number, seed: number, positions: Float64Array, masses: Float64Array): Snapshot {
  const d = { positions, masses, box: 1 };
  demoMemo = {
    id: `demo:${n}:${seed}`,
    kind: 'demo',
    source: 'built-in demo “three knots and a thread”',
    fileName: null,
    seed,
    n,
    positions: d.positions,
    masses: d.masses,
    box: boxMake(d.box),
    boxGuessed: false,
    totalMass: sum(d.masses),
    accelerations: null,
    accelerationColumns: null,
    ids: null,
    columns: ['x', 'y', 'z'],
    outside: 0,
  };
  return demoMemo;
}

/** Smallest of 1, 2, 2.5, 5 × 10^k that is greater than x (x > 0). */
export function niceCeiling(x: number): number {
  const e = Math.floor(Math.log10(x));
  for (const e2 of [e, e + 1]) {
    for (const m of [1, 2, 2.5, 5]) {
      const v = Number((m * 10 ** e2).toPrecision(12));
      if (v > x) return v;
    }
  }
  return 10 ** (e + 2);
}

/** A box guessed from the coordinates: a nice side above the largest, per axis when extents differ. */
export function boxGuess(positions: Float64Array): { text: string; box: Box } {
  const max = [0, 0, 0];
  for (let i = 0; i < positions.length; i += 3) for (let d = 0; d < 3; d++) max[d] = Math.max(max[d], Math.abs(positions[i + d]));
  const sides = max.map((m) => niceCeiling(m > 0 ? m : 1));
  const hi = Math.max(...sides);
  if (sides.every((s) => s === hi) || sides.every((s) => s >= hi / 1.5)) return { text: String(hi), box: boxMake(hi) };
  return { text: sides.join(','), box: boxMake(sides[0], sides[1], sides[2]) };
}

/** A 32-bit FNV-1a hash of some of the bytes of the positions (identifies a file's content cheaply). */
export function contentHash(a: Float64Array): string {
  const bytes = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  let h = 0x811c9dc5;
  const step = Math.max(1, Math.floor(bytes.length / 65536));
  for (let i = 0; i < bytes.length; i += step) {
    h ^= bytes[i];
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, '0');
}

/** What a loaded file's masses were, in words ("masses from “m”", "unit masses"). */
function massWords(r: LoadPayload): string {
  const from = r.sources.masses ?? (r.massColumn ? `“${r.massColumn}”` : null);
  return from ? `masses from ${from}` : 'unit masses';
}

/**
 * A snapshot from a file loaded in the worker, in the box the worker settled on (from the file, typed,
 * or guessed), unless `box` overrides it (a shared link's box). `units` names the unit system, if any.
 */
export function fileSnapshotMake(fileName: string, r: LoadPayload, box: Box | null = null, units: string | null = null): { snapshot: Snapshot; boxText: string | null } {
  const b = box ?? r.box;
  const guessed = box === null && r.boxFrom === 'guessed';
  const sub = r.every > 1 ? `, 1 in ${r.every} of ${r.total} particles` : '';
  return {
    snapshot: {
      id: `file:${fileName}:${r.count}:${contentHash(r.positions)}|box=${b.lx},${b.ly},${b.lz}`,
      kind: 'file',
      source: `${fileName} (${r.format}, ${massWords(r)}${sub}${units ? `; ${units}` : ''})`,
      fileName,
      seed: null,
      n: r.count,
      positions: r.positions,
      masses: r.masses,
      box: b,
      boxGuessed: guessed,
      totalMass: sum(r.masses),
      accelerations: r.accelerations,
      accelerationColumns: r.accelerationColumns,
      ids: r.ids,
      columns: r.columns,
      outside: box === null ? r.outside : countOutside(r.positions, b),
    },
    boxText: box === null ? r.boxText : null,
  };
}

/** The same snapshot in another box (the user corrected the side). */
export function snapshotWithBox(s: Snapshot, box: Box): Snapshot {
  return { ...s, box, boxGuessed: false, outside: countOutside(s.positions, box), id: `${s.id.split('|box=')[0]}|box=${box.lx},${box.ly},${box.lz}` };
}
