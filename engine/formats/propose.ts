/**
 * Proposing a mapping from what a file offers: shapes, types and names only, no assumption about any
 * particular code's layout. Positions: an N×3 float array, or three N-long arrays whose names differ
 * only in one letter x/y/z ("x","y","z"; "pos_x","pos_y","pos_z") — named like positions if possible,
 * never like velocities or accelerations. The rest must have the same N: masses (m, mass…),
 * accelerations (N×3 or a/acc/grav/force triples), ids (id, pid… integers first), softening (soft, eps…),
 * and a box (a box/side/size entry with one or three positive numbers).
 */
import type { ArrayStore } from './arrayStore';
import type { ArrayInfo, AttributeInfo, MappingProposal, TextLayout } from './description';
import type { FieldRef, VectorRef } from './snapshot';

type Role = 'position' | 'acceleration' | 'velocity' | 'other';

/** Role suggested by a name stem (lower case, punctuation removed). */
function stemRole(stem: string): Role {
  if (/acc|grav|force|^a$|^g$|^f$/.test(stem)) return 'acceleration';
  if (/vel|mom|^v$|speed/.test(stem)) return 'velocity';
  if (stem === '' || /pos|coord|^r$|xyz|loc|^p$/.test(stem)) return 'position';
  return 'other';
}

/** Leaf of a path, lower case, without a .npy ending. */
function leafOf(name: string): string {
  return name.slice(name.lastIndexOf('/') + 1).toLowerCase().replace(/\.npy$/, '');
}

/** Group part of a path ("/bodies/" of "/bodies/x"). */
function groupOf(name: string): string {
  return name.slice(0, name.lastIndexOf('/') + 1);
}

/** Stem: letters and digits only. */
function stemOf(text: string): string {
  return text.replace(/[^a-z0-9]/g, '');
}

interface Cand {
  readonly ref: string;
  readonly info: ArrayInfo;
  readonly rows: number | null;
  readonly cols: number;
}

interface Scored<T> {
  readonly ref: T;
  readonly score: number;
  readonly rows: number | null;
}

/** Triples of 1-D arrays named alike but for one x/y/z letter, in the same group. */
function triples(cands: readonly Cand[]): { refs: [string, string, string]; stem: string; rows: number | null; float: boolean }[] {
  const byKey = new Map<string, Map<string, Cand>>();
  for (const c of cands) {
    if (c.cols !== 1) continue;
    const leaf = leafOf(c.ref);
    for (let i = 0; i < leaf.length; i++) {
      const ch = leaf[i];
      if (ch !== 'x' && ch !== 'y' && ch !== 'z') continue;
      const key = `${groupOf(c.ref)}\u0000${leaf.slice(0, i)}*${leaf.slice(i + 1)}`;
      const m = byKey.get(key) ?? new Map<string, Cand>();
      if (!m.has(ch)) m.set(ch, c);
      byKey.set(key, m);
    }
  }
  const out: { refs: [string, string, string]; stem: string; rows: number | null; float: boolean }[] = [];
  for (const [key, m] of byKey) {
    const x = m.get('x'), y = m.get('y'), z = m.get('z');
    if (!x || !y || !z || x.rows !== y.rows || y.rows !== z.rows) continue;
    out.push({ refs: [x.ref, y.ref, z.ref], stem: stemOf(key.split('\u0000')[1].replace('*', '')), rows: x.rows, float: [x, y, z].every((c) => c.info.kind === 'float') });
  }
  return out;
}

/** Best first, then by reference text for a stable order. */
function ranked<T>(list: Scored<T>[]): Scored<T>[] {
  return list.filter((s) => s.score > 0).sort((a, b) => b.score - a.score || String(a.ref).localeCompare(String(b.ref)));
}

