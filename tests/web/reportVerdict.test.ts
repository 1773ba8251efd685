/**
 * reportVerdict: the limit's two spellings (fraction, percentage), the words of the verdict, and that it
 * agrees with the CLI's requirement evaluation (engine/stats/checkSummary) at and around the limit.
 */
import { describe, expect, it } from 'vitest';
import { type CheckFigures, REQUIRE_KEYS, requirementHolds } from '../../engine/stats/checkSummary';
import { reportVerdict, verdictLimitParse, verdictNumber } from '../../app/web/report/reportVerdict';

function figures(e: Partial<CheckFigures['relativeError']>): CheckFigures {
  return {
    rel: new Float64Array(0),
    relativeError: { p50: 0.001, p90: 0.002, p99: 0.0042, p999: 0.01, max: 0.02, rms: 0.003, ...e },
    rmsErrorOverRmsAcceleration: 0.001,
    rmsError: 1,
    rmsReference: 1000,
    zeroReference: 0,
    nonFinite: 0,
    worst: new Int32Array(0),
  };
}

describe('verdictLimitParse(text)', () => {
  it('reads a fraction, and a percentage as its hundredth', () => {
    expect(verdictLimitParse('0.01')).toEqual({ limit: 0.01, percent: false });
    expect(verdictLimitParse(' 1e-3 ')).toEqual({ limit: 1e-3, percent: false });
    expect(verdictLimitParse('1 %')).toEqual({ limit: 0.01, percent: true });
    expect(verdictLimitParse('0.5%')).toEqual({ limit: 0.005, percent: true });
  });
  for (const bad of ['', 'abc', '-1', '0', '0 %', '1e400', '1 %%', 'p99<=1', 'NaN', 'Infinity']) {
    it(`rejects "${bad}" with a line naming the field`, () => {
      expect(() => verdictLimitParse(bad)).toThrow(/^verdict limit: expected a positive number or percentage/);
    });
  }
});

describe('reportVerdict(figures, choice)', () => {
  it('speaks in percent when the limit was given in percent: "99th percentile 0.42 % ≤ 1 %: passes"', () => {
    const v = reportVerdict(figures({}), { key: 'p99', limit: '1 %' });
    expect(v.text).toBe('99th percentile 0.42 % ≤ 1 %: passes');
    expect(v.result).toMatchObject({ key: 'p99', op: '<=', limit: 0.01, value: 0.0042, pass: true });
  });

  it('says "fails" with ">" when the figure is above the limit; plain numbers for a plain limit', () => {
    const v = reportVerdict(figures({ max: 4.397 }), { key: 'max', limit: '1' });
    expect(v.text).toBe('maximum 4.4 > 1: fails'); // 3 significant digits
    expect(v.result.pass).toBe(false);
    expect(reportVerdict(figures({ p50: 3.2e-6 }), { key: 'p50', limit: '1e-5' }).text).toBe('median 3.2 × 10⁻⁶ ≤ 1 × 10⁻⁵: passes');
  });

  it('an infinite figure (a zero reference) fails; an undefined one (no defined error) fails and says so', () => {
    expect(reportVerdict(figures({ max: Infinity }), { key: 'max', limit: '5 %' }).text).toBe('maximum infinite > 5 %: fails');
    const u = reportVerdict(figures({ p99: NaN }), { key: 'p99', limit: '1 %' });
    expect(u.result.pass).toBe(false);
    expect(u.text).toMatch(/^99th percentile undefined .*: fails$/);
  });

  it('agrees with the CLI\'s requirementHolds for "KEY<=LIMIT" below, at and above the limit, for every key', () => {
    for (const key of REQUIRE_KEYS) {
      for (const value of [0.00999, 0.01, 0.01001]) {
        const v = reportVerdict(figures({ [key]: value }), { key, limit: '0.01' });
        expect(v.result.pass).toBe(requirementHolds({ text: '', key, op: '<=', limit: 0.01 }, value));
        expect(v.result.pass).toBe(value <= 0.01);
      }
    }
  });

  it('writes value and limit in one notation (powers of ten for both when either is below 10⁻³)', () => {
    expect(reportVerdict(figures({ max: 1.2207e-4 }), { key: 'max', limit: '0.001' }).text).toBe('maximum 1.22 × 10⁻⁴ ≤ 1 × 10⁻³: passes');
    expect(reportVerdict(figures({ max: 0.02 }), { key: 'max', limit: '0.05' }).text).toBe('maximum 0.02 ≤ 0.05: passes');
    expect(reportVerdict(figures({ max: Infinity }), { key: 'max', limit: '1e-4' }).text).toBe('maximum infinite > 1 × 10⁻⁴: fails');
  });

  it('verdictNumber: 3 significant digits, percent or plain', () => {
    expect(verdictNumber(0.0042, true)).toBe('0.42 %');
    expect(verdictNumber(1.1669, true)).toBe('117 %');
    expect(verdictNumber(0.0042, false)).toBe('0.0042');
  });
});
