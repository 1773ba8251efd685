/**
 * The report's verdict: one figure of the relative error (p50 … max, rms) against a limit the user
 * sets, e.g. "99th percentile 0.42 % ≤ 1 %: passes". Evaluated with the CLI's requirement code
 * (engine/stats/checkSummary), so a verdict here and `torusgrav check --require "p99<=0.01"` agree.
 */
import { type CheckFigures, REQUIRE_KEY_WORDS, REQUIRE_KEYS, type RequireKey, type RequirementResult, requirementsEvaluate } from '../../../engine/stats/checkSummary';
import { formatNumber } from '../format';

export interface VerdictChoice {
  readonly key: RequireKey;
  /** The limit as typed: a fraction ("0.01", "1e-3") or a percentage ("1 %", "0.5%"). */
  readonly limit: string;
}

export const DEFAULT_VERDICT: VerdictChoice = { key: 'p99', limit: '1 %' };

export interface Verdict {
  readonly result: RequirementResult;
  /** Whether the limit was typed as a percentage (the verdict then speaks in percent). */
  readonly percent: boolean;
  readonly text: string;
}

/** Whether `text` names a figure of the report (p50, p90, p99, p999, max, rms). */
export function verdictKeyValid(text: string): text is RequireKey {
  return (REQUIRE_KEYS as readonly string[]).includes(text);
}

/** The limit as a fraction and whether it was given in percent; throws a RangeError naming the field. */
export function verdictLimitParse(text: string): { limit: number; percent: boolean } {
  const t = text.trim();
  const m = /^([+]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(%?)$/.exec(t);
  const v = m ? Number(m[1]) : NaN;
  if (!m || !(v > 0) || !Number.isFinite(v)) {
    throw new RangeError(`verdict limit: expected a positive number or percentage (such as 0.01 or 1 %), got "${text}"`);
  }
  return { limit: m[2] ? v / 100 : v, percent: m[2] === '%' };
}

/** A relative error as shown in the verdict: in percent ("0.42 %") or as a number ("4.2 × 10⁻³"). */
export function verdictNumber(v: number, percent: boolean): string {
  if (v === Infinity) return 'infinite';
  if (!Number.isFinite(v)) return 'undefined';
  return percent ? `${formatNumber(100 * v, 3)} %` : formatNumber(v, 3);
}

const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** "1.22 × 10⁻⁴" (3 significant digits, always with a power of ten). */
function scientific(v: number): string {
  const [m, e] = v.toExponential(2).split('e');
  return `${Number(m)} × 10${String(Number(e)).replace(/./g, (c) => SUP[c] ?? c)}`;
}

/** The value and the limit in one notation: powers of ten for both when either is below 10⁻³ (plain numbers). */
export function verdictPair(value: number, limit: number, percent: boolean): [string, string] {
  const sci = !percent && [value, limit].some((v) => Number.isFinite(v) && v !== 0 && (Math.abs(v) < 1e-3 || Math.abs(v) >= 1e6));
  if (!sci) return [verdictNumber(value, percent), verdictNumber(limit, percent)];
  return [Number.isFinite(value) ? scientific(value) : verdictNumber(value, false), scientific(limit)];
}

/** The verdict of `figures` for a choice: "99th percentile 0.42 % ≤ 1 %: passes" (or "…> 1 %: fails"). */
export function reportVerdict(figures: CheckFigures, choice: VerdictChoice): Verdict {
  const { limit, percent } = verdictLimitParse(choice.limit);
  const [result] = requirementsEvaluate([{ text: `${choice.key}<=${limit}`, key: choice.key, op: '<=', limit }], figures);
  const words = REQUIRE_KEY_WORDS[choice.key];
  const [value, bound] = verdictPair(result.value, limit, percent);
  const text = Number.isNaN(result.value)
    ? `${words} undefined (no target has a defined relative error): fails`
    : `${words} ${value} ${result.pass ? '≤' : '>'} ${bound}: ${result.pass ? 'passes' : 'fails'}`;
  return { result, percent, text };
}
