/**
 * Per-particle discrepancy between two acceleration sets on the same targets (PHYSICS.md: the relative
 * force error of particle i is |a_i − a_ref,i| / |a_ref,i|; here A is compared with B, B being the
 * reference). Accelerations are flat xyz, 3 per target, in the same units.
 */

/** Checks that two flat xyz arrays describe the same number of targets; throws a RangeError otherwise. */
function pairCheck(accA: Float64Array, accB: Float64Array): number {
  if (accA.length !== accB.length || accA.length % 3 !== 0) {
    throw new RangeError(`acceleration sets differ: A holds ${accA.length} numbers, B holds ${accB.length} (3 per target expected in both)`);
  }
  return accA.length / 3;
}

/** Euclidean norm without underflow or overflow in the squares (fast path when the squares are normal). */
function norm3(x: number, y: number, z: number): number {
  const s = x * x + y * y + z * z;
  if (s > 1e-290 && s < 1e290) return Math.sqrt(s);
  return Math.hypot(x, y, z);
}

/** Residual vectors a_A − a_B (flat xyz, acceleration units). */
export function residualVectors(accA: Float64Array, accB: Float64Array): Float64Array {
  const n = pairCheck(accA, accB);
  const out = new Float64Array(3 * n);
  for (let k = 0; k < 3 * n; k++) out[k] = accA[k] - accB[k];
  return out;
}

/**
 * Relative errors |a_A − a_B| / |a_B| per target. Where |a_B| = 0 the value is 0 if a_A = a_B too and
 * +Infinity otherwise; where either input is not finite the value is NaN (both are "undefined" in stats).
 */
export function relativeErrors(accA: Float64Array, accB: Float64Array): Float64Array {
  const n = pairCheck(accA, accB);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const bx = accB[3 * i], by = accB[3 * i + 1], bz = accB[3 * i + 2];
    const dx = accA[3 * i] - bx, dy = accA[3 * i + 1] - by, dz = accA[3 * i + 2] - bz;
    const d = norm3(dx, dy, dz);
    const b = norm3(bx, by, bz);
    if (!Number.isFinite(d) || !Number.isFinite(b)) out[i] = NaN;
    else if (b === 0) out[i] = d === 0 ? 0 : Infinity;
    else out[i] = d / b;
  }
  return out;
}

/** Norms |a| per target of a flat xyz array (acceleration units). */
export function vectorNorms(acc: Float64Array): Float64Array {
  const n = Math.floor(acc.length / 3);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = norm3(acc[3 * i], acc[3 * i + 1], acc[3 * i + 2]);
  return out;
}
