import { describe, expect, it } from 'vitest';
import { UsageError } from '../../app/cli/cliErrors';
import { boxParse, integerParse, numberParse, softeningParse, targetsCountParse, tolParse } from '../../app/cli/optionValues';

describe('option values', () => {
  it('numberParse accepts decimals only (no hex, no empty, no NaN/Infinity)', () => {
    expect(numberParse('1e-3', 'x', 'c')).toBe(1e-3);
    expect(numberParse(' -.5 ', 'x', 'c')).toBe(-0.5);
    for (const bad of ['', ' ', '0x10', 'NaN', 'Infinity', '1e999', '1,5']) expect(() => numberParse(bad, 'x', 'c')).toThrow(UsageError);
  });

  it('boxParse reads one side or three, each > 0, and names the bad side', () => {
    expect(boxParse('2', 'c')).toEqual({ lx: 2, ly: 2, lz: 2 });
    expect(boxParse('1, 2.5,3', 'c')).toEqual({ lx: 1, ly: 2.5, lz: 3 });
    expect(() => boxParse('1,2', 'c')).toThrow(/three sides/);
    expect(() => boxParse('1,2,-3', 'c')).toThrow(/Lz must be > 0/);
    expect(() => boxParse('0', 'c')).toThrow(/L must be > 0/);
  });

  it('tolParse keeps the open interval (0, 1)', () => {
    expect(tolParse('0.5', 'c')).toBe(0.5);
    for (const bad of ['0', '1', '-0.1', '3']) expect(() => tolParse(bad, 'c')).toThrow(/between 0 and 1/);
  });

  it('softeningParse reads none, plummer:EPS and spline:H', () => {
    expect(softeningParse('none', 'c')).toEqual({ kind: 'none' });
    expect(softeningParse('Plummer:0.01', 'c')).toEqual({ kind: 'plummer', eps: 0.01 });
    expect(softeningParse('spline:2e-2', 'c')).toEqual({ kind: 'spline', h: 0.02 });
    for (const bad of ['plummer', 'plummer:', 'spline:-1', 'spline:0', 'gauss:1', 'plummer:abc']) expect(() => softeningParse(bad, 'c')).toThrow(UsageError);
  });

  it('targetsCountParse reads all or a positive integer; integerParse checks its range', () => {
    expect(targetsCountParse('ALL', 'c')).toBe('all');
    expect(targetsCountParse('12', 'c')).toBe(12);
    for (const bad of ['0', '-1', '2.5', 'some']) expect(() => targetsCountParse(bad, 'c')).toThrow(UsageError);
    expect(integerParse('4', 'threads', 'c', 1, 8)).toBe(4);
    expect(() => integerParse('9', 'threads', 'c', 1, 8)).toThrow(/from 1 to 8/);
  });
});
