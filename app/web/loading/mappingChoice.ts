/**
 * The mapping step's logic (no React): what a described file offers for each quantity, the form's
 * state (MappingDraft, all text) to and from a LoadChoice (engine ColumnMapping plus box, units,
 * subsampling), whether a mapping fits a file, and whether a file loads without asking.
 */
import type { ArrayInfo, SnapshotDescription } from '../../../engine/formats/description';
import type { ColumnMapping, FieldRef, VectorRef } from '../../../engine/formats/snapshot';
import { UNIT_PRESETS, unitPresetFind } from '../../../engine/units';
import { boxParse } from '../state/settings';

/** What the user settled on for one file: which arrays hold what, the box, units and subsampling. */
export interface LoadChoice {
  readonly mapping: ColumnMapping;
  /** A typed box ("L" or "Lx,Ly,Lz"), used when the mapping names no box entry; null: guess it. */
  readonly boxText: string | null;
  /** Unit preset name (engine/units.ts) or 'custom'. */
  readonly units: string;
  /** G as text (the preset's value, or typed). */
  readonly G: string;
  /** Keep every K-th particle. */
  readonly every: number;
}

/** The form of the mapping step, as typed: references are encoded with refEncode; '' means none. */
export interface MappingDraft {
  readonly positionsMode: 'one' | 'three';
  readonly positions: string;
  readonly px: string;
  readonly py: string;
  readonly pz: string;
  readonly mass: string;
  readonly massDefault: string;
  readonly accMode: 'none' | 'one' | 'three';
  readonly acc: string;
  readonly ax: string;
  readonly ay: string;
  readonly az: string;
  readonly ids: string;
  readonly softening: string;
  readonly boxMode: 'file' | 'typed' | 'guess';
  readonly boxRef: string;
  readonly boxText: string;
  readonly units: string;
  readonly G: string;
  readonly every: string;
}

/** One choice in a select: the encoded reference, the reference, words. */
export interface RefOption {
  readonly value: string;
  readonly ref: FieldRef;
  readonly label: string;
}

/** Select value of a reference: JSON, so that column 0 and an array named "0" differ. */
export function refEncode(ref: FieldRef): string {
  return JSON.stringify(ref);
}

/** The reference of a select value (inverse of refEncode). */
export function refDecode(value: string): FieldRef {
  const v: unknown = JSON.parse(value);
  if (typeof v !== 'string' && typeof v !== 'number') throw new RangeError(`not a column, array or dataset reference: ${value}`);
  return v;
}

/** "(1000, 3)", "(1000,)". */
export function shapeText(shape: readonly number[]): string {
  return `(${shape.join(', ')}${shape.length === 1 ? ',' : ''})`;
}

/** Most columns of one 2-D array offered one by one. */
export const COLUMNS_OFFERED = 16;

function columnsOf(a: ArrayInfo): number {
  return a.shape.length === 2 ? a.shape[1] : 1;
}

/** Per-particle numbers the file offers (text columns, .npy columns, 1-D arrays and columns of 2-D ones). */
export function fieldOptions(d: SnapshotDescription): RefOption[] {
  if (d.format === 'npy') {
    const a = d.arrays[0];
    if (!a || !a.usable || a.shape.length !== 2) return [];
    return Array.from({ length: Math.min(COLUMNS_OFFERED, a.shape[1]) }, (_, j) => ({ value: refEncode(j), ref: j, label: `column ${j} of ${shapeText(a.shape)} ${a.dtype}` }));
  }
  if (d.format === 'text') {
    const header = d.text?.header ?? false;
    return d.arrays.map((a, j) => {
      const ref: FieldRef = header ? a.name : j;
      return { value: refEncode(ref), ref, label: header ? `column “${a.name}”` : `column ${j}` };
    });
  }
  const out: RefOption[] = [];
  for (const a of d.arrays) {
    if (!a.usable) continue;
    if (a.shape.length === 1) out.push({ value: refEncode(a.name), ref: a.name, label: `${a.name} ${shapeText(a.shape)} ${a.dtype}` });
    else if (a.shape.length === 2) {
      for (let j = 0; j < Math.min(COLUMNS_OFFERED, columnsOf(a)); j++) {
        const ref = `${a.name}[${j}]`;
        out.push({ value: refEncode(ref), ref, label: `${ref} of ${shapeText(a.shape)} ${a.dtype}` });
      }
    }
  }
  return out;
}

/** Arrays of shape (N, 3) that can hold a whole vector (named formats only). */
export function vectorOptions(d: SnapshotDescription): RefOption[] {
  if (d.format === 'npy' || d.format === 'text') return [];
  return d.arrays
    .filter((a) => a.usable && a.shape.length === 2 && a.shape[1] === 3)
    .map((a) => ({ value: refEncode(a.name), ref: a.name, label: `${a.name} ${shapeText(a.shape)} ${a.dtype}` }));
}

function valueText(v: number | readonly number[]): string {
  return typeof v === 'number' ? String(v) : v.join(', ');
}

