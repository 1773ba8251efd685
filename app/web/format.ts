/** Text for numbers on screen. Anything missing or not finite shows as "—", never NaN. */

export const MISSING = '—';

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹',
};

function isNumber(x: number | null | undefined): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

/** `digits` significant digits; plain notation for 10⁻³ ≤ |x| < 10⁶, otherwise "m × 10ᵉ". */
export function formatNumber(x: number | null | undefined, digits = 4): string {
  if (!isNumber(x)) return MISSING;
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e-3 && ax < 1e6) return String(Number(x.toPrecision(digits)));
  const [mant, exp] = x.toExponential(digits - 1).split('e');
  const e = String(Number(exp)).replace(/./g, (c) => SUPERSCRIPT[c] ?? c);
  return `${Number(mant)} × 10${e}`;
}

/** A whole number with thin-space groups of three (4 096, 65 536). */
export function formatCount(x: number | null | undefined): string {
  if (!isNumber(x)) return MISSING;
  const s = String(Math.round(Math.abs(x)));
  const grouped = s.length <= 4 ? s : s.replace(/\B(?=(\d{3})+(?!\d))/g, '\u202f');
  return (x < 0 ? '−' : '') + grouped;
}

/** A duration given in milliseconds: "420 ms", "3.1 s", "2 min 5 s". */
export function formatDuration(ms: number | null | undefined): string {
  if (!isNumber(ms) || ms < 0) return MISSING;
  if (ms < 1000) return `${Math.round(ms)} ms`;
  if (ms < 60_000) return `${Number((ms / 1000).toPrecision(3))} s`;
  const s = Math.round(ms / 1000);
  return `${Math.floor(s / 60)} min ${s % 60} s`;
}

/** Box sides "1 (cube)" or "2 × 1 × 1". */
export function formatBox(box: { lx: number; ly: number; lz: number } | null | undefined): string {
  if (!box) return MISSING;
  if (box.lx === box.ly && box.ly === box.lz) return `${formatNumber(box.lx)} (cube)`;
  return `${formatNumber(box.lx)} × ${formatNumber(box.ly)} × ${formatNumber(box.lz)}`;
}

/** A vector (x, y, z) as "(1.23, −4.5, 6 × 10⁻³)". */
export function formatVector(v: ArrayLike<number> | null | undefined, digits = 4): string {
  if (!v || v.length < 3) return MISSING;
  return `(${[0, 1, 2].map((d) => formatNumber(v[d], digits)).join(', ')})`;
}

/** A fraction as a percentage with `digits` significant digits ("12.3 %"). */
export function formatPercent(x: number | null | undefined, digits = 3): string {
  if (!isNumber(x)) return MISSING;
  return `${formatNumber(100 * x, digits)} %`;
}
