/**
 * Every bad-input path of the built CLI: exit code 2, exactly one line on stderr naming file, line
 * (1-based, in the file), particle (0-based) and column where they apply, nothing on stdout, no output
 * or temp file left, and an existing --out file untouched.
 */
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cli, cliEnsureBuilt, tempDir, tempDirsRemove } from './cliHarness';

const GOOD = 'x,y,z,m\n0.1,0.2,0.3,1\n0.4,0.5,0.6,1\n0.7,0.8,0.9,1\n';
const SENTINEL = 'an earlier result that must survive\n';

/** 2100 distinct particles (z = i/4096 differs), then a copy of particle 5: enough for the threaded path. */
const MANY_WITH_DUPLICATE = (() => {
  const row = (i: number) => `${((i * 37) % 4096) / 4096},${((i * 101) % 4096) / 4096},${i / 4096}`;
  return 'x,y,z\n' + Array.from({ length: 2100 }, (_, i) => row(i)).join('\n') + '\n' + row(5) + '\n';
})();

beforeAll(() => cliEnsureBuilt());
afterAll(tempDirsRemove);

interface Case {
  /** Test title. */
  readonly what: string;
  /** Input file content (written as in.csv), or null for no file. */
  readonly input: string | null;
  /** Arguments; IN is replaced by the input path, OUT by the output path. */
  readonly args: readonly string[];
  /** Texts the one-line message must contain. */
  readonly says: readonly string[];
}

const forces = (...extra: string[]) => ['forces', 'IN', '--box', '1', '--out', 'OUT', ...extra];

