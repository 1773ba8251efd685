/**
 * The WebAssembly formatter (engine/wasm/as/textFormat*.ts) against Number.prototype.toPrecision(17)
 * (ECMA-262 §21.1.3.5), string for string, and on constructed cases also against an independent
 * derivation: the same rule evaluated with exact BigInt rationals (refToPrecision17 below). 17 significant
 * digits are the IEEE 754-2008 §5.12.2 round-trip width for binary64.
 */
import { describe, expect, it } from 'vitest';
import { csvChunksBytes } from '../../../engine/formats/csvWrite';
import { TEXT_FORMAT_BASE, textFormatInstance } from '../../../engine/wasm/textFormatWasm';
import { uint32Seeded } from '../../helpers/uint32Seeded';

const ex = textFormatInstance();
const dec = new TextDecoder();

/** toPrecision(17) of v by the WebAssembly formatter alone ('' when it leaves v to JavaScript). */
function wasmFormat(v: number): string {
  const n = ex!.formatDouble(v, TEXT_FORMAT_BASE);
  return dec.decode(new Uint8Array(ex!.memory.buffer, TEXT_FORMAT_BASE, n));
}

const f64 = new Float64Array(1);
const u64 = new BigUint64Array(f64.buffer);
function fromBits(b: bigint): number {
  u64[0] = b;
  return f64[0];
}
function bitsOf(v: number): bigint {
  f64[0] = v;
  return u64[0];
}
/** The next double towards +∞ / −∞ (IEEE 754 nextUp / nextDown) of a finite positive v. */
const nextUp = (v: number): number => fromBits(bitsOf(v) + 1n);
const nextDown = (v: number): number => fromBits(bitsOf(v) - 1n);

/** |v| = num / den exactly (v finite, nonzero). */
function exactRational(v: number): { num: bigint; den: bigint } {
  const b = bitsOf(Math.abs(v));
  const be = Number(b >> 52n);
  const frac = b & ((1n << 52n) - 1n);
  const m = be === 0 ? frac : frac | (1n << 52n);
  const q = be === 0 ? -1074 : be - 1075;
  return q >= 0 ? { num: m << BigInt(q), den: 1n } : { num: m, den: 1n << BigInt(-q) };
}

const pow10 = (k: number): bigint => 10n ** BigInt(k);

/**
 * ECMA-262 §21.1.3.5 Number.prototype.toPrecision(17) in exact arithmetic: e and n with
 * 10^16 ≤ n < 10^17 and n·10^(e−16) − x closest to zero, ties to the larger n·10^(e−16); exponential
 * notation when e < −6 or e ≥ 17; −0 as 0.
 */
function refToPrecision17(v: number): string {
  if (v === 0) return '0.0000000000000000';
  const sign = v < 0 ? '-' : '';
  const { num, den } = exactRational(v);
  const atLeast = (e: number): boolean => (e >= 0 ? num >= pow10(e) * den : num * pow10(-e) >= den); // |v| ≥ 10^e
  let e = Math.floor(Math.log10(Math.abs(v)));
  while (!atLeast(e)) e--;
  while (atLeast(e + 1)) e++;
  const k = 16 - e;
  const a = k >= 0 ? num * pow10(k) : num;
  const b = k >= 0 ? den : den * pow10(-k);
  let n = a / b;
  if (2n * (a - n * b) >= b) n++; // half or more: the larger n
  if (n === pow10(17)) {
    n = pow10(16);
    e++;
  }
  const d = n.toString();
  if (e < -6 || e >= 17) return `${sign}${d[0]}.${d.slice(1)}e${e < 0 ? '-' : '+'}${Math.abs(e)}`;
  if (e === 16) return sign + d;
  if (e >= 0) return `${sign}${d.slice(0, e + 1)}.${d.slice(e + 1)}`;
  return `${sign}0.${'0'.repeat(-e - 1)}${d}`;
}


/** Formats the values as one CSV column through csvChunksBytes; returns the mismatches with toPrecision(17). */
function mismatchesThroughCsv(values: Float64Array): string[] {
  const parts = [...csvChunksBytes([{ name: 'v', values }], values.length, 4096)];
  const lines = parts.map((p) => dec.decode(p)).join('').split('\n');
  expect(lines[0]).toBe('v');
  expect(lines.length).toBe(values.length + 2); // header, rows, '' after the last LF
  const bad: string[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const want = v.toPrecision(17);
    if (lines[i + 1] !== want && bad.length < 10) bad.push(`${bitsOf(v).toString(16)}: ${lines[i + 1]} ≠ ${want}`);
    // IEEE 754-2008 §5.12.2: 17 significant digits read back to the same binary64 (−0 reads back as +0)
    const back = Number(lines[i + 1]);
    if (Number.isFinite(v) && back !== v && bad.length < 10) bad.push(`${bitsOf(v).toString(16)}: ${lines[i + 1]} reads back as ${back}`);
  }
  return bad;
}

