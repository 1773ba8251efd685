/**
 * The short text table of `torusgrav check`. The figures, requirements and JSON report (schema
 * torusgrav.check/1) are engine/stats/checkSummary.ts, shared with the web app's export.
 */
import type { CheckFigures, RequirementResult } from '../../engine/stats/checkSummary';

export { CHECK_SCHEMA, CHECK_WORST, type CheckFigures, type RequirementResult, checkFigures, checkReportJson, jsonNumber, requirementsEvaluate } from '../../engine/stats/checkSummary';

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
