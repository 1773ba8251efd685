/**
 * Summation orders on the command line: `torusgrav converge` and `torusgrav forces --method direct`
 * against the engine's imageSumOrder run in this process on the same snapshot (the demo CSV has 17
 * significant digits, so both read bit-identical inputs; 1e-12 relative leaves room for nothing but
 * rounding), their help, and every bad-input path (exit 2, one line, no output file).
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CONVERGE_OPTIONS } from '../../app/cli/convergeCommand';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { type ImageSumOptions, imageSumOrder } from '../../engine/orders';
import { maxVectorRelativeError } from '../helpers/tolerance';
import { cli, cliEnsureBuilt, csvParseSimple, tempDir, tempDirsRemove } from './cliHarness';

const N = 96;
const SEED = 4;
const BOX = { lx: 1, ly: 1, lz: 1 };
let dir: string;
let demoPath: string;
let demo: ReturnType<typeof demoSnapshot>;

beforeAll(() => {
  cliEnsureBuilt();
  dir = tempDir();
  demoPath = join(dir, 'demo.csv');
  const d = cli(['demo', '--n', String(N), '--seed', String(SEED), '--out', demoPath]);
  expect(d.code, d.stderr).toBe(0);
  demo = demoSnapshot(N, SEED);
});

afterAll(tempDirsRemove);

interface ConvergeRow {
  readonly order: string;
  readonly shell: string;
  readonly id: number;
  readonly acc: [number, number, number];
}

/** The converge CSV (test-side reader): header and rows with the order and shell columns as text. */
function convergeRead(path: string): { header: string[]; rows: ConvergeRow[] } {
  const lines = readFileSync(path, 'utf8').split('\n').filter((l) => l.length > 0);
  return {
    header: lines[0].split(','),
    rows: lines.slice(1).map((l) => {
      const c = l.split(',');
      return { order: c[0], shell: c[1], id: Number(c[2]), acc: [Number(c[3]), Number(c[4]), Number(c[5])] };
    }),
  };
}

/** Runs converge with `args` and checks its rows against imageSumOrder(options) for `targets`. */
function convergeMatchesEngine(name: string, args: readonly string[], options: ImageSumOptions, targets: Int32Array): void {
  const out = join(dir, `${name}.csv`);
  const r = cli(['converge', demoPath, '--box', '1', ...args, '--out', out]);
  expect(r.code, r.stderr).toBe(0);
  const ref = imageSumOrder(demo.positions, demo.masses, BOX, targets, options);
  const { header, rows } = convergeRead(out);
  expect(header).toEqual(['order', 'shell', 'id', 'ax', 'ay', 'az']);
  const K = targets.length;
  const S = ref.partial.shell.length;
  const perTarget = S + (ref.limit ? 1 : 0);
  expect(rows.length).toBe(K * perTarget);
  const got = new Float64Array(S * K * 3);
  const gotLimit = new Float64Array(K * 3);
  for (let t = 0; t < K; t++) {
    for (let s = 0; s < S; s++) {
      const row = rows[t * perTarget + s];
      expect(row.order).toBe(options.order);
      expect(row.id).toBe(targets[t]);
      expect(Number(row.shell)).toBe(ref.partial.shell[s]);
      got.set(row.acc, (s * K + t) * 3);
    }
    if (ref.limit) {
      const last = rows[t * perTarget + S];
      expect(last.shell).toBe('limit');
      expect(last.id).toBe(targets[t]);
      gotLimit.set(last.acc, 3 * t);
    }
  }
  expect(maxVectorRelativeError(got, ref.partial.acc)).toBeLessThan(1e-12);
  if (ref.limit) expect(maxVectorRelativeError(gotLimit, ref.limit)).toBeLessThan(1e-12);
  else expect(rows.some((row) => row.shell === 'limit')).toBe(false);
}