/** Checks each value three ways: wasm alone, toPrecision(17), the exact reference. */
function checkAll(values: number[]): void {
  const bad: string[] = [];
  for (const v of values) {
    const want = v.toPrecision(17);
    const ref = refToPrecision17(v);
    const got = wasmFormat(v);
    if (got !== want || ref !== want) bad.push(`${v} (bits ${bitsOf(v).toString(16)}): wasm ${got}, toPrecision ${want}, exact ${ref}`);
  }
  expect(bad.slice(0, 10)).toEqual([]);
}

describe('engine/wasm/textFormatWasm.ts: the WebAssembly formatter', () => {
  it('loads on this Node and keeps its static data below the callers\' buffers', () => {
    expect(ex).not.toBeNull();
    expect(ex!.textFormatHeapBase()).toBeGreaterThan(0);
    expect(ex!.textFormatHeapBase()).toBeLessThanOrEqual(TEXT_FORMAT_BASE);
  });

  it('writes toPrecision(17) (ECMA-262 §21.1.3.5) for 1 000 000 random bit patterns over all exponents', () => {
    const next = uint32Seeded(20261202);
    const values = new Float64Array(1_000_000);
    const words = new Uint32Array(values.buffer);
    for (let i = 0; i < words.length; i++) words[i] = next();
    // NaN and ±Infinity patterns (about 1 in 2048) go to the JavaScript fallback inside csvChunksBytes.
    expect(mismatchesThroughCsv(values)).toEqual([]);
  });

  it('writes toPrecision(17) for 1 000 000 values in force ranges 1e-12 … 1e6, both signs', () => {
    const next = uint32Seeded(7);
    const values = new Float64Array(1_000_000);
    for (let i = 0; i < values.length; i++) {
      const sign = next() & 1 ? -1 : 1;
      const u = (next() + next() / 2 ** 32) / 2 ** 32;
      // half log-uniform over the whole range, half uniform within one decade of it
      values[i] = i & 1 ? sign * 10 ** (-12 + 18 * u) : sign * (1 + 9 * u) * 10 ** (-12 + (next() % 18));
    }
    expect(mismatchesThroughCsv(values)).toEqual([]);
  });

  it('agrees with toPrecision(17) and the exact reference on zeros, extremes, subnormals and the notation switches', () => {
    expect(wasmFormat(0)).toBe('0.0000000000000000');
    expect(wasmFormat(-0)).toBe('0.0000000000000000'); // §21.1.3.5: −0 is not < 0, no sign
    expect(wasmFormat(5e-324)).toBe('4.9406564584124654e-324');
    expect(wasmFormat(1.7976931348623157e308)).toBe('1.7976931348623157e+308');
    expect(wasmFormat(1e16)).toBe('10000000000000000'); // e = 16: 17 digits, no point
    expect(wasmFormat(1e17)).toBe('1.0000000000000000e+17'); // e = 17: exponential
    expect(wasmFormat(1e-6)).toBe('9.9999999999999995e-7'); // the double below 10^−6: e = −7
    const cases = [
      0, -0, 5e-324, -5e-324, 1e-323, 2.2250738585072014e-308, nextDown(2.2250738585072014e-308), 1.7976931348623157e308,
      -1.7976931348623157e308, 1e21, 1e-7, 9.9999999999999995e-7, 1e-6, 1e16, 1e17, nextDown(1e17), nextUp(1e17),
      nextDown(1e16), nextUp(1e16), 0.1, 0.5, 1, -1, 123.456, 2 ** 53, 2 ** 53 - 1, 2 ** 57, Math.PI, Math.E,
    ];
    // subnormals of every bit length: 2^j and 2^j − 1 units of 2^−1074
    for (let j = 0; j <= 52; j++) cases.push(fromBits(1n << BigInt(j)), fromBits((1n << BigInt(j)) - 1n || 1n));
    checkAll(cases.concat(cases.map((v) => -v)));
  });

  it('agrees on every binary exponent (first, last and a random significand)', () => {
    const next = uint32Seeded(11);
    const cases: number[] = [];
    for (let be = 1n; be <= 2046n; be++) {
      const r = (BigInt(next()) << 20n) | BigInt(next() >>> 12);
      cases.push(fromBits(be << 52n), fromBits((be << 52n) | ((1n << 52n) - 1n)), fromBits((be << 52n) | r));
    }
    checkAll(cases);
  });

  it('agrees on every power of ten and its neighbours, including the ones that round up to the next power', () => {
    const cases: number[] = [];
    let carries = 0;
    for (let k = -323; k <= 308; k++) {
      const p = Number(`1e${k}`);
      cases.push(p, nextUp(p), nextDown(p));
      for (const v of [p, nextDown(p)]) {
        // a carry: v < 10^k exactly, yet its 17 digits are 1 followed by zeros (n rounded up to 10^17)
        const { num, den } = exactRational(v);
        const below = k >= 0 ? num < pow10(k) * den : num * pow10(-k) < den;
        if (below && /^1\.?0+(e[+-]\d+)?$/.test(refToPrecision17(v))) carries++;
      }
    }
    expect(carries).toBeGreaterThan(0); // the digit carry to the next power of ten is exercised
    checkAll(cases.concat(cases.map((v) => -v)));
  });

  it('rounds exact ties (18 significant digits ending in 5) to the larger n', () => {
    // A tie needs x = (n + 1/2)·10^(e−16) exactly, i.e. an exact decimal expansion of 18 significant
    // digits ending in 5: x = d·10^j with d odd, 10^17 ≤ d < 10^18. For j ≥ 0 (integers) the odd part
    // of x is d·5^j > 2^53, so no double is such a tie (integers in 2^53 … 2^57 are even and tie never).
    // For j = −i < 0, x = d / (2^i·5^i) is a double only when 5^i divides d: x = q / 2^i with q odd,
    // q·5^i = d. So the ties are the dyadic fractions q / 2^i whose q·5^i has 18 digits.
    const next = uint32Seeded(5);
    const ties: number[] = [];
    for (let i = 2; i <= 25; i++) {
      const lo = pow10(17) / 5n ** BigInt(i) + 1n;
      const hi = BigInt(Math.min(Number(pow10(18) / 5n ** BigInt(i)), 2 ** 53 - 1));
      if (lo >= hi) continue;
      for (let t = 0; t < 200; t++) {
        let q = lo + ((BigInt(next()) << 21n) ^ BigInt(next())) % (hi - lo);
        if (q % 2n === 0n) q += 1n;
        const digits = (q * 5n ** BigInt(i)).toString();
        if (digits.length !== 18) continue;
        expect(digits.endsWith('5')).toBe(true);
        const x = Number(q) / 2 ** i;
        const { num, den } = exactRational(x);
        expect(num * 2n ** BigInt(i)).toBe(q * den); // x is exactly q / 2^i
        ties.push(x, -x);
      }
    }
    expect(ties.length).toBeGreaterThan(4000);
    checkAll(ties);
    // and the tie went up: the 17th digit is the 18-digit expansion's 17th digit plus one (or a carry)
    const x = 800000000000001 / 8; // 100000000000000.125 exactly
    expect(wasmFormat(x)).toBe('100000000000000.13');
  });

  it('leaves NaN and ±Infinity to JavaScript', () => {
    expect(ex!.formatDouble(Number.NaN, TEXT_FORMAT_BASE)).toBe(0);
    expect(ex!.formatDouble(Infinity, TEXT_FORMAT_BASE)).toBe(0);
    expect(ex!.formatDouble(-Infinity, TEXT_FORMAT_BASE)).toBe(0);
  });
});

