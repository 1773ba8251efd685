import { describe, expect, it } from 'vitest';
import { argsParse } from '../../app/cli/argParse';
import { UsageError } from '../../app/cli/cliErrors';

const SPECS = [
  { name: 'box', metavar: 'L', help: 'box' },
  { name: 'out', metavar: 'FILE', help: 'out' },
  { name: 'help', help: 'help' },
];

describe('argsParse(argv, specs, command)', () => {
  it('takes --name value, --name=value, flags and positionals in any order', () => {
    const r = argsParse(['a.csv', '--box', '-1', '--out=o.csv', '--help'], SPECS, 'forces');
    expect(r.positionals).toEqual(['a.csv']);
    expect(Object.fromEntries(r.values)).toEqual({ box: '-1', out: 'o.csv', help: '' });
  });

  it('collects every value of a repeatable option in order (values keeps the first)', () => {
    const specs = [...SPECS, { name: 'require', metavar: 'R', help: 'r', repeatable: true }];
    const r = argsParse(['--require', 'p99<=1', '--require=max<2', 'a.csv'], specs, 'check');
    expect(r.lists.get('require')).toEqual(['p99<=1', 'max<2']);
    expect(r.values.get('require')).toBe('p99<=1');
    expect(r.lists.has('box')).toBe(false);
  });

  it('treats everything after -- as positionals', () => {
    expect(argsParse(['--', '--box'], SPECS, 'forces').positionals).toEqual(['--box']);
  });

  it.each([
    [['--nope'], /unknown option --nope/],
    [['-b'], /unknown option -b/],
    [['--box'], /--box needs a value/],
    [['--box', '1', '--box', '2'], /given twice/],
    [['--help=yes'], /takes no value/],
  ])('refuses %j with a UsageError naming the option', (argv, message) => {
    expect(() => argsParse(argv, SPECS, 'forces')).toThrow(UsageError);
    expect(() => argsParse(argv, SPECS, 'forces')).toThrow(message);
  });
});
