/**
 * Percentiles by linear interpolation between order statistics: for sorted values x[0..n−1] and a
 * fraction q in [0, 1], h = (n − 1)q and P(q) = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]). This is
 * definition 7 of Hyndman & Fan 1996 (Am. Stat. 50, 361), the rule NumPy calls "linear" (its default).
 */

/** Finite values of `values`, sorted ascending (NaN and ±Infinity left out). */
export function sortedFinite(values: ArrayLike<number>): Float64Array {
  let n = 0;
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) n++;
  const out = new Float64Array(n);
  let k = 0;
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) out[k++] = values[i];
  return out.sort();
}

/** The q-quantile (q in [0, 1]) of ascending `sorted` by the "linear" rule; NaN for no values. */
export function percentileLinear(sorted: ArrayLike<number>, q: number): number {
  if (!(q >= 0 && q <= 1)) throw new RangeError(`percentile: fraction q must lie in [0, 1], got ${q}`);
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  if (lo >= n - 1) return sorted[n - 1];
  const f = h - lo;
  return f === 0 ? sorted[lo] : sorted[lo] + f * (sorted[lo + 1] - sorted[lo]);
}