describe('the constants the formatter relies on', () => {
  it('floor(p·log10 2) = (p·78913) >> 18 for every binary exponent −1100 … 1100 (exact check with BigInt)', () => {
    const bad: number[] = [];
    for (let p = -1100; p <= 1100; p++) {
      const e = (p * 78913) >> 18;
      // 10^e ≤ 2^p < 10^(e+1)
      const two = (k: number) => (k >= 0 ? { n: 1n << BigInt(k), d: 1n } : { n: 1n, d: 1n << BigInt(-k) });
      const ten = (k: number) => (k >= 0 ? { n: pow10(k), d: 1n } : { n: 1n, d: pow10(-k) });
      const le = (a: { n: bigint; d: bigint }, b: { n: bigint; d: bigint }) => a.n * b.d <= b.n * a.d;
      const lt = (a: { n: bigint; d: bigint }, b: { n: bigint; d: bigint }) => a.n * b.d < b.n * a.d;
      if (!(le(ten(e), two(p)) && lt(two(p), ten(e + 1)))) bad.push(p);
    }
    expect(bad).toEqual([]);
  });

  it('each division by a constant meets the Granlund–Montgomery bound (m = ⌈2^s/d⌉, m·d − 2^s ≤ 2^(s−N))', () => {
    // (d, s, N, m) as used in engine/wasm/as/textFormat*.ts (Granlund & Montgomery 1994, PLDI).
    const uses: [bigint, bigint, bigint, bigint][] = [
      [10n, 67n, 64n, 0xcccccccccccccccdn],
      [100n, 19n, 14n, 5243n],
      [10000n, 45n, 32n, 3518437209n],
      [100000000n, 57n, 30n, 1441151881n],
      [100000000n, 84n, 57n, 193428131138340668n],
    ];
    for (const [d, s, N, m] of uses) {
      expect(m).toBe(((1n << s) + d - 1n) / d);
      expect(m * d - (1n << s)).toBeLessThanOrEqual(1n << (s - N));
    }
  });
});
