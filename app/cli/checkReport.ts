/**
 * The figures of `torusgrav check` (schema torusgrav.check/1) from the file's accelerations A and the
 * reference B on the same targets, and their text table. Statistics are engine/stats': relative error
 * |a_A − a_B|/|a_B| per target, percentiles by the "linear" rule (Hyndman & Fan definition 7, NumPy's
 * default), rms error over rms |a_B|.
 */
import { errorSummaryFromRelative, relativeErrors, sortedFinite } from '../../engine/stats';
import { type Requirement, type RequireKey, requirementHolds } from './checkRequire';

export const CHECK_SCHEMA = 'torusgrav.check/1';
/** How many worst targets the report lists. */
export const CHECK_WORST = 10;

export interface CheckFigures {
  /** Per-target relative errors (NaN: undefined, Infinity: zero reference but A ≠ 0). */
  readonly rel: Float64Array;
  /** p50, p90, p99, p999 (over the finite relative errors), max and rms (over all; Infinity if any is infinite). */
  readonly relativeError: Readonly<Record<RequireKey, number>>;
  readonly rmsErrorOverRmsAcceleration: number;
  /** Target indices (into the target list), worst first. */
  readonly worst: Int32Array;
}

/** The figures of A against reference B (flat xyz, 3 per target). */
export function checkFigures(accA: Float64Array, accB: Float64Array): CheckFigures {
  const rel = relativeErrors(accA, accB);
  const sorted = sortedFinite(rel);
  const s = errorSummaryFromRelative(rel, accA, accB, CHECK_WORST, sorted);
  let sum = 0;
  for (let i = 0; i < sorted.length; i++) sum += sorted[i] * sorted[i];
  const infinite = s.zeroReference > 0;
  const [p50, p90, p99, p999] = s.percentiles;
  return {
    rel,
    relativeError: {
      p50,
      p90,
      p99,
      p999,
      max: infinite ? Infinity : s.max,
      rms: infinite ? Infinity : sorted.length ? Math.sqrt(sum / sorted.length) : NaN,
    },
    rmsErrorOverRmsAcceleration: s.rmsRatio,
    worst: s.worst,
  };
}

export interface RequirementResult extends Requirement {
  readonly value: number;
  readonly pass: boolean;
}

/** Every requirement evaluated against the figures. */
export function requirementsEvaluate(requirements: readonly Requirement[], f: CheckFigures): RequirementResult[] {
  return requirements.map((r) => ({ ...r, value: f.relativeError[r.key], pass: requirementHolds(r, f.relativeError[r.key]) }));
}

/** A number for JSON: Infinity and NaN become null (JSON has neither). */
export function jsonNumber(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** A number with 4 significant digits for the table. */
function g(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  return a !== 0 && (a < 1e-3 || a >= 1e6) ? v.toExponential(3) : String(Number(v.toPrecision(4)));
}

/** The short stdout table. */
export function checkTable(o: {
  file: string;
  n: number;
  targets: number;
  f: CheckFigures;
  worstIds: readonly number[];
  results: readonly RequirementResult[];
  pass: boolean;
  referenceText: string;
}): string {
  const e = o.f.relativeError;
  const lines = [
    `torusgrav check ${o.file}: N ${o.n}, targets ${o.targets}, reference ${o.referenceText}`,
    'relative error |a_file - a_ref|/|a_ref| (percentiles: linear interpolation between order statistics, NumPy "linear"):',
    `  p50 ${g(e.p50)}  p90 ${g(e.p90)}  p99 ${g(e.p99)}  p99.9 ${g(e.p999)}  max ${g(e.max)}  rms ${g(e.rms)}`,
    `rms error / rms |a_ref|: ${g(o.f.rmsErrorOverRmsAcceleration)}`,
    `worst ids: ${o.worstIds.map((id, k) => `${id} (${g(o.f.rel[o.f.worst[k]])})`).join(', ')}`,
    'requirements:',
    ...o.results.map((r) => `  ${r.pass ? 'PASS' : 'FAIL'}  ${r.key} ${r.op} ${r.limit}  (${r.key} = ${g(r.value)})`),
    `result: ${o.pass ? 'PASS' : 'FAIL'}`,
    '',
  ];
  return lines.join('\n');
}
