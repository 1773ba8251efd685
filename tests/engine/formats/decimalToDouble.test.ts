import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decimalToDouble } from '../../../engine/formats/decimalToDouble';

/** Splits a digit string (≤ 19 significant, no leading zeros) into the (hi, lo, r) form. */
function parts(digits: string): [number, number, number] {
  const hi = Number(digits.slice(0, 15));
  const rest = digits.slice(15);
  return [hi, rest ? Number(rest) : 0, rest.length];
}

/** `digits`·10^exp10 as a decimal literal for Number(). */
const literal = (digits: string, exp10: number) => `${digits}e${exp10}`;

/** Exact decimal digits and exponent of the point half-way between the positive double d and the next one up. */
function midpointDecimal(d: number): { digits: string; exp10: number } {
  const v = new DataView(new ArrayBuffer(8));
  v.setFloat64(0, d);
  const bits = v.getBigUint64(0);
  const e = Number((bits >> 52n) & 0x7ffn);
  const m = (bits & ((1n << 52n) - 1n)) | (1n << 52n);
  const q = e - 1075; // d = m·2^q
  const odd = 2n * m + 1n; // midpoint = odd·2^(q−1)
  if (q - 1 >= 0) return { digits: (odd << BigInt(q - 1)).toString(), exp10: 0 };
  const k = 1 - q; // odd / 2^k = odd·5^k / 10^k
  return { digits: (odd * 5n ** BigInt(k)).toString(), exp10: -k };
}

describe('decimalToDouble(hi, lo, r, exp10)', () => {
  it('agrees with Number() (correctly rounded, ECMA-262 §7.1.4.1.1) whenever it answers (property, random digits)', () => {
    let answered = 0, total = 0;
    fc.assert(
      fc.property(fc.stringMatching(/^[1-9][0-9]{0,18}$/), fc.integer({ min: -260, max: 290 }), (digits, exp10) => {
        const got = decimalToDouble(...parts(digits), exp10);
        const inRange = exp10 >= -230 && exp10 <= 270;
        if (inRange) total++;
        if (Number.isNaN(got)) return true;
        if (inRange) answered++;
        return Object.is(got, Number(literal(digits, exp10)));
      }),
      { numRuns: 20000 },
    );
    // Inside its range it must actually answer (otherwise the reader silently takes the slow path).
    expect(answered / total).toBeGreaterThan(0.99);
  });

  it('never returns a wrong double next to a rounding boundary: 19-digit cuts of exact half-way points (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-240, max: 1e280, noNaN: true }), fc.integer({ min: -2, max: 2 }), (d, bump) => {
        const { digits, exp10 } = midpointDecimal(d);
        // Keep 19 significant digits (truncated), nudged by a few units in the last place.
        const cut = BigInt(digits.slice(0, 19)) + BigInt(bump);
        const s = cut.toString();
        const e = exp10 + (digits.length - 19) + (s.length - 19);
        const t = s.slice(0, 19);
        const got = decimalToDouble(...parts(t), e);
        return Number.isNaN(got) || Object.is(got, Number(literal(t, e)));
      }),
      { numRuns: 20000 },
    );
  });

  it('declines exact ties instead of guessing (2^53 + 1 lies half-way between two doubles)', () => {
    expect(decimalToDouble(...parts('9007199254740993'), 0)).toBeNaN();
    expect(Number('9007199254740993')).toBe(9007199254740992); // ties to even
  });

  it('declines magnitudes outside [1e-250, 1e300] (subnormal and overflow territory)', () => {
    expect(decimalToDouble(1, 0, 0, -320)).toBeNaN();
    expect(decimalToDouble(1, 0, 0, 305)).toBeNaN();
  });

  it('reads the 17-digit output of toPrecision(17) back bit for bit (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-200, max: 1e200, noNaN: true }), (d) => {
        const [mantissa, exponent] = d.toExponential(16).split('e');
        const digits = mantissa.replace('.', '').replace(/^0+/, '');
        const got = decimalToDouble(...parts(digits), Number(exponent) - 16);
        return Number.isNaN(got) || got === d;
      }),
      { numRuns: 20000 },
    );
  });
});
