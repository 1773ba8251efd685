/**
 * Error measures shared by the engine tests. Vectors are flat xyz Float64Arrays (3 per particle), scalars
 * one per particle. "Relative error of particle i" is |a_i − a_ref,i| / |a_ref,i| (PHYSICS.md conventions).
 */

/** Per-particle relative vector error |a_i − r_i| / |r_i| (Infinity where r_i = 0 and a_i ≠ r_i). */
export function vectorRelativeErrors(a: Float64Array, ref: Float64Array): Float64Array {
  if (a.length !== ref.length || a.length % 3 !== 0) throw new RangeError(`vector arrays differ in length: ${a.length} vs ${ref.length}`);
  const n = a.length / 3;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const dx = a[3 * i] - ref[3 * i], dy = a[3 * i + 1] - ref[3 * i + 1], dz = a[3 * i + 2] - ref[3 * i + 2];
    const d = Math.hypot(dx, dy, dz);
    const r = Math.hypot(ref[3 * i], ref[3 * i + 1], ref[3 * i + 2]);
    out[i] = d === 0 ? 0 : d / r;
  }
  return out;
}

/** Largest per-particle relative vector error, max_i |a_i − r_i| / |r_i|. */
export function maxVectorRelativeError(a: Float64Array, ref: Float64Array): number {
  let m = 0;
  for (const e of vectorRelativeErrors(a, ref)) m = Math.max(m, Number.isNaN(e) ? Infinity : e);
  return m;
}

/** Root mean square of the per-particle vector norms |r_i|. */
export function vectorRms(ref: Float64Array): number {
  let s = 0;
  for (let i = 0; i < ref.length; i++) s += ref[i] * ref[i];
  return Math.sqrt(s / (ref.length / 3));
}

/** Largest vector error divided by the rms reference norm, max_i |a_i − r_i| / rms_j |r_j|. */
export function maxVectorErrorOverRms(a: Float64Array, ref: Float64Array): number {
  const rms = vectorRms(ref);
  let m = 0;
  for (let i = 0; i < a.length; i += 3) {
    const d = Math.hypot(a[i] - ref[i], a[i + 1] - ref[i + 1], a[i + 2] - ref[i + 2]);
    m = Math.max(m, Number.isNaN(d) ? Infinity : d);
  }
  return m / rms;
}

/** Root mean square of a scalar array. */
export function scalarRms(ref: Float64Array): number {
  let s = 0;
  for (let i = 0; i < ref.length; i++) s += ref[i] * ref[i];
  return Math.sqrt(s / ref.length);
}

/** Largest scalar difference divided by the rms of the reference, max_i |p_i − r_i| / rms_j |r_j|. */
export function maxScalarErrorOverRms(p: Float64Array, ref: Float64Array): number {
  if (p.length !== ref.length) throw new RangeError(`scalar arrays differ in length: ${p.length} vs ${ref.length}`);
  let m = 0;
  for (let i = 0; i < p.length; i++) {
    const d = Math.abs(p[i] - ref[i]);
    m = Math.max(m, Number.isNaN(d) ? Infinity : d);
  }
  return m / scalarRms(ref);
}

/** Relative difference |a − b| / |b| of two numbers (|a − b| when b = 0). */
export function relativeDifference(a: number, b: number): number {
  const d = Math.abs(a - b);
  if (Number.isNaN(d)) return Infinity;
  return b === 0 ? d : d / Math.abs(b);
}

/** Picks the rows listed in `rows` out of a flat array with `stride` numbers per row. */
export function pickRows(values: Float64Array, rows: ArrayLike<number>, stride: number): Float64Array {
  const out = new Float64Array(rows.length * stride);
  for (let t = 0; t < rows.length; t++) for (let d = 0; d < stride; d++) out[t * stride + d] = values[rows[t] * stride + d];
  return out;
}
