/**
 * Everything the comparison views need from two acceleration sets on the same targets, in one call:
 * relative errors, residual norms, the summary, a log histogram and thinned cumulative distribution.
 */
import { type CdfPoints, type LogHistogram, cdfPoints, histogramLog } from './bins';
import { type ErrorSummary, errorSummaryFromRelative } from './errorSummary';
import { sortedFinite } from './percentile';
import { relativeErrors } from './relativeError';

export interface ErrorReport {
  /** |a_A − a_B| / |a_B| per target (see relativeErrors for zero and non-finite cases). */
  readonly relative: Float64Array;
  readonly summary: ErrorSummary;
  readonly histogram: LogHistogram;
  readonly cdf: CdfPoints;
}

/** Compares A with reference B (flat xyz, 3 per target, acceleration units). */
export function errorReport(accA: Float64Array, accB: Float64Array, worstCount = 20, binsPerDecade = 5): ErrorReport {
  const relative = relativeErrors(accA, accB);
  const sorted = sortedFinite(relative);
  const summary = errorSummaryFromRelative(relative, accA, accB, worstCount, sorted);
  return { relative, summary, histogram: histogramLog(relative, binsPerDecade), cdf: cdfPoints(sorted, 600) };
}