/** A proposal from named columns or arrays (text header, .npz, HDF5). */
function namedProposal(cands: readonly Cand[], boxes: { ref: string; value: number | readonly number[]; name: string }[], notes: string[]): MappingProposal {
  const usable = cands.filter((c) => c.info.usable);
  const posList: Scored<VectorRef>[] = [];
  const accList: Scored<VectorRef>[] = [];
  for (const c of usable) {
    if (c.cols !== 3 || c.info.shape.length !== 2) continue;
    const role = stemRole(stemOf(leafOf(c.ref)));
    const floatBonus = c.info.kind === 'float' ? 0 : -3;
    if (role === 'position') posList.push({ ref: c.ref, score: 10 + floatBonus, rows: c.rows });
    else if (role === 'other') posList.push({ ref: c.ref, score: 5 + floatBonus, rows: c.rows });
    else if (role === 'acceleration') accList.push({ ref: c.ref, score: 10 + floatBonus, rows: c.rows });
  }
  for (const t of triples(usable)) {
    const role = stemRole(t.stem);
    const floatBonus = t.float ? 0 : -3;
    if (role === 'position') posList.push({ ref: t.refs, score: 9 + floatBonus, rows: t.rows });
    else if (role === 'other') posList.push({ ref: t.refs, score: 4 + floatBonus, rows: t.rows });
    else if (role === 'acceleration') accList.push({ ref: t.refs, score: 9 + floatBonus, rows: t.rows });
  }
  const positions = ranked(posList);
  const best = positions[0];
  const n = best ? best.rows : null;
  const sameN = (c: { rows: number | null }) => best !== undefined && c.rows === n;
  // Per-particle numbers of the positions' length; `loose` also admits strongly named arrays of another
  // length (ranked below), so that a mass array of the wrong length is reported, not silently skipped.
  const scalar = (score: (leaf: string, c: Cand) => number, loose = false): Scored<FieldRef>[] =>
    ranked(
      usable
        .filter((c) => c.cols === 1 && best !== undefined && (sameN(c) || loose))
        .map((c) => ({ ref: c.info.shape.length === 2 ? `${c.ref}[0]` : c.ref, score: score(leafOf(c.ref), c) - (sameN(c) ? 0 : 9), rows: c.rows })),
    );
  const mass = scalar((l) => (/^(m|mass|masses)$/.test(l) ? 10 : l.includes('mass') ? 8 : 0), true);
  const ids = scalar((l, c) => {
    const s = /^(id|ids|pid|pids|particleids?|particle_ids?|index|idx|iord)$/.test(l) ? 10 : /(^|[^a-z])id(s)?([^a-z]|$)/.test(l) ? 6 : 0;
    return s > 0 && c.info.kind !== 'float' ? s + 2 : s;
  });
  const softening = scalar((l) => (l.includes('soft') ? 10 : /^(eps|epsilon)/.test(l) ? 8 : 0));
  const accelerations = ranked(accList.filter(sameN));
  const box = boxes
    .map((b) => ({ b, score: /box/.test(b.name) ? 10 : /^(l|side|sides|size|length|lbox)$/.test(b.name) ? 6 : 0 }))
    .filter((s) => s.score > 0)
    .sort((a, b) => b.score - a.score)
    .map((s) => ({ ref: s.b.ref, value: s.b.value }));
  if (!best) notes.push('no N×3 array and no x, y, z arrays: choose the positions');
  else if (positions.length > 1) notes.push(`positions: ${positions.length} candidates, took the best-named`);
  if (best && mass.length === 0) notes.push('no mass column or array: every particle gets mass 1 unless you choose one');
  return {
    mapping: {
      ...(best ? { positions: best.ref } : {}),
      ...(mass[0] ? { mass: mass[0].ref } : {}),
      ...(accelerations[0] ? { accelerations: accelerations[0].ref } : {}),
      ...(ids[0] ? { ids: ids[0].ref } : {}),
      ...(softening[0] ? { softening: softening[0].ref } : {}),
      ...(box[0] ? { box: box[0].ref } : {}),
    },
    candidates: {
      positions: positions.map((s) => s.ref),
      mass: mass.map((s) => s.ref),
      accelerations: accelerations.map((s) => s.ref),
      ids: ids.map((s) => s.ref),
      softening: softening.map((s) => s.ref),
      box,
    },
    count: n,
    complete: best !== undefined,
    notes,
  };
}

