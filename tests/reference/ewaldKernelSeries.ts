/**
 * The Ewald real-space functions of u = (αr)², evaluated from their Taylor series in exact rational
 * arithmetic (BigInt fixed point with 256 fraction bits), then rounded once:
 *   potQ(u)   = erf(√u)/√u                               = (2/√π) Σ_{n≥0} (−1)^n u^n / (n! (2n+1))
 *   forceP(u) = [erf(√u) − (2√u/√π) e^{−u}] / u^{3/2}    = (2/√π) Σ_{n≥1} (−1)^{n+1} 2n u^{n−1} / (n! (2n+1))
 * (term-by-term from erf(x) = (2/√π) Σ (−1)^n x^{2n+1}/(n!(2n+1)) and e^{−x²} = Σ (−1)^n x^{2n}/n!,
 * Abramowitz & Stegun 1964, 7.1.5 and 4.2.1). The input double u is converted exactly; the only rounding is
 * the final one and the float64 factor 2/√π (≤ 1 ulp together). Slow; for tests only (u ≲ 60).
 */

const FRACTION_BITS = 256n;
const ONE = 1n << FRACTION_BITS;
const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);

/** Exact fixed-point value of a finite double ≥ 0. */
function fixedFromDouble(u: number): bigint {
  if (!(u >= 0) || !Number.isFinite(u)) throw new RangeError(`series reference needs a finite u ≥ 0, got ${u}`);
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, u);
  const hi = view.getUint32(0), lo = view.getUint32(4);
  const biased = (hi >>> 20) & 0x7ff;
  let mantissa = (BigInt(hi & 0xfffff) << 32n) | BigInt(lo);
  let exponent = -1074;
  if (biased !== 0) {
    mantissa |= 1n << 52n;
    exponent = biased - 1075;
  }
  return exponent >= 0 ? (mantissa << BigInt(exponent)) << FRACTION_BITS : (mantissa << FRACTION_BITS) >> BigInt(-exponent);
}

/** Fixed point to the nearest-ish double (truncates to 64 significant bits first, then rounds). */
function doubleFromFixed(v: bigint): number {
  const negative = v < 0n;
  if (negative) v = -v;
  const bits = v.toString(2).length;
  const shift = Math.max(0, bits - 64);
  const top = v >> BigInt(shift);
  return (negative ? -1 : 1) * Number(top) * Math.pow(2, shift - Number(FRACTION_BITS));
}

function seriesSum(u: number, kind: 'P' | 'Q'): number {
  const U = fixedFromDouble(u);
  let power = ONE; // u^k / k!
  let sum = 0n;
  for (let k = 0; k < 2000; k++) {
    let term: bigint;
    if (kind === 'Q') {
      term = power / BigInt(2 * k + 1);
      if (k % 2 === 1) term = -term;
    } else {
      const n = k + 1; // term u^{n−1}/(n−1)! · 2n / (n (2n+1)) = u^{n−1}/(n−1)! · 2/(2n+1)
      term = (power * 2n) / BigInt(2 * n + 1);
      if (n % 2 === 0) term = -term;
    }
    sum += term;
    power = ((power * U) >> FRACTION_BITS) / BigInt(k + 1);
    if (power === 0n) break;
  }
  return TWO_OVER_SQRT_PI * doubleFromFixed(sum);
}

/** forceP(u) = [erf(x) − (2x/√π) e^{−x²}]/x³, x = √u, from the exact series. */
export function seriesForceP(u: number): number {
  return seriesSum(u, 'P');
}

/** potQ(u) = erf(x)/x, x = √u, from the exact series. */
export function seriesPotQ(u: number): number {
  return seriesSum(u, 'Q');
}
