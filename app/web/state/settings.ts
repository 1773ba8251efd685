/**
 * What the user asks for, as typed text (the form, the URL query, the browser's storage) and as checked
 * values. Every rejection is one line naming the field and the text it got.
 */
import { type Box, boxMake } from '../../../engine/box';
import { type MethodId, isMethodId, methodSpec, paramDefaults } from '../methods/registry';
import { REQUIRE_KEYS, type RequireKey } from '../../../engine/stats/checkSummary';
import { DEFAULT_VERDICT } from '../report/reportVerdict';

/** One comparison slot: a method and its typed parameters (every method's, so switching keeps them). */
export interface SlotDraft {
  readonly method: MethodId;
  readonly params: Readonly<Record<string, string>>;
}

export type ArrowMode = 'worst' | 'all' | 'none';
export type SlabAxis = 'none' | 'x' | 'y' | 'z';
export type ScatterAxis = 'nearest' | 'density';

/** How the 3D view and plots show the comparison. */
export interface ViewDraft {
  readonly arrows: ArrowMode;
  /** How many of the worst targets get arrows (mode "worst"). */
  readonly worstK: string;
  /** Arrow length ∝ log(1 + |r|/r_ref) instead of |r|. */
  readonly arrowLog: boolean;
  /** Arrow length scale (multiplies the automatic one). */
  readonly arrowScale: string;
  readonly slabAxis: SlabAxis;
  /** Slab centre and thickness as fractions of the box side along the axis. */
  readonly slabCenter: string;
  readonly slabThickness: string;
  /** Show the particles that are not targets (grey). */
  readonly context: boolean;
  /** Second scatter plot: against nearest-neighbour distance or local density. */
  readonly scatterX: ScatterAxis;
  /** The report's verdict: this figure of the relative error must not exceed the limit (text as typed: "1 %", "0.01"). */
  readonly verdictKey: RequireKey;
  readonly verdictLimit: string;
}

export interface Draft {
  /** Demo particles and seed (the seed also draws target samples). */
  readonly n: string;
  readonly seed: string;
  /** "auto", "all" or a number of targets drawn at random (seeded). */
  readonly targets: string;
  /** Gravitational constant used by computed methods. */
  readonly G: string;
  /** Box sides of a loaded file: "L" or "Lx,Ly,Lz" (the demo's box is 1). */
  readonly box: string;
  readonly a: SlotDraft;
  readonly b: SlotDraft;
  readonly view: ViewDraft;
}

export type TargetChoice = { readonly kind: 'auto' } | { readonly kind: 'all' } | { readonly kind: 'sample'; readonly count: number };

export interface Settings {
  readonly n: number;
  readonly seed: number;
  readonly targets: TargetChoice;
  readonly G: number;
}

export const N_MAX = 1 << 21;

/** Targets drawn when "auto" finds all particles too slow (PHYSICS.md: 10³–10⁴ is common practice). */
export const AUTO_SAMPLE = 10_000;

export const DEFAULT_VIEW: ViewDraft = {
  arrows: 'worst',
  worstK: '200',
  arrowLog: false,
  arrowScale: '1',
  slabAxis: 'none',
  slabCenter: '0.5',
  slabThickness: '0.2',
  context: true,
  scatterX: 'nearest',
  verdictKey: DEFAULT_VERDICT.key,
  verdictLimit: DEFAULT_VERDICT.limit,
};

export function defaultDraft(): Draft {
  const params = paramDefaults();
  return {
    n: '4096',
    seed: '1',
    targets: 'auto',
    G: '1',
    box: '1',
    a: { method: 'mesh', params },
    b: { method: 'ewald', params },
    view: DEFAULT_VIEW,
  };
}

export const DEFAULT_DRAFT: Draft = defaultDraft();

function wholeNumber(text: string): number | null {
  const t = text.trim();
  if (!/^[+-]?\d+$/.test(t)) return null;
  const v = Number(t);
  return Number.isSafeInteger(v) ? v : null;
}

/** Checks the run fields of a draft; throws a RangeError whose one-line message names the field. */
export function draftParse(draft: Draft): Settings {
  const n = wholeNumber(draft.n);
  if (n === null || n < 1 || n > N_MAX) throw new RangeError(`particles: expected a whole number from 1 to ${N_MAX}, got "${draft.n}"`);
  const seed = wholeNumber(draft.seed);
  if (seed === null || Math.abs(seed) > 2 ** 31) throw new RangeError(`seed: expected a whole number from −2147483648 to 2147483648, got "${draft.seed}"`);
  const tt = draft.targets.trim().toLowerCase();
  let targets: TargetChoice = { kind: 'auto' };
  if (tt === 'all') targets = { kind: 'all' };
  else if (tt !== 'auto' && tt !== '') {
    const k = wholeNumber(tt);
    if (k === null || k < 1) throw new RangeError(`targets: expected "auto", "all" or a whole number of at least 1, got "${draft.targets}"`);
    targets = { kind: 'sample', count: k };
  }
  const gText = draft.G.trim();
  const G = gText === '' ? NaN : Number(gText);
  if (!(G > 0 && Number.isFinite(G))) throw new RangeError(`G: expected a positive number, got "${draft.G}"`);
  return { n, seed, targets, G };
}