/** Small numeric entries that could be a box: attributes and arrays of 1 or 3 positive numbers. */
function boxCandidates(arrays: readonly ArrayInfo[], attributes: readonly AttributeInfo[]): { ref: string; value: number | readonly number[]; name: string }[] {
  const out: { ref: string; value: number | readonly number[]; name: string }[] = [];
  for (const a of attributes) {
    const v = a.value;
    const ok = typeof v === 'number' ? v > 0 : Array.isArray(v) && (v.length === 1 || v.length === 3) && v.every((x) => typeof x === 'number' && x > 0);
    if (ok) out.push({ ref: a.ref, value: v as number | readonly number[], name: a.name.toLowerCase() });
  }
  for (const a of arrays) {
    const elements = a.shape.reduce((p, d) => p * d, 1);
    if ((a.kind === 'float' || a.kind === 'int' || a.kind === 'uint') && a.shape.length <= 1 && (elements === 1 || elements === 3) && a.value !== undefined) {
      out.push({ ref: a.name, value: a.value, name: leafOf(a.name) });
    }
  }
  return out;
}

/** Proposal for a binary store (.npy: columns by number; .npz and HDF5: by name). */
export function storeProposal(store: ArrayStore): MappingProposal {
  if (store.columnsOf) {
    const info = store.columnsOf.info;
    const shape = info.shape;
    const n = shape[0] ?? null;
    const k = shape.length === 2 ? shape[1] : 1;
    const empty = { positions: [], mass: [], accelerations: [], ids: [], softening: [], box: [] };
    if (!info.usable || shape.length !== 2 || k < 3) {
      const why = !info.usable ? `the array ${info.note}` : `the array has shape (${shape.join(', ')}${shape.length === 1 ? ',' : ''}); positions need (N, 3) or more columns`;
      return { mapping: {}, candidates: empty, count: n, complete: false, notes: [why] };
    }
    const positions: VectorRef = [0, 1, 2];
    if (k === 3) return { mapping: { positions }, candidates: { ...empty, positions: [positions] }, count: n, complete: true, notes: ['shape (N, 3): columns 0, 1, 2 are x, y, z; every particle gets mass 1'] };
    if (k === 4) {
      return {
        mapping: { positions, mass: 3 },
        candidates: { ...empty, positions: [positions], mass: [3] },
        count: n,
        complete: true,
        notes: ['shape (N, 4): columns 0, 1, 2 are x, y, z and column 3 the mass'],
      };
    }
    return {
      mapping: { positions },
      candidates: { ...empty, positions: [positions], mass: Array.from({ length: k - 3 }, (_, i) => i + 3) },
      count: n,
      complete: false,
      notes: [`shape (N, ${k}): guessed columns 0, 1, 2 as x, y, z; confirm, and choose the mass and other columns by number`],
    };
  }
  const infos = store.arrays.map((a) => a.info);
  const cands: Cand[] = infos.map((info) => ({
    ref: info.name,
    info,
    rows: info.shape.length >= 1 ? info.shape[0] : null,
    cols: info.shape.length === 2 ? info.shape[1] : info.shape.length === 1 ? 1 : 0,
  }));
  return namedProposal(cands, boxCandidates(infos, store.attributes), []);
}

/** Proposal for a text file from its column names (or, without names, their count). */
export function textProposal(text: TextLayout, rows: number | null): MappingProposal {
  if (!text.header) {
    const k = text.columns.length;
    const empty = { positions: [], mass: [], accelerations: [], ids: [], softening: [], box: [] };
    if (k < 3) return { mapping: {}, candidates: empty, count: rows, complete: false, notes: [`the rows have ${k} column${k === 1 ? '' : 's'}; positions need three`] };
    const positions: VectorRef = [0, 1, 2];
    return {
      mapping: { positions, ...(k === 4 ? { mass: 3 } : {}) },
      candidates: { ...empty, positions: [positions], mass: Array.from({ length: k - 3 }, (_, i) => i + 3) },
      count: rows,
      complete: false,
      notes: [`no header row: guessed columns 0, 1, 2 as x, y, z${k === 4 ? ' and 3 as the mass' : ''}; confirm or choose other columns`],
    };
  }
  const cands: Cand[] = text.columns.map((c) => ({
    ref: c,
    info: { name: c, label: `column ${JSON.stringify(c)}`, shape: [rows ?? 0], dtype: 'decimal text', kind: 'float', usable: true },
    rows,
    cols: 1,
  }));
  return namedProposal(cands, [], []);
}
