import { describe, expect, test } from 'vitest';
import { DEFAULT_DRAFT, N_MAX, boxParse, draftFromQuery, draftParse, draftToQuery, fileFromQuery } from '../../app/web/state/settings';

describe('draftParse(draft)', () => {
  test('reads the defaults as N 4096, seed 1, auto targets, G 1', () => {
    expect(draftParse(DEFAULT_DRAFT)).toEqual({ n: 4096, seed: 1, targets: { kind: 'auto' }, G: 1 });
  });

  test('reads "all", "auto" and a sample size', () => {
    expect(draftParse({ ...DEFAULT_DRAFT, targets: 'ALL' }).targets).toEqual({ kind: 'all' });
    expect(draftParse({ ...DEFAULT_DRAFT, targets: ' 256 ' }).targets).toEqual({ kind: 'sample', count: 256 });
    expect(draftParse({ ...DEFAULT_DRAFT, targets: '' }).targets).toEqual({ kind: 'auto' });
  });

  test.each([
    [{ n: '0' }, `particles: expected a whole number from 1 to ${N_MAX}, got "0"`],
    [{ n: '12.5' }, `particles: expected a whole number from 1 to ${N_MAX}, got "12.5"`],
    [{ seed: 'x' }, 'seed: expected a whole number from −2147483648 to 2147483648, got "x"'],
    [{ targets: '-3' }, 'targets: expected "auto", "all" or a whole number of at least 1, got "-3"'],
    [{ G: '0' }, 'G: expected a positive number, got "0"'],
    [{ G: 'abc' }, 'G: expected a positive number, got "abc"'],
  ])('rejects %o with a one-line message naming the field', (patch, message) => {
    expect(() => draftParse({ ...DEFAULT_DRAFT, ...patch })).toThrow(new RangeError(message));
  });
});

describe('boxParse(text)', () => {
  test('reads one side (cube) or three sides separated by commas or spaces', () => {
    expect(boxParse('100')).toEqual({ lx: 100, ly: 100, lz: 100 });
    expect(boxParse('2, 1,0.5')).toEqual({ lx: 2, ly: 1, lz: 0.5 });
    expect(boxParse('2 1 0.5')).toEqual({ lx: 2, ly: 1, lz: 0.5 });
  });

  test.each(['', '1,2', '0', '-1', 'a'])('rejects "%s" naming the field', (t) => {
    expect(() => boxParse(t)).toThrow(`box: expected one positive side or three (Lx,Ly,Lz), got "${t}"`);
  });
});

describe('draftToQuery / draftFromQuery', () => {
  test('the defaults give only the two methods; reading that back gives the defaults', () => {
    expect(draftToQuery(DEFAULT_DRAFT)).toBe('?a=mesh&b=ewald');
    expect(draftFromQuery(draftToQuery(DEFAULT_DRAFT))).toEqual(DEFAULT_DRAFT);
  });

  test('round-trips changed fields, slot parameters and view settings', () => {
    const d = {
      ...DEFAULT_DRAFT,
      n: '65536',
      targets: '2000',
      G: '4.3e-6',
      a: { method: 'ewald' as const, params: { ...DEFAULT_DRAFT.a.params, 'ewald.tol': '1e-3', 'ewald.softening': 'plummer', 'ewald.eps': '0.01' } },
      b: { method: 'ewald' as const, params: { ...DEFAULT_DRAFT.b.params, 'ewald.tol': '1e-10' } },
      view: { ...DEFAULT_DRAFT.view, arrows: 'all' as const, arrowLog: true, slabAxis: 'z' as const, slabCenter: '0.3' },
    };
    const q = draftToQuery(d);
    expect(q).toContain('a.ewald.tol=1e-3');
    expect(q).toContain('alog=true');
    expect(draftFromQuery(q)).toEqual(d);
  });

  test('a file snapshot puts its name and size in the link instead of the demo size', () => {
    const q = draftToQuery({ ...DEFAULT_DRAFT, box: '100' }, { name: 'run 7.csv', n: 1000 });
    expect(q).toContain('file=run+7.csv');
    expect(q).toContain('fileN=1000');
    expect(q).toContain('box=100');
    expect(fileFromQuery(q)).toEqual({ name: 'run 7.csv', n: 1000 });
    expect(fileFromQuery('?n=5')).toBeNull();
  });

  test('ignores unknown methods and view values, keeping the base', () => {
    const d = draftFromQuery('?a=warp&arrows=sideways&slab=w');
    expect(d.a.method).toBe(DEFAULT_DRAFT.a.method);
    expect(d.view.arrows).toBe('worst');
    expect(d.view.slabAxis).toBe('none');
  });
});