describe('torusgrav converge', () => {
  it('sphere: rows R = 0..R per target, then a limit row; values equal imageSumOrder to 1e-12', () => {
    const targets = Int32Array.from({ length: 5 }, (_, i) => i);
    convergeMatchesEngine('sphere', ['--order', 'sphere', '--shells', '3', '--targets', '5'], { order: 'sphere', shells: 3 }, targets);
  });

  it('cube without background, seeded sample: values equal imageSumOrder to 1e-12', () => {
    // The same seeded draw as torusgrav forces --sample (engine/targets targetsResolve).
    const out = join(dir, 'pick.csv');
    const r = cli(['forces', demoPath, '--box', '1', '--sample', '4', '--seed', '9', '--threads', '1', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const targets = Int32Array.from(csvParseSimple(readFileSync(out, 'utf8')).rows.map((row) => row[0]));
    expect(targets.length).toBe(4);
    convergeMatchesEngine('cube', ['--order', 'cube', '--shells', '2', '--no-background', '--sample', '4', '--seed', '9'], { order: 'cube', shells: 2, background: false }, targets);
  });

  it('screened with --lambdas: one row per λ, then the limit; values equal imageSumOrder to 1e-12', () => {
    const targets = Int32Array.from({ length: 3 }, (_, i) => i);
    convergeMatchesEngine('screened', ['--order', 'screened', '--lambdas', '2,1,0.5', '--targets', '3'], { order: 'screened', lambdas: [2, 1, 0.5] }, targets);
  });

  it('nearest: one row per target (shell 0) and no limit row', () => {
    const targets = Int32Array.from({ length: 4 }, (_, i) => i);
    convergeMatchesEngine('nearest', ['--order', 'nearest', '--targets', '4'], { order: 'nearest' }, targets);
  });

  it('defaults to the first 64 targets', () => {
    const out = join(dir, 'default.csv');
    const r = cli(['converge', demoPath, '--box', '1', '--order', 'slab-z', '--shells', '1', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const { rows } = convergeRead(out);
    expect(rows.length).toBe(64 * 3);
    expect([...new Set(rows.map((row) => row.id))]).toEqual(Array.from({ length: 64 }, (_, i) => i));
  });
});

describe('torusgrav forces --method direct', () => {
  it('--order sphere: header id,ax,ay,az and the engine\'s final partial sum to 1e-12', () => {
    const out = join(dir, 'direct.csv');
    const r = cli(['forces', demoPath, '--box', '1', '--method', 'direct', '--order', 'sphere', '--shells', '2', '--targets', '16', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const { header, rows } = csvParseSimple(readFileSync(out, 'utf8'));
    expect(header).toEqual(['id', 'ax', 'ay', 'az']);
    const targets = Int32Array.from({ length: 16 }, (_, i) => i);
    const ref = imageSumOrder(demo.positions, demo.masses, BOX, targets, { order: 'sphere', shells: 2 });
    expect(rows.map((row) => row[0])).toEqual(Array.from(targets));
    // The final partial sum is the last row of the partial table (shell R = 2).
    const last = ref.partial.acc.subarray(2 * 16 * 3, 3 * 16 * 3);
    expect(maxVectorRelativeError(Float64Array.from(rows.flatMap((row) => row.slice(1, 4))), last)).toBeLessThan(1e-12);
  });

  it('--order screened: the λ → 0 extrapolation (result.acc) to 1e-12', () => {
    const out = join(dir, 'direct-screened.csv');
    const r = cli(['forces', demoPath, '--box', '1', '--method', 'direct', '--order', 'screened', '--targets', '8', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const ref = imageSumOrder(demo.positions, demo.masses, BOX, Int32Array.from({ length: 8 }, (_, i) => i), { order: 'screened' });
    const { rows } = csvParseSimple(readFileSync(out, 'utf8'));
    expect(maxVectorRelativeError(Float64Array.from(rows.flatMap((row) => row.slice(1, 4))), ref.acc)).toBeLessThan(1e-12);
  });
});

describe('help', () => {
  it('forces --help lists --method and the order options and says direct writes id,ax,ay,az', () => {
    const r = cli(['forces', '--help']);
    expect(r.code).toBe(0);
    for (const o of ['--method', '--order', '--shells', '--no-background', '--lambdas', '--max-work']) expect(r.stdout).toMatch(new RegExp(`^\\s+${o}\\b`, 'm'));
    expect(r.stdout).toContain('id,ax,ay,az');
    expect(r.stdout).toContain('no phi column');
  });

  it('converge --help lists every option, the columns and the limit row', () => {
    const r = cli(['converge', '--help']);
    expect(r.code).toBe(0);
    const required = ['--box', '--order', '--shells', '--targets', '--sample', '--seed', '--no-background', '--lambdas', '--G', '--units', '--tol', '--max-work', '--out'];
    for (const o of [...required, ...CONVERGE_OPTIONS.map((s) => `--${s.name}`)]) expect(r.stdout).toMatch(new RegExp(`^\\s+${o}\\b`, 'm'));
    expect(r.stdout).toContain('order,shell,id,ax,ay,az');
    expect(r.stdout).toContain('"limit"');
    expect(r.stdout).toContain('Nearest has no limit row');
    expect(cli(['--help']).stdout).toContain('torusgrav converge SNAPSHOT');
  });
});

describe('bad input: exit 2, one line, nothing written', () => {
  const converge = (...a: string[]) => ['converge', 'IN', '--box', '1', ...a, '--out', 'OUT'];
  const direct = (...a: string[]) => ['forces', 'IN', '--box', '1', '--method', 'direct', ...a, '--out', 'OUT'];
  const CASES: readonly { what: string; args: string[]; says: string[] }[] = [
    { what: 'shells 0', args: converge('--order', 'sphere', '--shells', '0'), says: ['--shells', 'from 1 to 4096', 'got 0'] },
    { what: 'shells above 4096', args: converge('--order', 'cube', '--shells', '5000'), says: ['--shells', 'got 5000'] },
    { what: 'shells absurdly large for the work limit', args: converge('--order', 'sphere', '--shells', '4000'), says: ['shells 4000', 'on one core', '--max-work N'] },
    { what: 'a raised work limit still too small', args: converge('--order', 'sphere', '--shells', '4000', '--max-work', '1e9'), says: ['above --max-work 1.0e+9'] },
    { what: 'λ = 0', args: converge('--order', 'screened', '--lambdas', '1,0'), says: ['--lambdas', 'value 2', 'must be > 0'] },
    { what: 'λ < 0', args: converge('--order', 'screened', '--lambdas', '-1,2'), says: ['--lambdas', 'value 1', 'must be > 0'] },
    { what: 'a single λ', args: converge('--order', 'screened', '--lambdas', '1'), says: ['--lambdas', 'at least two'] },
    { what: 'an unknown order', args: converge('--order', 'spiral', '--shells', '2'), says: ['--order', 'unknown order "spiral"', 'sphere, cube'] },
    { what: 'converge without --order', args: converge('--shells', '2'), says: ['--order is required'] },
    { what: 'converge sphere without --shells', args: converge('--order', 'sphere'), says: ['--shells R is required'] },
    { what: '--shells for nearest', args: converge('--order', 'nearest', '--shells', '2'), says: ['--shells does not apply', 'nearest'] },
    { what: '--lambdas for sphere', args: converge('--order', 'sphere', '--shells', '2', '--lambdas', '1,2'), says: ['--lambdas applies to --order screened only'] },
    { what: 'converge --tol out of range', args: converge('--order', 'sphere', '--shells', '2', '--tol', '0.5'), says: ['--tol', '[1e-14, 1e-2]'] },
    { what: 'forces direct without --order', args: direct(), says: ['--order is required'] },
    { what: 'forces direct, unknown order', args: direct('--order', 'ring'), says: ['unknown order "ring"'] },
    { what: 'forces direct, shells 0', args: direct('--order', 'sphere', '--shells', '0'), says: ['--shells', 'got 0'] },
    { what: 'forces direct, absurd shells', args: direct('--order', 'sphere', '--shells', '4000'), says: ['on one core', '--max-work N'] },
    { what: 'forces direct, λ ≤ 0', args: direct('--order', 'screened', '--lambdas', '0,1'), says: ['--lambdas', 'must be > 0'] },
    { what: 'forces direct with Ewald-only options', args: direct('--order', 'cube', '--softening', 'plummer:0.01', '--threads', '2'), says: ['--softening, --threads', 'apply to --method ewald and pme only'] },
    { what: 'forces direct, engine --tol out of range', args: direct('--order', 'cube', '--shells', '1', '--tol', '0.5'), says: ['--tol must lie in [1e-14, 1e-2]'] },
    { what: 'order options with the Ewald method', args: ['forces', 'IN', '--box', '1', '--order', 'sphere', '--shells', '3', '--out', 'OUT'], says: ['--order, --shells', 'apply to --method direct only'] },
    { what: 'an unknown method', args: ['forces', 'IN', '--box', '1', '--method', 'fast', '--out', 'OUT'], says: ['--method must be ewald, direct or pme', '"fast"'] },
  ];
  for (const c of CASES) {
    it(c.what, () => {
      const out = join(dir, `bad-${c.what.replace(/\W+/g, '-')}.csv`);
      const r = cli(c.args.map((a) => (a === 'IN' ? demoPath : a === 'OUT' ? out : a)));
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      const lines = r.stderr.split('\n').filter((l) => l.length > 0);
      expect(lines.length, r.stderr).toBe(1);
      for (const s of c.says) expect(lines[0]).toContain(s);
      expect(existsSync(out)).toBe(false);
    });
  }
});
