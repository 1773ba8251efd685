/**
 * Polynomial extrapolation to x = 0 (Neville's algorithm; e.g. Press et al., Numerical Recipes, §3.2, and
 * Richardson's deferred approach to the limit when the error is a power series in x). Used with x = λ² for
 * the screened sums (error series in λ²) and x = 1/R² for the cube-shell tail (error series in 1/R²).
 */

/**
 * Value at x = 0 of the polynomial through (xs[s], rows[s]) for every column: rows is row-major
 * (xs.length rows of `width` numbers). Returns `width` numbers. The xs must be distinct.
 */
export function extrapolateToZero(xs: ArrayLike<number>, rows: Float64Array, width: number): Float64Array {
  const s = xs.length;
  const out = new Float64Array(width);
  const p = new Float64Array(s);
  for (let c = 0; c < width; c++) {
    for (let a = 0; a < s; a++) p[a] = rows[a * width + c];
    // Neville: p[a] ← (x_{a+m}·p[a] − x_a·p[a+1]) / (x_{a+m} − x_a), evaluated at x = 0
    for (let m = 1; m < s; m++) {
      for (let a = 0; a + m < s; a++) p[a] = (xs[a + m] * p[a] - xs[a] * p[a + 1]) / (xs[a + m] - xs[a]);
    }
    out[c] = p[0];
  }
  return out;
}
