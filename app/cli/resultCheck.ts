/**
 * The command line's last check on computed results before they are written: an internal error rather
 * than a NaN or an infinity in the output file.
 */

function hasNonFinite(values: Float64Array): boolean {
  // Native scans (includes finds NaN, unlike indexOf): a loop over the elements in cold code costs
  // milliseconds and, measured, made V8 run a full collection right after.
  return values.includes(NaN) || values.includes(Infinity) || values.includes(-Infinity);
}

/** The first target whose acceleration (3 per target in `acc`) or potential (`phi`, if any) is not finite, or −1. */
export function nonFiniteTarget(acc: Float64Array, phi: Float64Array | null): number {
  if (!hasNonFinite(acc) && !(phi && hasNonFinite(phi))) return -1;
  const count = acc.length / 3;
  for (let t = 0; t < count; t++) {
    if (!Number.isFinite(acc[3 * t]) || !Number.isFinite(acc[3 * t + 1]) || !Number.isFinite(acc[3 * t + 2])) return t;
    if (phi && !Number.isFinite(phi[t])) return t;
  }
  return -1;
}