function positiveSides(v: unknown): v is number | readonly number[] {
  if (typeof v === 'number') return v > 0 && Number.isFinite(v);
  return Array.isArray(v) && (v.length === 1 || v.length === 3) && v.every((x) => typeof x === 'number' && x > 0 && Number.isFinite(x));
}

/** Entries of the file that can be a box (the proposal's first), each "ref = value". */
export function boxOptions(d: SnapshotDescription): { value: string; label: string }[] {
  const seen = new Set<string>();
  const out: { value: string; label: string }[] = [];
  const add = (ref: string, v: number | readonly number[]) => {
    if (seen.has(ref)) return;
    seen.add(ref);
    out.push({ value: ref, label: `${ref} = ${valueText(v)}` });
  };
  for (const b of d.proposal.candidates.box) add(b.ref, b.value);
  for (const a of d.attributes) if (positiveSides(a.value)) add(a.ref, a.value);
  for (const a of d.arrays) if (a.value !== undefined && positiveSides(a.value)) add(a.name, a.value);
  return out;
}

/** Unit choices: the presets and 'custom' (G typed). */
export function unitChoices(): { value: string; label: string }[] {
  return [...UNIT_PRESETS.map((p) => ({ value: p.name, label: p.G === 1 ? p.label : `${p.label} (G = ${p.G.toPrecision(6)})` })), { value: 'custom', label: 'my own units (type G)' }];
}

/** Units words for a snapshot's description ('kpc, km/s, M☉'), or null for G = 1 / custom. */
export function unitsWords(units: string): string | null {
  const p = unitPresetFind(units);
  return p && p.name !== 'G1' ? `units ${p.label}` : null;
}

/** The choice the file's proposal makes, with the page's current G. */
export function proposalChoice(d: SnapshotDescription, currentG: string): LoadChoice {
  const g = currentG.trim();
  const preset = UNIT_PRESETS.find((p) => Number(g) === p.G);
  return { mapping: d.proposal.mapping, boxText: null, units: preset ? preset.name : 'custom', G: preset ? String(preset.G) : g, every: 1 };
}

function vectorDraft(ref: VectorRef | undefined): { mode: 'none' | 'one' | 'three'; one: string; xyz: [string, string, string] } {
  if (ref === undefined) return { mode: 'none', one: '', xyz: ['', '', ''] };
  if (Array.isArray(ref)) return { mode: 'three', one: '', xyz: ref.map(refEncode) as [string, string, string] };
  return { mode: 'one', one: refEncode(ref as FieldRef), xyz: ['', '', ''] };
}

/** The form for a choice. */
export function draftFromChoice(d: SnapshotDescription, c: LoadChoice): MappingDraft {
  const m = c.mapping;
  const pos = vectorDraft(m.positions);
  const acc = vectorDraft(m.accelerations);
  return {
    positionsMode: pos.mode === 'one' && vectorOptions(d).length > 0 ? 'one' : 'three',
    positions: pos.one,
    px: pos.xyz[0],
    py: pos.xyz[1],
    pz: pos.xyz[2],
    mass: m.mass === undefined || m.mass === null ? '' : refEncode(m.mass),
    massDefault: String(m.massDefault ?? 1),
    accMode: acc.mode,
    acc: acc.one,
    ax: acc.xyz[0],
    ay: acc.xyz[1],
    az: acc.xyz[2],
    ids: m.ids === undefined ? '' : refEncode(m.ids),
    softening: m.softening === undefined ? '' : refEncode(m.softening),
    boxMode: m.box !== undefined ? 'file' : c.boxText !== null ? 'typed' : 'guess',
    boxRef: m.box ?? boxOptions(d)[0]?.value ?? '',
    boxText: c.boxText ?? '',
    units: c.units,
    G: c.G,
    every: String(c.every),
  };
}

function positive(text: string, field: string): number {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!(v > 0 && Number.isFinite(v))) throw new RangeError(`${field}: expected a positive number, got "${text}"`);
  return v;
}

function vectorOf(mode: 'one' | 'three', one: string, xyz: readonly string[], field: string): VectorRef {
  if (mode === 'one') {
    if (!one) throw new RangeError(`${field}: choose an array of shape (N, 3), or three separate x, y, z`);
    return refDecode(one);
  }
  if (xyz.some((v) => !v)) throw new RangeError(`${field}: choose all three of x, y and z`);
  const refs = xyz.map(refDecode);
  if (new Set(xyz).size < 3) throw new RangeError(`${field}: x, y and z must be three different columns or arrays`);
  return refs as unknown as VectorRef;
}

