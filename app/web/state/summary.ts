/** Summary of an acceleration field for display: count, rms, largest and smallest |a| (acceleration units). */

export interface AccelerationSummary {
  readonly count: number;
  /** √(Σ|a|²/count); NaN when count is 0. */
  readonly rms: number;
  readonly max: number;
  readonly min: number;
}

/** Summarises flat xyz accelerations (3 per particle); empty input gives NaN statistics. */
export function accelerationSummary(acc: Float64Array): AccelerationSummary {
  const count = Math.floor(acc.length / 3);
  if (count === 0) return { count, rms: NaN, max: NaN, min: NaN };
  let sum2 = 0;
  let max = -Infinity;
  let min = Infinity;
  for (let i = 0; i < count; i++) {
    const a2 = acc[3 * i] ** 2 + acc[3 * i + 1] ** 2 + acc[3 * i + 2] ** 2;
    sum2 += a2;
    if (a2 > max) max = a2;
    if (a2 < min) min = a2;
  }
  return { count, rms: Math.sqrt(sum2 / count), max: Math.sqrt(max), min: Math.sqrt(min) };
}
