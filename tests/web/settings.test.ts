import { describe, expect, test } from 'vitest';
import { DEFAULT_DRAFT, N_MAX, draftFromQuery, draftParse } from '../../app/web/state/settings';

describe('draftFromQuery(search)', () => {
  test('takes n, seed, tol and targets from the query and defaults the rest', () => {
    expect(draftFromQuery('?n=65536&tol=1e-10')).toEqual({ ...DEFAULT_DRAFT, n: '65536', tol: '1e-10' });
    expect(draftFromQuery('')).toEqual(DEFAULT_DRAFT);
    expect(draftFromQuery('?targets=%20100%20&seed=')).toEqual({ ...DEFAULT_DRAFT, targets: '100' });
  });
});

describe('draftParse(draft)', () => {
  test('reads the defaults as N 4096, seed 1, tol 1e-6, all targets', () => {
    expect(draftParse(DEFAULT_DRAFT)).toEqual({ n: 4096, seed: 1, tol: 1e-6, targets: null });
  });

  test('reads a target count, and a count of N or more as all', () => {
    expect(draftParse({ ...DEFAULT_DRAFT, targets: '256' }).targets).toBe(256);
    expect(draftParse({ ...DEFAULT_DRAFT, targets: '4096' }).targets).toBeNull();
    expect(draftParse({ ...DEFAULT_DRAFT, targets: 'ALL' }).targets).toBeNull();
  });

  test.each([
    [{ n: '0' }, 'particles: expected a whole number from 1 to 1048576, got "0"'],
    [{ n: '12.5' }, 'particles: expected a whole number from 1 to 1048576, got "12.5"'],
    [{ n: String(N_MAX + 1) }, `particles: expected a whole number from 1 to 1048576, got "${N_MAX + 1}"`],
    [{ seed: 'x' }, 'seed: expected a whole number from −2147483648 to 2147483648, got "x"'],
    [{ tol: '1' }, 'tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "1"'],
    [{ tol: 'NaN' }, 'tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got "NaN"'],
    [{ tol: '' }, 'tolerance: expected a number between 0 and 1 (exclusive), such as 1e-6, got ""'],
    [{ targets: '-3' }, 'targets: expected "all" or a whole number of at least 1, got "-3"'],
    [{ targets: 'some' }, 'targets: expected "all" or a whole number of at least 1, got "some"'],
  ])('rejects %o with a one-line message naming the field', (patch, message) => {
    expect(() => draftParse({ ...DEFAULT_DRAFT, ...patch })).toThrow(new RangeError(message));
  });
});
