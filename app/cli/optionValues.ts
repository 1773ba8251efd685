/**
 * Turning option text into checked values; every failure is a UsageError that names the option,
 * the text given and what is allowed.
 */
import { type Box } from '../../engine/box';
import type { Softening } from '../../engine/softening';
import type { TargetSpec } from '../../engine/targets';
import type { OptionSpec } from './argParse';
import { UsageError } from './cliErrors';

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A finite decimal number (no hex, no empty text, no NaN/Infinity). */
export function numberParse(text: string, option: string, command: string): number {
  const t = text.trim();
  const v = DECIMAL.test(t) ? Number(t) : NaN;
  if (!Number.isFinite(v)) throw new UsageError(`--${option}: ${JSON.stringify(text)} is not a finite number`, command);
  return v;
}

/** A number > 0. */
export function positiveParse(text: string, option: string, command: string): number {
  const v = numberParse(text, option, command);
  if (!(v > 0)) throw new UsageError(`--${option} must be > 0, got ${text}`, command);
  return v;
}

/** An integer in [min, max]. */
export function integerParse(text: string, option: string, command: string, min: number, max = Number.MAX_SAFE_INTEGER): number {
  const v = numberParse(text, option, command);
  if (!Number.isInteger(v) || v < min || v > max) {
    const range = max === Number.MAX_SAFE_INTEGER ? `an integer ≥ ${min}` : `an integer from ${min} to ${max}`;
    throw new UsageError(`--${option} must be ${range}, got ${text}`, command);
  }
  return v;
}

/** The --box option of the commands that read it as forces does (a side, three sides, or @PATH in the file). */
export const BOX_OPTION: OptionSpec = {
  name: 'box',
  metavar: 'L | Lx,Ly,Lz | @PATH',
  help: 'periodic box: one side (cube) or three sides, each > 0, or @PATH to read it from the file (as for forces) (required)',
};

/** --box L (cube) or Lx,Ly,Lz; every side > 0. */
export function boxParse(text: string, command: string): Box {
  const parts = text.split(',');
  if (parts.length !== 1 && parts.length !== 3) throw new UsageError(`--box takes one side L or three sides Lx,Ly,Lz, got ${JSON.stringify(text)}`, command);
  const names = parts.length === 1 ? ['L'] : ['Lx', 'Ly', 'Lz'];
  const sides = parts.map((p, d) => {
    const t = p.trim();
    const v = DECIMAL.test(t) ? Number(t) : NaN;
    if (!Number.isFinite(v)) throw new UsageError(`--box: side ${names[d]} = ${JSON.stringify(p)} is not a finite number`, command);
    if (!(v > 0)) throw new UsageError(`--box: side ${names[d]} must be > 0, got ${t}`, command);
    return v;
  });
  return sides.length === 1 ? { lx: sides[0], ly: sides[0], lz: sides[0] } : { lx: sides[0], ly: sides[1], lz: sides[2] };
}

/** --tol in the open interval (0, 1). */
export function tolParse(text: string, command: string): number {
  const v = numberParse(text, 'tol', command);
  if (!(v > 0 && v < 1)) throw new UsageError(`--tol must lie strictly between 0 and 1, got ${text}`, command);
  return v;
}

/** --softening none | plummer:EPS | spline:H (lengths > 0, box units). */
export function softeningParse(text: string, command: string): Softening {
  const t = text.trim().toLowerCase();
  if (t === 'none') return { kind: 'none' };
  const m = /^(plummer|spline):(.*)$/.exec(t);
  if (!m) throw new UsageError(`--softening must be none, plummer:EPS or spline:H, got ${JSON.stringify(text)}`, command);
  const what = m[1] === 'plummer' ? 'plummer:EPS' : 'spline:H';
  const v = DECIMAL.test(m[2].trim()) ? Number(m[2]) : NaN;
  if (!Number.isFinite(v) || !(v > 0)) throw new UsageError(`--softening ${what}: the length must be a number > 0, got ${JSON.stringify(m[2])}`, command);
  return m[1] === 'plummer' ? { kind: 'plummer', eps: v } : { kind: 'spline', h: v };
}

/** --targets all | K (K ≥ 1: the first K particles). */
export function targetsCountParse(text: string, command: string): number | 'all' {
  if (text.trim().toLowerCase() === 'all') return 'all';
  const t = text.trim();
  const v = DECIMAL.test(t) ? Number(t) : NaN;
  if (!Number.isInteger(v) || v < 1) throw new UsageError(`--targets must be all or a positive integer K (the first K particles), got ${JSON.stringify(text)}`, command);
  return v;
}

/**
 * --targets all|K or --sample K [--seed S] (not both; --seed only with --sample, default 1); without
 * either, `fallback` (all, or the first K particles).
 */
export function targetSpecParse(values: ReadonlyMap<string, string>, command: string, fallback: number | 'all'): TargetSpec {
  const sample = values.get('sample');
  const seed = values.get('seed');
  const targetsText = values.get('targets');
  if (sample !== undefined) {
    if (targetsText !== undefined) throw new UsageError('give either --targets or --sample, not both', command);
    return { kind: 'sample', count: integerParse(sample, 'sample', command, 1), seed: seed === undefined ? 1 : integerParse(seed, 'seed', command, 0, 2 ** 32 - 1) };
  }
  if (seed !== undefined) throw new UsageError('--seed only applies together with --sample', command);
  const k = targetsText === undefined ? fallback : targetsCountParse(targetsText, command);
  return k === 'all' ? { kind: 'all' } : { kind: 'first', count: k };
}