/** The choice a form makes; throws a RangeError whose one-line message names the field. */
export function choiceFromDraft(f: MappingDraft): LoadChoice {
  const positions = vectorOf(f.positionsMode, f.positions, [f.px, f.py, f.pz], 'positions');
  const mapping: { -readonly [K in keyof ColumnMapping]: ColumnMapping[K] } = { positions };
  if (f.mass) mapping.mass = refDecode(f.mass);
  else {
    mapping.mass = null;
    mapping.massDefault = positive(f.massDefault, 'mass of every particle');
  }
  if (f.accMode !== 'none') mapping.accelerations = vectorOf(f.accMode, f.acc, [f.ax, f.ay, f.az], 'accelerations');
  if (f.ids) mapping.ids = refDecode(f.ids);
  if (f.softening) mapping.softening = refDecode(f.softening);
  let boxText: string | null = null;
  if (f.boxMode === 'file') {
    if (!f.boxRef) throw new RangeError('box: this file has no entry to take the box from; type it or let it be guessed');
    mapping.box = f.boxRef;
  } else if (f.boxMode === 'typed') {
    boxParse(f.boxText);
    boxText = f.boxText.trim();
  }
  let G: string;
  if (f.units === 'custom') G = String(positive(f.G, 'G'));
  else {
    const p = unitPresetFind(f.units);
    if (!p) throw new RangeError(`units: unknown preset "${f.units}"`);
    G = String(p.G);
  }
  const every = Number(f.every.trim());
  if (!Number.isSafeInteger(every) || every < 1) throw new RangeError(`keep every: expected a whole number of at least 1, got "${f.every}"`);
  return { mapping, boxText, units: f.units, G, every };
}

/** Whether one reference names something the file has. */
export function refFits(d: SnapshotDescription, ref: FieldRef): boolean {
  if (typeof ref === 'number') {
    if (!Number.isInteger(ref) || ref < 0) return false;
    if (d.format === 'npy') return d.arrays[0] !== undefined && d.arrays[0].shape.length === 2 && ref < d.arrays[0].shape[1];
    return d.format === 'text' && ref < d.arrays.length;
  }
  const m = /^(.*)\[(\d+)\]$/.exec(ref);
  const base = m ? m[1] : ref;
  if (d.format === 'text') return !m && d.arrays.some((a) => a.name.toLowerCase() === ref.toLowerCase());
  const a = d.arrays.find((x) => x.name === base);
  if (!a || !a.usable) return false;
  return m ? a.shape.length === 2 && Number(m[2]) < a.shape[1] : a.shape.length >= 1;
}

/** Whether every reference of a mapping names something the file has (box entries included). */
export function mappingFits(d: SnapshotDescription, m: ColumnMapping): boolean {
  const vec = (v: VectorRef | undefined) => v === undefined || (Array.isArray(v) ? v.every((r) => refFits(d, r)) : refFits(d, v as FieldRef));
  if (m.positions === undefined || !vec(m.positions) || !vec(m.accelerations)) return false;
  for (const r of [m.mass, m.ids, m.softening]) if (r !== undefined && r !== null && !refFits(d, r)) return false;
  if (m.box !== undefined && !d.attributes.some((a) => a.ref === m.box) && !d.arrays.some((a) => a.name === m.box)) return false;
  return true;
}

/** How a file is loaded: at once (remembered layout, or text whose header names the positions), or by asking. */
export type LoadDecision =
  | { readonly kind: 'direct'; readonly choice: LoadChoice; readonly how: 'remembered' | 'header' }
  | { readonly kind: 'ask'; readonly choice: LoadChoice };

/**
 * At once when a mapping confirmed for this structure fits the file, or when the file is text with a
 * header naming the positions; otherwise the mapping step opens on the proposal (or the remembered one).
 */
export function loadDecide(d: SnapshotDescription, remembered: LoadChoice | null, currentG: string): LoadDecision {
  if (remembered && mappingFits(d, remembered.mapping)) return { kind: 'direct', choice: remembered, how: 'remembered' };
  const proposal = proposalChoice(d, currentG);
  if (d.format === 'text' && d.text?.header && d.proposal.complete) return { kind: 'direct', choice: proposal, how: 'header' };
  return { kind: 'ask', choice: proposal };
}

function refWords(r: FieldRef): string {
  return typeof r === 'number' ? `column ${r}` : r;
}

function vectorWords(v: VectorRef): string {
  return Array.isArray(v) ? v.map(refWords).join(', ') : `${refWords(v as FieldRef)} (N×3)`;
}

/** The choice in a few words per quantity, for the "loaded with" line. */
export function choiceWords(c: LoadChoice): string[] {
  const m = c.mapping;
  const out = [`positions ${m.positions !== undefined ? vectorWords(m.positions) : 'x, y, z'}`];
  out.push(m.mass === null || m.mass === undefined ? `masses ${m.massDefault ?? 1} each` : `masses ${refWords(m.mass)}`);
  if (m.accelerations !== undefined) out.push(`accelerations ${vectorWords(m.accelerations)}`);
  if (m.ids !== undefined) out.push(`ids ${refWords(m.ids)}`);
  if (m.softening !== undefined) out.push(`softening ${refWords(m.softening)}`);
  out.push(m.box !== undefined ? `box from ${m.box}` : c.boxText !== null ? `box ${c.boxText} (typed)` : 'box guessed');
  const p = unitPresetFind(c.units);
  out.push(p ? `${p.label}` : `G = ${c.G}`);
  if (c.every > 1) out.push(`1 particle in ${c.every} kept`);
  return out;
}
