/**
 * The numbers that describe how far acceleration set A is from reference set B over the same targets:
 * percentiles of the relative error (the "linear" rule of percentile.ts), max, rms of |a_A − a_B|, that rms
 * divided by the rms |a_B| (common practice, no single source: nearly uniform states have nearly
 * cancelling forces, so relative errors alone mislead there), and the worst targets.
 */
import { percentileLinear, sortedFinite } from './percentile';
import { relativeErrors } from './relativeError';

/** Percentile levels reported, as fractions. */
export const ERROR_PERCENTILES = [0.5, 0.9, 0.99, 0.999] as const;

export interface ErrorSummary {
  /** Targets compared. */
  readonly count: number;
  /** Targets whose relative error is defined (|a_B| > 0 or a_A = a_B, all components finite). */
  readonly defined: number;
  /** Targets with |a_B| = 0 but a_A ≠ a_B (relative error infinite). */
  readonly zeroReference: number;
  /** Targets with a non-finite component in A or B. */
  readonly nonFinite: number;
  /** Relative-error percentiles at ERROR_PERCENTILES over the defined targets (NaN when none). */
  readonly percentiles: readonly number[];
  readonly median: number;
  readonly max: number;
  /** √(mean |a_A − a_B|²) and √(mean |a_B|²) over finite targets (acceleration units). */
  readonly rmsError: number;
  readonly rmsReference: number;
  /** rmsError / rmsReference. */
  readonly rmsRatio: number;
  /** Indices into the targets of the largest relative errors, worst first (infinite ones first). */
  readonly worst: Int32Array;
}

/** Indices of the `k` largest values (NaN ranks lowest), largest first; ties keep the lower index first. */
export function largestIndices(values: Float64Array, k: number): Int32Array {
  const n = values.length;
  const m = Math.max(0, Math.min(k, n));
  if (m === 0) return new Int32Array(0);
  const key = (i: number) => (Number.isNaN(values[i]) ? -Infinity : values[i]);
  // a min-ordered buffer of the best m so far (small m: insertion is cheaper than a heap)
  const best: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = key(i);
    if (best.length === m && v <= key(best[best.length - 1])) continue;
    let p = best.length === m ? best.length - 1 : best.length;
    if (best.length < m) best.push(i);
    while (p > 0 && key(best[p - 1]) < v) {
      best[p] = best[p - 1];
      p--;
    }
    best[p] = i;
  }
  return Int32Array.from(best);
}

/** Summarises A against reference B (flat xyz, 3 per target, same units); `worstCount` worst targets listed. */
export function errorSummary(accA: Float64Array, accB: Float64Array, worstCount = 20): ErrorSummary {
  const rel = relativeErrors(accA, accB);
  return errorSummaryFromRelative(rel, accA, accB, worstCount);
}

/** As errorSummary, reusing relative errors from relativeErrors(accA, accB) (and, if given, sortedFinite of them). */
export function errorSummaryFromRelative(
  rel: Float64Array,
  accA: Float64Array,
  accB: Float64Array,
  worstCount = 20,
  sorted: Float64Array = sortedFinite(rel),
): ErrorSummary {
  const count = rel.length;
  let zeroReference = 0, nonFinite = 0, finite = 0, sumE = 0, sumB = 0;
  for (let i = 0; i < count; i++) {
    if (Number.isNaN(rel[i])) {
      nonFinite++;
      continue;
    }
    if (rel[i] === Infinity) zeroReference++;
    const dx = accA[3 * i] - accB[3 * i], dy = accA[3 * i + 1] - accB[3 * i + 1], dz = accA[3 * i + 2] - accB[3 * i + 2];
    sumE += dx * dx + dy * dy + dz * dz;
    sumB += accB[3 * i] ** 2 + accB[3 * i + 1] ** 2 + accB[3 * i + 2] ** 2;
    finite++;
  }
  const percentiles = ERROR_PERCENTILES.map((q) => percentileLinear(sorted, q));
  const rmsError = finite ? Math.sqrt(sumE / finite) : NaN;
  const rmsReference = finite ? Math.sqrt(sumB / finite) : NaN;
  return {
    count,
    defined: sorted.length,
    zeroReference,
    nonFinite,
    percentiles,
    median: percentiles[0],
    max: sorted.length ? sorted[sorted.length - 1] : NaN,
    rmsError,
    rmsReference,
    rmsRatio: rmsError / rmsReference,
    worst: largestIndices(rel, worstCount),
  };
}
