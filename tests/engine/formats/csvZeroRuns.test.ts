/**
 * The reader's digit scan keeps zeros that follow a significant digit aside until a nonzero digit comes
 * (trailing zeros scale the exponent instead of counting as significant digits, so 17-digit output such
 * as 0.000061035156250000000 stays on the exact fast paths). Checked against Number(), which is correctly
 * rounded (ECMA-262 §7.1.4.1.1), on decimals made of long zero runs between short digit groups.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvRead } from '../../../engine/formats/csv';

const enc = new TextEncoder();

/** Digit strings made of zero runs (0–30 zeros) and short groups of any digits. */
const zeroRunDigits = (maxSegments: number) =>
  fc
    .array(fc.oneof(fc.nat(30).map((k) => '0'.repeat(k)), fc.stringMatching(/^[0-9]{1,4}$/)), { minLength: 1, maxLength: maxSegments })
    .map((parts) => parts.join(''))
    .filter((t) => t.length > 0);

const decimal = fc
  .tuple(fc.constantFrom('', '-', '+'), zeroRunDigits(6), fc.option(zeroRunDigits(8)), fc.option(fc.integer({ min: -340, max: 320 })))
  .map(([sign, int, frac, exp]) => `${sign}${int}${frac === null ? '' : `.${frac}`}${exp === null ? '' : `e${exp}`}`)
  .filter((t) => Number.isFinite(Number(t)));

function readCells(cells: readonly string[]): Float64Array {
  const rows = Math.floor(cells.length / 3);
  const text = 'x,y,z\n' + Array.from({ length: rows }, (_, r) => cells.slice(3 * r, 3 * r + 3).join(',')).join('\n');
  return csvRead(enc.encode(text), 'zeros.csv').positions;
}

describe('csv numbers with runs of zeros', () => {
  it('reads them exactly as Number() does (property)', () => {
    fc.assert(
      fc.property(fc.array(decimal, { minLength: 3, maxLength: 30 }), (cells) => {
        const got = readCells(cells);
        for (let k = 0; k < got.length; k++) if (!Object.is(got[k], Number(cells[k]))) return false;
        return true;
      }),
      { numRuns: 500 },
    );
  });

  it('reads chosen cases: trailing zeros in both parts, zeros past 15 and 19 digits, zero itself', () => {
    const cells = [
      '0.000061035156250000000', '100000000000000000000000', '1234567890123450000000001',
      '1.0000000000000000000000000000001', '0.10000000000000000555', '123456789012345678900000e-30',
      '0.000', '-0.0e5', '7000000000000000000000000e-24',
    ];
    const got = readCells(cells);
    cells.forEach((c, k) => expect(Object.is(got[k], Number(c)), c).toBe(true));
  });
});
