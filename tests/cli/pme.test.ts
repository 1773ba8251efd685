/**
 * `torusgrav forces --method pme`: the built command line against the Ewald method of the same command
 * (direct Ewald at tol 1e-9 as the reference), threads 1 against 2, target subsets, help, bad options.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cli, cliEnsureBuilt, cliSpawn, forcesOutput, tempDir, tempDirsRemove } from './cliHarness';

let dir = '';
let small = '';
let medium = '';

beforeAll(() => {
  cliEnsureBuilt();
  dir = tempDir();
  small = join(dir, 'small.csv');
  medium = join(dir, 'medium.csv');
  expect(cli(['demo', '--n', '3000', '--seed', '5', '--out', small], dir).code).toBe(0);
  expect(cli(['demo', '--n', '12000', '--seed', '6', '--out', medium], dir).code).toBe(0);
});
afterAll(tempDirsRemove);

function run(args: string[]): ReturnType<typeof forcesOutput> {
  const out = join(dir, `out-${Math.random().toString(36).slice(2)}.csv`);
  const r = cli(['forces', ...args, '--out', out], dir);
  expect(r.code, r.stderr).toBe(0);
  return forcesOutput(readFileSync(out, 'utf8'));
}

/** rms over rows of |a − b|/|b| (accelerations), and rms |φ − φ_b| over rms |φ_b|. */
function rmsErrors(a: ReturnType<typeof forcesOutput>, b: ReturnType<typeof forcesOutput>): { acc: number; phi: number } {
  let s = 0, dp = 0, pp = 0;
  const n = b.ids.length;
  for (let i = 0; i < n; i++) {
    let num = 0, den = 0;
    for (let d = 0; d < 3; d++) {
      num += (a.acc[3 * i + d] - b.acc[3 * i + d]) ** 2;
      den += b.acc[3 * i + d] ** 2;
    }
    s += num / den;
    dp += (a.phi[i] - b.phi[i]) ** 2;
    pp += b.phi[i] ** 2;
  }
  return { acc: Math.sqrt(s / n), phi: Math.sqrt(dp / pp) };
}

describe('forces --method pme', () => {
  // Rms relative error against direct Ewald on the same file: the promise --tol makes for pme.
  it.each([
    ['1', '1e-4'],
    ['1', '1e-6'],
    ['1,1,2', '1e-5'],
  ])('box %s, tol %s: rms relative error against direct Ewald below tol, same columns', (box, tol) => {
    const ref = run([small, '--box', box, '--tol', '1e-9']);
    const pme = run([small, '--box', box, '--method', 'pme', '--tol', tol]);
    expect(pme.header).toEqual(['id', 'ax', 'ay', 'az', 'phi']);
    expect(pme.ids).toEqual(ref.ids);
    const e = rmsErrors(pme, ref);
    expect(e.acc).toBeLessThan(Number(tol));
    // The potential comes from the same split (not covered by the promise): measured within tol here too.
    expect(e.phi).toBeLessThan(Number(tol));
    // …and the comparison can fail: a mesh far too coarse for the tolerance is far off.
    if (tol === '1e-6') {
      const coarse = run([small, '--box', box, '--method', 'pme', '--mesh', '8', '--order', '4', '--alpha', '10', '--rcut', '0.1']);
      expect(rmsErrors(coarse, ref).acc).toBeGreaterThan(1e-3);
    }
  });

  it('two threads give the forces of one thread to ~1e-12 relative; --targets writes those rows of the same run', () => {
    const one = run([medium, '--box', '1', '--method', 'pme', '--tol', '1e-5', '--threads', '1']);
    const r = cli(['forces', medium, '--box', '1', '--method', 'pme', '--tol', '1e-5', '--threads', '2', '--out', join(dir, 'two.csv')], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('on 2 threads');
    expect(r.stderr).toMatch(/mesh=\d+x\d+x\d+ order=\d/);
    const two = forcesOutput(readFileSync(join(dir, 'two.csv'), 'utf8'));
    let worst = 0;
    for (let i = 0; i < one.ids.length; i++) {
      const a = Math.hypot(one.acc[3 * i], one.acc[3 * i + 1], one.acc[3 * i + 2]);
      const d = Math.hypot(two.acc[3 * i] - one.acc[3 * i], two.acc[3 * i + 1] - one.acc[3 * i + 1], two.acc[3 * i + 2] - one.acc[3 * i + 2]);
      worst = Math.max(worst, d / a, Math.abs(two.phi[i] - one.phi[i]) / Math.abs(one.phi[i]));
    }
    expect(worst).toBeLessThan(1e-12);
    const first = run([medium, '--box', '1', '--method', 'pme', '--tol', '1e-5', '--threads', '2', '--targets', '50']);
    expect(first.ids).toEqual(one.ids.slice(0, 50));
    for (let k = 0; k < 150; k++) expect(Math.abs(first.acc[k] - one.acc[k])).toBeLessThanOrEqual(1e-12 * Math.abs(one.acc[k]) + 1e-300);
  });

  it('help says that the pme tolerance is an rms and lists the overrides', () => {
    const r = cli(['forces', '--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('ewald|direct|pme');
    expect(r.stdout).toMatch(/With --method pme T is an rms/);
    for (const o of ['--mesh', '--alpha', '--rcut']) expect(r.stdout).toContain(o);
  });

  it.each([
    [['--mesh', '7'], '--mesh: 7 has a prime factor'],
    [['--mesh', '64,64'], '--mesh takes one number M or three'],
    [['--mesh', '45'], 'first side must be even'],
    [['--order', 'cube'], '--order'],
    [['--order', '1'], '--order must be an integer from 2 to 12'],
    [['--mesh', '8', '--order', '10'], 'fewer points per side than --order 10'],
    [['--alpha', '-1'], '--alpha must be > 0'],
    [['--rcut', 'x'], '--rcut: "x" is not a finite number'],
    [['--tol', '2'], '--tol must lie strictly between 0 and 1'],
    [['--shells', '3'], '--shells applies to --method direct only'],
  ])('bad option %j: one line, exit 2', (extra, says) => {
    const r = cli(['forces', small, '--box', '1', '--method', 'pme', ...extra, '--out', join(dir, 'never.csv')], dir);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(says);
  });

  it('pme-only options with another method: exit 2', () => {
    const r = cli(['forces', small, '--box', '1', '--mesh', '64', '--out', join(dir, 'never.csv')], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--mesh applies to --method pme only');
    const m = cli(['forces', small, '--box', '1', '--method', 'pm', '--out', join(dir, 'never.csv')], dir);
    expect(m.code).toBe(2);
    expect(m.stderr).toContain('--method must be ewald, direct or pme');
  });

  it('SIGINT during the computation on two threads stops the run and leaves no file', async () => {
    const own = tempDir();
    const snap = join(own, 'snap.csv');
    expect(cli(['demo', '--n', '60000', '--seed', '4', '--out', snap], own).code).toBe(0);
    const out = join(own, 'forces.csv');
    // Tight enough to run for many seconds on any machine, so the interrupt lands mid-run.
    const child = cliSpawn(['forces', snap, '--box', '1', '--method', 'pme', '--tol', '1e-9', '--threads', '2', '--out', out], own);
    const done = new Promise<{ signal: NodeJS.Signals | null }>((resolve) => child.on('exit', (_code, signal) => resolve({ signal })));
    await new Promise((r) => setTimeout(r, 1500));
    expect(child.exitCode, 'the run finished before it could be interrupted').toBeNull();
    child.kill('SIGINT');
    expect((await done).signal).toBe('SIGINT');
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(own)).toEqual(['snap.csv']);
  });
});