const CASES: readonly Case[] = [
  { what: 'a non-numeric cell', input: 'x,y,z,m\n0.1,0.2,0.3,1\n\n0.4,oops,0.6,1\n', args: forces(), says: ['in.csv', 'line 4 (particle 1)', 'column "y"', '"oops" is not a number'] },
  { what: 'a NaN cell', input: 'x,y,z\n0.1,0.2,NaN\n', args: forces(), says: ['in.csv', 'line 2 (particle 0)', 'column "z"', 'not a finite number'] },
  { what: 'an Inf cell', input: 'x,y,z,mass\n0.1,0.2,0.3,1\n0.1,0.2,0.4,-inf\n', args: forces(), says: ['in.csv', 'line 3 (particle 1)', 'column "mass"', 'not a finite number'] },
  { what: 'an empty cell', input: 'x,y,z\n0.1,,0.3\n', args: forces(), says: ['in.csv', 'line 2 (particle 0)', 'column "y"', 'empty'] },
  { what: 'a short row', input: 'x,y,z\n0.1,0.2,0.3\n0.1,0.2\n', args: forces(), says: ['in.csv', 'line 3 (particle 1)', 'column "z"', 'missing'] },
  { what: 'a missing z column', input: '# comment\nx,y,m\n0.1,0.2,1\n', args: forces(), says: ['in.csv', 'line 2', 'column "z"'] },
  { what: 'a missing x column', input: 'a,y,z\n0.1,0.2,1\n', args: forces(), says: ['in.csv', 'line 1', 'column "x"'] },
  { what: 'an empty file', input: '', args: forces(), says: ['in.csv', 'empty'] },
  { what: 'a file with only a header', input: 'x,y,z\n', args: forces(), says: ['in.csv', 'line 1', 'no particle rows'] },
  { what: 'a binary file', input: '\u0000\u0001\u0002', args: ['forces', 'IN', '--box', '1', '--out', 'OUT'], says: ['in.csv', 'not a snapshot format'] },
  { what: 'a negative mass', input: 'x,y,z,m\n0.1,0.2,0.3,1\n0.4,0.5,0.6,-2\n', args: forces(), says: ['in.csv', 'line 3 (particle 1)', 'column "m"', 'negative'] },
  {
    what: 'coincident particles without softening (both input rows)',
    input: 'x,y,z\n# a comment shifts lines\n0.25,0.5,0.75\n0.1,0.1,0.1\n\n0.25,0.5,0.75\n',
    args: forces(),
    says: ['in.csv', 'line 3 (particle 0)', 'line 6 (particle 2)', 'sit at the same position;', '--softening'],
  },
  {
    what: 'coincident particles in a run big enough for worker threads',
    input: MANY_WITH_DUPLICATE,
    args: forces('--threads', '2'),
    says: ['in.csv', 'line 7 (particle 5)', 'line 2102 (particle 2100)', 'same position'],
  },
  { what: 'particles that coincide only after wrapping', input: 'x,y,z\n0,0.5,0\n0.3,0.3,0.3\n1,1.5,-1\n', args: forces(), says: ['line 2 (particle 0)', 'line 4 (particle 2)', 'same position (after wrapping into the box)'] },
  { what: 'a missing file', input: null, args: forces(), says: ['cannot read', 'in.csv', 'no such file'] },
  { what: 'a folder given as the snapshot', input: null, args: ['forces', '.', '--box', '1', '--out', 'OUT'], says: ['cannot read', 'folder'] },
  { what: 'no snapshot file', input: GOOD, args: ['forces', '--box', '1', '--out', 'OUT'], says: ['no snapshot file'] },
  { what: 'two snapshot files', input: GOOD, args: [...forces(), 'IN'], says: ['one snapshot file expected'] },
  { what: 'missing --out', input: GOOD, args: ['forces', 'IN', '--box', '1'], says: ['--out', 'required'] },
  { what: 'missing --box', input: GOOD, args: ['forces', 'IN', '--out', 'OUT'], says: ['--box', 'required'] },
  { what: '--out in a folder that does not exist', input: GOOD, args: ['forces', 'IN', '--box', '1', '--out', 'nowhere/out.csv'], says: ['--out', 'does not exist'] },
  { what: '--out naming the input file', input: GOOD, args: ['forces', 'IN', '--box', '1', '--out', 'IN'], says: ['--out', 'input file'] },
  { what: '--box 0', input: GOOD, args: ['forces', 'IN', '--box', '0', '--out', 'OUT'], says: ['--box', 'L', '> 0'] },
  { what: '--box -1', input: GOOD, args: ['forces', 'IN', '--box', '-1', '--out', 'OUT'], says: ['--box', '> 0'] },
  { what: '--box with one side 0', input: GOOD, args: ['forces', 'IN', '--box', '1,0,1', '--out', 'OUT'], says: ['--box', 'Ly', '> 0'] },
  { what: '--box with two sides', input: GOOD, args: ['forces', 'IN', '--box', '1,2', '--out', 'OUT'], says: ['--box', 'three sides'] },
  { what: '--box not a number', input: GOOD, args: ['forces', 'IN', '--box', 'big', '--out', 'OUT'], says: ['--box', '"big"', 'not a finite number'] },
  { what: '--tol 0', input: GOOD, args: forces('--tol', '0'), says: ['--tol', 'between 0 and 1'] },
  { what: '--tol 1', input: GOOD, args: forces('--tol', '1'), says: ['--tol', 'between 0 and 1'] },
  { what: '--tol 2', input: GOOD, args: forces('--tol', '2'), says: ['--tol', 'between 0 and 1'] },
  { what: '--tol -1e-6', input: GOOD, args: forces('--tol', '-1e-6'), says: ['--tol', 'between 0 and 1'] },
  { what: '--tol NaN', input: GOOD, args: forces('--tol', 'NaN'), says: ['--tol', 'not a finite number'] },
  { what: '--G 0', input: GOOD, args: forces('--G', '0'), says: ['--G', '> 0'] },
  { what: '--targets 0', input: GOOD, args: forces('--targets', '0'), says: ['--targets', 'positive integer'] },
  { what: '--targets 1.5', input: GOOD, args: forces('--targets', '1.5'), says: ['--targets', 'positive integer'] },
  { what: '--sample 0', input: GOOD, args: forces('--sample', '0'), says: ['--sample', 'integer'] },
  { what: '--seed without --sample', input: GOOD, args: forces('--seed', '3'), says: ['--seed', '--sample'] },
  { what: '--targets with --sample', input: GOOD, args: forces('--targets', '2', '--sample', '2'), says: ['--targets', '--sample'] },
  { what: '--seed not an integer', input: GOOD, args: forces('--sample', '2', '--seed', '1.5'), says: ['--seed', 'integer'] },
  { what: '--threads 0', input: GOOD, args: forces('--threads', '0'), says: ['--threads', 'integer'] },
  { what: '--softening of an unknown kind', input: GOOD, args: forces('--softening', 'gauss:1'), says: ['--softening', 'plummer:EPS'] },
  { what: '--softening plummer:0', input: GOOD, args: forces('--softening', 'plummer:0'), says: ['--softening', '> 0'] },
  { what: 'an unknown option', input: GOOD, args: forces('--frobnicate', '3'), says: ['unknown option --frobnicate', '--help'] },
  { what: 'a single-dash option', input: GOOD, args: forces('-t'), says: ['unknown option -t'] },
  { what: 'an option given twice', input: GOOD, args: forces('--tol', '1e-3', '--tol', '1e-4'), says: ['--tol', 'twice'] },
  { what: 'an option without its value', input: GOOD, args: ['forces', 'IN', '--out', 'OUT', '--box'], says: ['--box', 'needs a value'] },
  { what: 'an unknown command', input: GOOD, args: ['force', 'IN'], says: ['unknown command', '"force"'] },
  { what: 'demo --n 0', input: null, args: ['demo', '--n', '0', '--out', 'OUT'], says: ['--n', 'integer'] },
  { what: 'demo without --out', input: null, args: ['demo', '--n', '10'], says: ['--out', 'required'] },
  { what: 'demo with an unknown option', input: null, args: ['demo', '--box', '1', '--out', 'OUT'], says: ['unknown option --box'] },
];

