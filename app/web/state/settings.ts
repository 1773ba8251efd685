/**
 * What the user asks for — demo size and seed, tolerance, number of targets — as typed text (the form,
 * the URL query ?n=&seed=&tol=&targets=) and as checked values. Every rejection names the field.
 */

export interface Draft {
  readonly n: string;
  readonly seed: string;
  readonly tol: string;
  readonly targets: string;
}

export interface Settings {
  /** Particles in the demo snapshot. */
  readonly n: number;
  readonly seed: number;
  /** Requested relative force tolerance, in (0, 1). */
  readonly tol: number;
  /** Number of targets (a seeded sample), or null for all particles. */
  readonly targets: number | null;
}

export const N_MAX = 1 << 20;

export const DEFAULT_DRAFT: Draft = { n: '4096', seed: '1', tol: '1e-6', targets: 'all' };

/** The draft from a URL query string; absent parameters keep their defaults, values stay unchecked. */
export function draftFromQuery(search: string): Draft {
  const q = new URLSearchParams(search);
  const pick = (key: keyof Draft) => q.get(key)?.trim() || DEFAULT_DRAFT[key];
  return { n: pick('n'), seed: pick('seed'), tol: pick('tol'), targets: pick('targets') };
}

function wholeNumber(text: string): number | null {
  const t = text.trim();
  if (!/^[+-]?\d+$/.test(t)) return null;
  const v = Number(t);
  return Number.isSafeInteger(v) ? v : null;
}

/** Checks a draft; throws a RangeError whose one-line message names the field and the bad text. */
export function draftParse(draft: Draft): Settings {
  const n = wholeNumber(draft.n);
  if (n === null || n < 1 || n > N_MAX) {
    throw new RangeError(`particles: expected a whole number from 1 to ${N_MAX}, got "${draft.n}"`);
  }
  const seed = wholeNumber(draft.seed);
  if (seed === null || Math.abs(seed) > 2 ** 31) {
    throw new RangeError(`seed: expected a whole number from −2147483648 to 2147483648, got "${draft.seed}"`);
  }
  const tolText = draft.tol.trim();
  const tol = tolText === '' ? NaN : Number(tolText);
  if (!(tol > 0 && tol < 1)) {
    throw new RangeError(`tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "${draft.tol}"`);
  }
  const tt = draft.targets.trim().toLowerCase();
  let targets: number | null = null;
  if (tt !== 'all' && tt !== '') {
    const k = wholeNumber(tt);
    if (k === null || k < 1) throw new RangeError(`targets: expected "all" or a whole number of at least 1, got "${draft.targets}"`);
    targets = k >= n ? null : k;
  }
  return { n, seed, tol, targets };
}
