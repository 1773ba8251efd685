import { describe, expect, test } from 'vitest';
import { MISSING, formatBox, formatCount, formatDuration, formatNumber } from '../../app/web/format';

describe('formatNumber(x, digits)', () => {
  test.each([NaN, Infinity, -Infinity, undefined, null])('shows %s as the missing sign', (x) => {
    expect(formatNumber(x)).toBe(MISSING);
    expect(formatCount(x)).toBe(MISSING);
    expect(formatDuration(x)).toBe(MISSING);
  });

  test('rounds to significant digits in plain notation between 1e-3 and 1e6', () => {
    expect(formatNumber(8.724061861322062)).toBe('8.724');
    expect(formatNumber(0.4643659874017076)).toBe('0.4644');
    expect(formatNumber(-70.68509903147195)).toBe('-70.69');
    expect(formatNumber(0.0195, 3)).toBe('0.0195');
    expect(formatNumber(0)).toBe('0');
  });

  test('writes small and large numbers as m × 10 with a superscript exponent', () => {
    expect(formatNumber(1.9514758815209362e-8, 3)).toBe('1.95 × 10⁻⁸');
    expect(formatNumber(1.0000000000000004e-6, 3)).toBe('1 × 10⁻⁶');
    expect(formatNumber(2.5e12)).toBe('2.5 × 10¹²');
  });
});

describe('formatCount, formatDuration, formatBox', () => {
  test('groups digits of counts above 9999 with narrow spaces', () => {
    expect(formatCount(4096)).toBe('4096');
    expect(formatCount(65536)).toBe('65\u202f536');
    expect(formatCount(1048576)).toBe('1\u202f048\u202f576');
  });

  test('writes durations in ms, s, then min and s', () => {
    expect(formatDuration(420.4)).toBe('420 ms');
    expect(formatDuration(3141)).toBe('3.14 s');
    expect(formatDuration(125_000)).toBe('2 min 5 s');
    expect(formatDuration(-1)).toBe(MISSING);
  });

  test('writes a cubic box by its side and other boxes by three sides', () => {
    expect(formatBox({ lx: 1, ly: 1, lz: 1 })).toBe('1 (cube)');
    expect(formatBox({ lx: 2, ly: 1, lz: 0.5 })).toBe('2 × 1 × 0.5');
    expect(formatBox(null)).toBe(MISSING);
  });
});

describe('formatVector, formatPercent', () => {
  test('write three components and percentages, missing values as the missing sign', async () => {
    const { formatVector, formatPercent } = await import('../../app/web/format');
    expect(formatVector([1.23456, -4.5, 0.000123])).toBe('(1.235, -4.5, 1.23 × 10⁻⁴)');
    expect(formatVector(null)).toBe(MISSING);
    expect(formatPercent(0.1234)).toBe('12.3 %');
    expect(formatPercent(NaN)).toBe(MISSING);
  });
});
