/**
 * engine/stats/checkSummary: the figures of a check on hand-made accelerations whose relative errors are
 * exact binary fractions (so every expected value is derived here by hand), infinite and undefined
 * cases, requirements at their limits, the JSON object (nulls for non-finite numbers) and the residual
 * columns. The percentile rule itself is tested in percentile.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { csvChunks } from '../../../engine/formats/csvWrite';
import { CHECK_SCHEMA, RESIDUAL_COLUMNS, checkFigures, checkReportJson, requirementHolds, requirementsEvaluate, residualColumns } from '../../../engine/stats/checkSummary';

/** B = (1, 0, 0) per target, A = (1 + e_i, 0, 0): relative error exactly e_i for dyadic e_i. */
function pair(errors: readonly number[]): { A: Float64Array; B: Float64Array } {
  const A = new Float64Array(3 * errors.length), B = new Float64Array(3 * errors.length);
  errors.forEach((e, i) => {
    B[3 * i] = 1;
    A[3 * i] = 1 + e;
  });
  return { A, B };
}

describe('checkFigures(accA, accB)', () => {
  it('percentiles by h = (n−1)q, max, rms of the relative errors, rms error over rms |a_B|, worst first', () => {
    // errors 0, 1/8, 2/8, 3/8, 4/8 (n = 5): p50 at h = 2 → 2/8; p90 at h = 3.6 → 3/8 + 0.6/8
    const { A, B } = pair([0.25, 0, 0.5, 0.125, 0.375]);
    const f = checkFigures(A, B);
    expect(Array.from(f.rel)).toEqual([0.25, 0, 0.5, 0.125, 0.375]);
    expect(f.relativeError.p50).toBe(0.25);
    expect(f.relativeError.p90).toBeCloseTo(0.375 + 0.6 * 0.125, 15);
    expect(f.relativeError.max).toBe(0.5);
    // rms = √((0 + 1 + 4 + 9 + 16)/64/5) = √(30/320)
    expect(f.relativeError.rms).toBeCloseTo(Math.sqrt(30 / 320), 15);
    // |a_B| = 1 everywhere: rms error over rms |a_B| is the rms relative error
    expect(f.rmsErrorOverRmsAcceleration).toBeCloseTo(Math.sqrt(30 / 320), 15);
    expect(f.rmsReference).toBe(1);
    expect(Array.from(f.worst)).toEqual([2, 4, 0, 3, 1]);
    expect(f.zeroReference).toBe(0);
    expect(f.nonFinite).toBe(0);
  });

  it('a zero reference with A ≠ 0 makes max and rms infinite; percentiles stay over the finite errors', () => {
    const { A, B } = pair([0.5, 0.25, 0]);
    B[6] = 0; // third target: |a_B| = 0, A = (1, 0, 0)
    const f = checkFigures(A, B);
    expect(f.rel[2]).toBe(Infinity);
    expect(f.relativeError.max).toBe(Infinity);
    expect(f.relativeError.rms).toBe(Infinity);
    expect(f.relativeError.p50).toBe(0.375);
    expect(f.zeroReference).toBe(1);
  });
});

describe('requirementHolds / requirementsEvaluate', () => {
  it('each operator at, below and above the limit; NaN never holds, Infinity compares', () => {
    const r = (op: '<=' | '<' | '>=' | '>') => ({ text: '', key: 'p99' as const, op, limit: 0.01 });
    expect([0.005, 0.01, 0.02].map((v) => requirementHolds(r('<='), v))).toEqual([true, true, false]);
    expect([0.005, 0.01, 0.02].map((v) => requirementHolds(r('<'), v))).toEqual([true, false, false]);
    expect([0.005, 0.01, 0.02].map((v) => requirementHolds(r('>='), v))).toEqual([false, true, true]);
    expect([0.005, 0.01, 0.02].map((v) => requirementHolds(r('>'), v))).toEqual([false, false, true]);
    expect(requirementHolds(r('<='), NaN)).toBe(false);
    expect(requirementHolds(r('>='), NaN)).toBe(false);
    expect(requirementHolds(r('<='), Infinity)).toBe(false);
    expect(requirementHolds(r('>'), Infinity)).toBe(true);
  });
  it('evaluates against the figure named by the key', () => {
    const f = checkFigures(pair([0.5, 0.25]).A, pair([0.5, 0.25]).B);
    const [a, b] = requirementsEvaluate([{ text: 'max<=0.5', key: 'max', op: '<=', limit: 0.5 }, { text: 'p50<0.3', key: 'p50', op: '<', limit: 0.3 }], f);
    expect(a).toMatchObject({ value: 0.5, pass: true });
    expect(b).toMatchObject({ value: 0.375, pass: false });
  });
});

describe('checkReportJson(input)', () => {
  it('schema, CLI keys in order, ids of the worst, non-finite numbers as null, pass only when all hold', () => {
    const { A, B } = pair([0.5, 0.25, 0]);
    B[6] = 0;
    const f = checkFigures(A, B);
    const results = requirementsEvaluate([{ text: 'p50<=1', key: 'p50', op: '<=', limit: 1 }, { text: 'max<=1', key: 'max', op: '<=', limit: 1 }], f);
    const j = checkReportJson({
      file: 's.csv', sha256: 'ab', sha256Of: 'file', n: 3, box: { lx: 1, ly: 2, lz: 3 }, G: 1, units: null,
      reference: { method: 'ewald', tol: 1e-7 }, compared: { method: 'file' }, figures: f, ids: [10, 11, 12], results, version: '1.2.3', created: 'now',
    });
    expect(Object.keys(j).slice(0, 14)).toEqual(['schema', 'file', 'sha256', 'n', 'targets', 'box', 'G', 'units', 'reference', 'relativeError', 'rmsErrorOverRmsAcceleration', 'worst', 'requirements', 'pass']);
    expect(j.schema).toBe(CHECK_SCHEMA);
    expect(j.targets).toBe(3);
    expect(j.relativeError).toEqual({ p50: 0.375, p90: 0.475, p99: 0.4975, p999: 0.49975, max: null, rms: null });
    expect(j.worst).toEqual([{ id: 12, relErr: null }, { id: 10, relErr: 0.5 }, { id: 11, relErr: 0.25 }]);
    expect((j.requirements as { pass: boolean; value: number | null }[]).map((r) => [r.pass, r.value])).toEqual([[true, 0.375], [false, null]]);
    expect(j.pass).toBe(false);
    expect(JSON.parse(JSON.stringify(j))).toEqual(j);
  });
});

describe('residualColumns(ids, positions, accA, accB, rel)', () => {
  it('writes RESIDUAL_COLUMNS in order with the values per target', () => {
    const { A, B } = pair([0.5, 0.25]);
    const f = checkFigures(A, B);
    const text = [...csvChunks(residualColumns([7, 9], Float64Array.of(0.1, 0.2, 0.3, 0.4, 0.5, 0.6), A, B, f.rel), 2)].join('');
    const lines = text.trim().split('\n');
    expect(lines[0]).toBe(RESIDUAL_COLUMNS.join(','));
    expect(lines[1].split(',').map(Number)).toEqual([7, 0.1, 0.2, 0.3, 1.5, 0, 0, 1, 0, 0, 0.5]);
    expect(lines[2].split(',').map(Number)).toEqual([9, 0.4, 0.5, 0.6, 1.25, 0, 0, 1, 0, 0, 0.25]);
  });
});
