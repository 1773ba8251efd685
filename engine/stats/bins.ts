/**
 * Distributions of positive values on a logarithmic axis: a histogram with bins a fixed fraction of a
 * decade wide, and a thinned empirical cumulative distribution for plotting.
 */

export interface LogHistogram {
  /** Bin edges (length bins + 1), ascending, each edge 10^(1/binsPerDecade) times the previous. */
  readonly edges: Float64Array;
  /** Values per bin; a value equal to an inner edge goes to the bin above it; the top edge is inclusive. */
  readonly counts: Float64Array;
  /** Values that are exactly 0 (no place on a log axis). */
  readonly zeros: number;
  /** Values left out: negative, NaN or ±Infinity. */
  readonly excluded: number;
}

/**
 * Histogram of the positive finite values with `binsPerDecade` bins per decade; edges snap outward to
 * whole bins of the decade grid (…, 10^(k/b), …). No positive values: one empty bin [1, 10^(1/b)].
 */
export function histogramLog(values: ArrayLike<number>, binsPerDecade = 5): LogHistogram {
  if (!(Number.isInteger(binsPerDecade) && binsPerDecade >= 1 && binsPerDecade <= 100)) {
    throw new RangeError(`histogram: binsPerDecade must be a whole number from 1 to 100, got ${binsPerDecade}`);
  }
  let lo = Infinity, hi = -Infinity, zeros = 0, excluded = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v === 0) zeros++;
    else if (!(v > 0) || v === Infinity) excluded++;
    else {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  const b = binsPerDecade;
  if (lo === Infinity) {
    return { edges: Float64Array.from([1, 10 ** (1 / b)]), counts: new Float64Array(1), zeros, excluded };
  }
  // bin index of v: floor(b·log10 v) on the decade grid; tiny slack keeps exact grid values in place
  const index = (v: number) => Math.floor(b * Math.log10(v) + 1e-9);
  const k0 = index(lo);
  let k1 = index(hi) + 1;
  if (k1 <= k0) k1 = k0 + 1;
  const bins = k1 - k0;
  const edges = new Float64Array(bins + 1);
  for (let k = 0; k <= bins; k++) edges[k] = 10 ** ((k0 + k) / b);
  const counts = new Float64Array(bins);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!(v > 0) || v === Infinity) continue;
    counts[Math.min(bins - 1, Math.max(0, index(v) - k0))]++;
  }
  return { edges, counts, zeros, excluded };
}

export interface CdfPoints {
  /** Values (ascending) at the chosen ranks. */
  readonly x: Float64Array;
  /** Fraction of all sorted values ≤ x: (rank + 1)/n. */
  readonly f: Float64Array;
}

/**
 * The empirical cumulative distribution of ascending `sorted`, thinned to at most about `maxPoints`
 * points: evenly spaced ranks plus ranks crowding toward the top (the tail toward 1 − 10⁻⁵), always with
 * the first and last value.
 */
export function cdfPoints(sorted: ArrayLike<number>, maxPoints = 600): CdfPoints {
  const n = sorted.length;
  if (!(Number.isInteger(maxPoints) && maxPoints >= 4)) throw new RangeError(`cdf: maxPoints must be a whole number ≥ 4, got ${maxPoints}`);
  let ranks: number[];
  if (n <= maxPoints) ranks = Array.from({ length: n }, (_, i) => i);
  else {
    const set = new Set<number>([0, n - 1]);
    const half = Math.floor(maxPoints / 2);
    for (let j = 0; j < half; j++) set.add(Math.round(((n - 1) * j) / (half - 1)));
    const tail = maxPoints - half - 2;
    for (let j = 1; j <= tail; j++) set.add(Math.min(n - 1, Math.round((n - 1) * (1 - 10 ** ((-5 * j) / tail)))));
    ranks = [...set].sort((a, b) => a - b);
  }
  const x = new Float64Array(ranks.length);
  const f = new Float64Array(ranks.length);
  ranks.forEach((r, k) => {
    x[k] = sorted[r];
    f[k] = (r + 1) / n;
  });
  return { x, f };
}
