import { describe, expect, it } from 'vitest';
import { UsageError } from '../../app/cli/cliErrors';
import { fieldRefParse, mappingFromOptions, sizeParse, vectorRefParse } from '../../app/cli/mappingOptions';

describe('mapping options → ColumnMapping', () => {
  it('vectorRefParse: three parts (numbers become column numbers) or one name', () => {
    expect(vectorRefParse('x,y,z', 'positions', 'c')).toEqual(['x', 'y', 'z']);
    expect(vectorRefParse(' 0, 1 ,2', 'positions', 'c')).toEqual([0, 1, 2]);
    expect(vectorRefParse('/bodies/pos', 'positions', 'c')).toBe('/bodies/pos');
    expect(() => vectorRefParse('x,y', 'positions', 'c')).toThrow(/--positions takes three columns/);
    expect(() => vectorRefParse('x,,z', 'positions', 'c')).toThrow(UsageError);
    expect(fieldRefParse('7', 'ids', 'c')).toBe(7);
  });

  it('mappingFromOptions: --masses none, --box @PATH (a number stays a side), softening column, ids', () => {
    const v = new Map([
      ['positions', 'pos'],
      ['masses', 'none'],
      ['ids', 'pid'],
      ['softening-column', 'eps'],
      ['box', '@/header#BoxSize'],
      ['accelerations', 'ax,ay,az'],
    ]);
    expect(mappingFromOptions(v, 'c')).toEqual({ positions: 'pos', mass: null, ids: 'pid', softening: 'eps', box: '/header#BoxSize', accelerations: ['ax', 'ay', 'az'] });
    expect(mappingFromOptions(new Map([['box', '2.5']]), 'c')).toEqual({});
    expect(() => mappingFromOptions(new Map([['box', '@']]), 'c')).toThrow(/--box @PATH needs/);
  });

  it('sizeParse: bytes and decimal or binary units', () => {
    expect(sizeParse('800', 'max-size', 'c')).toBe(800);
    expect(sizeParse('500MB', 'max-size', 'c')).toBe(5e8);
    expect(sizeParse('2GiB', 'max-size', 'c')).toBe(2 ** 31);
    expect(sizeParse('4G', 'max-size', 'c')).toBe(4 * 2 ** 30);
    for (const bad of ['', 'lots', '-1GB', '1 parsec']) expect(() => sizeParse(bad, 'max-size', 'c')).toThrow(UsageError);
  });
});
