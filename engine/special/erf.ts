/**
 * Error function family in float64, from convergent series (small x) and a continued fraction (large x).
 * Abramowitz & Stegun (1964) 7.1.6 (series erf(x) = 2/√π e^{-x²} Σ 2^n x^{2n+1}/(2n+1)!!) and 7.1.14
 * (continued fraction for erfc). Accurate to a few ulp; used to build tables and in reference code, not
 * in hot loops.
 */

const TWO_OVER_SQRT_PI = 1.1283791670955126; // 2/√π

/** Σ_{n≥n0} 2^n x^{2n+1}/(2n+1)!! · e^{-x²} · 2/√π (positive terms, no cancellation). */
function erfSeriesFrom(x: number, n0: number): number {
  const x2 = x * x;
  // term_n = 2^n x^{2n+1} / (2n+1)!!; term_{n+1} = term_n · 2x² / (2n+3)
  let term = x;
  for (let n = 0; n < n0; n++) term *= (2 * x2) / (2 * n + 3);
  let sum = 0;
  for (let n = n0; n < 10000; n++) {
    sum += term;
    term *= (2 * x2) / (2 * n + 3);
    if (term < sum * 1e-17 && n > x2) break;
  }
  return TWO_OVER_SQRT_PI * Math.exp(-x2) * sum;
}

/**
 * erfc(x) for x ≥ 0.5 by the continued fraction A&S 7.1.14, evaluated backward from a fixed depth (more
 * stable than forward evaluation near x = 0.5, where many terms are needed).
 */
function erfcContinuedFraction(x: number): number {
  if (x === Infinity) return 0;
  // erfc(x) = e^{-x²}/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + 2/(x + ...)))))
  const depth = x < 1 ? 1200 : x < 2 ? 400 : x < 4 ? 120 : 60;
  let t = x;
  for (let n = depth; n >= 1; n--) t = x + n / 2 / t;
  return Math.exp(-x * x) / (Math.sqrt(Math.PI) * t);
}

/** The error function erf(x). */
export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x < 0) return -erf(-x);
  if (x < 3) return erfSeriesFrom(x, 0);
  return 1 - erfcContinuedFraction(x);
}

/** The complementary error function erfc(x) = 1 − erf(x), with full relative precision for large x. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x < 0) return 2 - erfc(-x);
  if (x < 0.5) return 1 - erfSeriesFrom(x, 0);
  return erfcContinuedFraction(x);
}

/**
 * Ewald real-space helper functions of u = (αr)², both entire in u (no cancellation at small r):
 *   forceP(u) = [erf(x) − (2x/√π) e^{-x²}] / x³ ,   potQ(u) = erf(x)/x ,   x = √u.
 * So the screened pair force factor is 1/r³ − α³ forceP(u) and the potential 1/r − α potQ(u).
 */
export function ewaldForceP(u: number): number {
  if (u === 0) return (2 / 3) * TWO_OVER_SQRT_PI;
  const x = Math.sqrt(u);
  // Large u: the positive series would overflow (its terms peak near e^u); the closed form has no
  // cancellation there since erf(x) ≈ 1.
  if (x >= 3) return (1 - erfcContinuedFraction(x) - TWO_OVER_SQRT_PI * x * Math.exp(-u)) / (u * x);
  return erfSeriesFrom(x, 1) / (u * x);
}

/** See ewaldForceP: potQ(u) = erf(√u)/√u, potQ(0) = 2/√π. */
export function ewaldPotQ(u: number): number {
  if (u === 0) return TWO_OVER_SQRT_PI;
  const x = Math.sqrt(u);
  if (x >= 3) return (1 - erfcContinuedFraction(x)) / x;
  return erfSeriesFrom(x, 0) / x;
}