describe('bad input: exit 2, one line naming file/row/column, no output file', () => {
  for (const c of CASES) {
    it(c.what, () => {
      const dir = tempDir();
      const inPath = join(dir, 'in.csv');
      if (c.input !== null) writeFileSync(inPath, c.input);
      const fresh = join(dir, 'fresh.csv');
      const args = (out: string) => c.args.map((a) => (a === 'IN' ? inPath : a === 'OUT' ? out : a));
      // 1) --out does not exist yet: it must not appear.
      const r = cli(args(fresh), dir);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      const lines = r.stderr.split('\n').filter((l) => l.length > 0);
      expect(lines.length, r.stderr).toBe(1);
      expect(lines[0].startsWith('torusgrav: ')).toBe(true);
      for (const s of c.says) expect(lines[0]).toContain(s);
      const before = readdirSync(dir).sort();
      expect(before).not.toContain('fresh.csv');
      // 2) --out exists: it stays as it was, and no temp file is left beside it.
      const kept = join(dir, 'kept.csv');
      writeFileSync(kept, SENTINEL);
      const r2 = cli(args(kept), dir);
      expect(r2.code).toBe(2);
      expect(readFileSync(kept, 'utf8')).toBe(SENTINEL);
      expect(readdirSync(dir).sort()).toEqual([...before, 'kept.csv'].sort());
    });
  }

  it('a good run next to these cases succeeds (the fixture itself is fine)', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'in.csv'), GOOD);
    mkdirSync(join(dir, 'sub'));
    const r = cli(['forces', join(dir, 'in.csv'), '--box', '1', '--out', join(dir, 'sub', 'out.csv')], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(join(dir, 'sub', 'out.csv'), 'utf8').split('\n')[0]).toBe('id,ax,ay,az,phi');
    expect(readdirSync(join(dir, 'sub'))).toEqual(['out.csv']);
  });
});