/** Reads "L" or "Lx,Ly,Lz" (also space-separated) as a box; the error names the field. */
export function boxParse(text: string): Box {
  const parts = text.trim().split(/[\s,×x]+/).filter(Boolean).map(Number);
  if ((parts.length !== 1 && parts.length !== 3) || parts.some((v) => !(v > 0 && Number.isFinite(v)))) {
    throw new RangeError(`box: expected one positive side or three (Lx,Ly,Lz), got "${text}"`);
  }
  return parts.length === 1 ? boxMake(parts[0]) : boxMake(parts[0], parts[1], parts[2]);
}

// ---- URL query ------------------------------------------------------------------------------------

const VIEW_KEYS: Record<keyof ViewDraft, string> = {
  arrows: 'arrows',
  worstK: 'worst',
  arrowLog: 'alog',
  arrowScale: 'ascale',
  slabAxis: 'slab',
  slabCenter: 'slabc',
  slabThickness: 'slabw',
  context: 'context',
  scatterX: 'vs',
  verdictKey: 'verdict',
  verdictLimit: 'vlimit',
};

/** The query string (with "?", or "" when everything is default) that reproduces a draft. */
export function draftToQuery(draft: Draft, file?: { name: string; n: number } | null): string {
  const d = DEFAULT_DRAFT;
  const q = new URLSearchParams();
  if (file) {
    q.set('file', file.name);
    q.set('fileN', String(file.n));
  } else {
    if (draft.n !== d.n) q.set('n', draft.n);
  }
  if (draft.seed !== d.seed) q.set('seed', draft.seed);
  if (draft.targets !== d.targets) q.set('targets', draft.targets);
  if (draft.G !== d.G) q.set('G', draft.G);
  if (file && draft.box !== d.box) q.set('box', draft.box);
  for (const slot of ['a', 'b'] as const) {
    const s = draft[slot];
    q.set(slot, s.method);
    for (const p of methodSpec(s.method).params) {
      const v = s.params[p.key];
      if (v !== undefined && v !== p.defaultValue) q.set(`${slot}.${p.key}`, v);
    }
  }
  for (const [k, name] of Object.entries(VIEW_KEYS) as [keyof ViewDraft, string][]) {
    const v = draft.view[k];
    if (v !== d.view[k]) q.set(name, String(v));
  }
  const s = q.toString();
  return s ? `?${s}` : '';
}

/** A draft from a URL query over `base`; unknown keys are ignored, values stay unchecked text. */
export function draftFromQuery(search: string, base: Draft = DEFAULT_DRAFT): Draft {
  const q = new URLSearchParams(search);
  const get = (key: string) => {
    const v = q.get(key);
    return v === null ? null : v.trim();
  };
  const pick = (key: string, fallback: string) => get(key) || fallback;
  const slot = (name: 'a' | 'b'): SlotDraft => {
    const m = get(name);
    const method = m && isMethodId(m) ? m : base[name].method;
    const params: Record<string, string> = { ...base[name].params };
    for (const [k, v] of q) if (k.startsWith(`${name}.`)) params[k.slice(2)] = v.trim();
    return { method, params };
  };
  const view: Record<string, unknown> = { ...base.view };
  for (const [k, name] of Object.entries(VIEW_KEYS) as [keyof ViewDraft, string][]) {
    const v = get(name);
    if (v === null) continue;
    view[k] = typeof DEFAULT_VIEW[k] === 'boolean' ? v === 'true' || v === '1' : v;
  }
  const v = view as unknown as ViewDraft;
  return {
    n: pick('n', base.n),
    seed: pick('seed', base.seed),
    targets: pick('targets', base.targets),
    G: pick('G', base.G),
    box: pick('box', base.box),
    a: slot('a'),
    b: slot('b'),
    view: {
      ...v,
      arrows: (['worst', 'all', 'none'] as const).includes(v.arrows) ? v.arrows : DEFAULT_VIEW.arrows,
      slabAxis: (['none', 'x', 'y', 'z'] as const).includes(v.slabAxis) ? v.slabAxis : DEFAULT_VIEW.slabAxis,
      scatterX: (['nearest', 'density'] as const).includes(v.scatterX) ? v.scatterX : DEFAULT_VIEW.scatterX,
      verdictKey: (REQUIRE_KEYS as readonly string[]).includes(v.verdictKey) ? v.verdictKey : DEFAULT_VIEW.verdictKey,
    },
  };
}

/** The file a shared link refers to (name and particle count), if any. */
export function fileFromQuery(search: string): { name: string; n: number | null } | null {
  const q = new URLSearchParams(search);
  const name = q.get('file');
  if (!name) return null;
  const n = Number(q.get('fileN'));
  return { name, n: Number.isInteger(n) && n > 0 ? n : null };
}
