/**
 * The built `torusgrav forces` and `torusgrav demo` against the engine run in this process.
 * Metrics (tests/helpers/tolerance.ts): accelerations by per-particle relative vector error; potentials
 * by the largest difference over the rms potential, because the zero-mean periodic potential crosses
 * zero, so a per-particle relative error of phi has no scale.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { targetsResolve } from '../../engine/targets';
import { maxScalarErrorOverRms, maxVectorRelativeError, pickRows } from '../helpers/tolerance';
import { cli, cliEnsureBuilt, csvParseSimple, forcesOutput, tempDir, tempDirsRemove } from './cliHarness';

/** Significant digits of a decimal numeral (leading zeros, sign, point and exponent dropped). */
function significantDigits(numeral: string): number {
  return numeral.replace(/[eE].*$/, '').replace(/[^0-9]/g, '').replace(/^0+/, '').length;
}

const N = 512;
const SEED = 3;
let dir: string;
let demoPath: string;
let all: ReturnType<typeof forcesOutput>;

beforeAll(() => {
  cliEnsureBuilt();
  dir = tempDir();
  demoPath = join(dir, 'demo.csv');
  const d = cli(['demo', '--n', String(N), '--seed', String(SEED), '--out', demoPath]);
  expect(d.code, d.stderr).toBe(0);
  const r = cli(['forces', demoPath, '--box', '1', '--threads', '1', '--out', join(dir, 'all.csv')]);
  expect(r.code, r.stderr).toBe(0);
  all = forcesOutput(readFileSync(join(dir, 'all.csv'), 'utf8'));
});

afterAll(tempDirsRemove);

describe('torusgrav demo', () => {
  it('writes the engine demo snapshot as x,y,z,m with 17 significant digits and prints "box 1" on stderr', () => {
    const demo = demoSnapshot(N, SEED);
    const { header, rows } = csvParseSimple(readFileSync(demoPath, 'utf8'));
    expect(header).toEqual(['x', 'y', 'z', 'm']);
    expect(rows.length).toBe(N);
    expect(Float64Array.from(rows.flatMap((r) => r.slice(0, 3)))).toEqual(demo.positions);
    expect(Float64Array.from(rows.map((r) => r[3]))).toEqual(demo.masses);
    const text = readFileSync(demoPath, 'utf8');
    const cells = text.split('\n').slice(1, 50).flatMap((l) => l.split(','));
    for (const c of cells) expect(significantDigits(c), c).toBe(17);
    const again = cli(['demo', '--n', '7', '--seed', '1', '--out', join(dir, 'd7.csv')]);
    expect(again.stderr.split('\n')).toContain('box 1');
  });
});

describe('torusgrav forces', () => {
  it('demo → forces: N rows, header id,ax,ay,az,phi, ids 0..N-1, values of ewaldForces to 1e-12', () => {
    expect(all.header).toEqual(['id', 'ax', 'ay', 'az', 'phi']);
    expect(all.ids).toEqual(Array.from({ length: N }, (_, i) => i));
    const demo = demoSnapshot(N, SEED);
    const ref = ewaldForces(demo.positions, demo.masses, { lx: 1, ly: 1, lz: 1 }, null, {});
    expect(maxVectorRelativeError(all.acc, ref.acc)).toBeLessThanOrEqual(1e-12);
    expect(maxScalarErrorOverRms(all.phi, ref.phi)).toBeLessThanOrEqual(1e-12);
  });

  it('prints a summary with N, targets, box, parameters, predicted error, time and threads', () => {
    const r = cli(['forces', demoPath, '--box', '1', '--threads', '1', '--out', join(dir, 'again.csv')]);
    expect(r.code).toBe(0);
    for (const word of ['N=512', 'targets: all 512', 'box 1', 'alpha=', 'rCut=', 'kCut=', 'k-vectors=', 'cells=', 'predicted rms force error', ' s ', '1 thread']) {
      expect(r.stderr).toContain(word);
    }
    expect(r.stdout).toBe('');
    expect(r.stderr).not.toContain('\r'); // no progress display when stderr is not a terminal
    expect(readFileSync(join(dir, 'again.csv'), 'utf8')).toBe(readFileSync(join(dir, 'all.csv'), 'utf8'));
  });

  /** The same targets run through the engine in this process: the CLI must pass targets and options on unchanged. */
  function expectEngineTargets(sub: ReturnType<typeof forcesOutput>, targets: Int32Array, tol: number) {
    const demo = demoSnapshot(N, SEED);
    const ref = ewaldForces(demo.positions, demo.masses, { lx: 1, ly: 1, lz: 1 }, targets, { tol });
    expect(sub.ids).toEqual(Array.from(ref.targets));
    expect(maxVectorRelativeError(sub.acc, ref.acc)).toBeLessThanOrEqual(1e-12);
    expect(maxScalarErrorOverRms(sub.phi, ref.phi)).toBeLessThanOrEqual(1e-12);
  }

  /**
   * Against the all-targets run (other α, cutoffs and loop): two results that each have relative error
   * ≤ tol differ by ≤ 2·tol per particle (triangle inequality); tol is what --help promises.
   */
  function expectNearAllRun(sub: ReturnType<typeof forcesOutput>, tol: number) {
    expect(maxVectorRelativeError(sub.acc, pickRows(all.acc, sub.ids, 3))).toBeLessThanOrEqual(2 * tol);
    expect(maxScalarErrorOverRms(sub.phi, pickRows(all.phi, sub.ids, 1))).toBeLessThanOrEqual(2 * tol);
  }

  it('--targets K: ids 0..K-1, the engine values for those targets, and the all-targets values to the tolerance', () => {
    const out = join(dir, 'first.csv');
    const r = cli(['forces', demoPath, '--box', '1', '--targets', '100', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('targets: the first 100');
    const sub = forcesOutput(readFileSync(out, 'utf8'));
    expect(sub.ids).toEqual(Array.from({ length: 100 }, (_, i) => i));
    expectEngineTargets(sub, targetsResolve({ kind: 'first', count: 100 }, N), 1e-6);
    expectNearAllRun(sub, 1e-6);
  });

  it('--sample K --seed S: the engine targetsResolve draw, reproducible, with the all-targets values to the tolerance', () => {
    const out = join(dir, 'sample.csv');
    const r = cli(['forces', demoPath, '--box', '1', '--sample', '50', '--seed', '9', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('targets: a random 50 (seed 9)');
    const sub = forcesOutput(readFileSync(out, 'utf8'));
    const drawn = targetsResolve({ kind: 'sample', count: 50, seed: 9 }, N);
    expect(sub.ids).toEqual(Array.from(drawn));
    expect(new Set(sub.ids).size).toBe(50);
    expectEngineTargets(sub, drawn, 1e-6);
    expectNearAllRun(sub, 1e-6);
    const other = cli(['forces', demoPath, '--box', '1', '--sample', '50', '--seed', '10', '--out', join(dir, 'sample10.csv')]);
    expect(other.code).toBe(0);
    expect(forcesOutput(readFileSync(join(dir, 'sample10.csv'), 'utf8')).ids).not.toEqual(sub.ids);
  });

  it('--targets K ≥ N and --sample K ≥ N give every particle', () => {
    for (const args of [['--targets', '9999'], ['--sample', '9999']]) {
      const out = join(dir, 'big.csv');
      expect(cli(['forces', demoPath, '--box', '1', ...args, '--out', out]).code).toBe(0);
      expect(forcesOutput(readFileSync(out, 'utf8')).ids).toEqual(all.ids);
    }
  });

  it('--G g scales accelerations and potentials by g exactly (the parameters do not depend on G)', () => {
    const out = join(dir, 'g2.csv');
    expect(cli(['forces', demoPath, '--box', '1', '--G', '2', '--out', out]).code).toBe(0);
    const g2 = forcesOutput(readFileSync(out, 'utf8'));
    expect(g2.acc).toEqual(all.acc.map((v) => 2 * v));
    expect(g2.phi).toEqual(all.phi.map((v) => 2 * v));
  });

  it('--box Lx,Ly,Lz, --softening and --tol reach the engine', () => {
    const demo = demoSnapshot(N, SEED);
    const cases = [
      { args: ['--box', '1,1.5,2', '--softening', 'spline:0.02'], box: { lx: 1, ly: 1.5, lz: 2 }, options: { softening: { kind: 'spline', h: 0.02 } as const }, says: ['box 1 x 1.5 x 2', 'softening spline h=0.02'] },
      { args: ['--box', '1', '--softening', 'plummer:0.01', '--tol', '1e-4'], box: { lx: 1, ly: 1, lz: 1 }, options: { softening: { kind: 'plummer', eps: 0.01 } as const, tol: 1e-4 }, says: ['softening plummer eps=0.01', 'tol=1e-4'] },
    ];
    for (const c of cases) {
      const out = join(dir, 'opt.csv');
      const r = cli(['forces', demoPath, ...c.args, '--out', out]);
      expect(r.code, r.stderr).toBe(0);
      for (const w of c.says) expect(r.stderr).toContain(w);
      const ref = ewaldForces(demo.positions, demo.masses, c.box, null, c.options);
      const got = forcesOutput(readFileSync(out, 'utf8'));
      expect(maxVectorRelativeError(got.acc, ref.acc)).toBeLessThanOrEqual(1e-12);
      expect(maxScalarErrorOverRms(got.phi, ref.phi)).toBeLessThanOrEqual(1e-12);
      // and it is not the unsoftened cube result
      expect(maxVectorRelativeError(got.acc, all.acc)).toBeGreaterThan(1e-3);
    }
  });

  it('--threads 1 and --threads 2 agree to 1e-12 (N = 3000, enough to use the worker threads)', () => {
    const d = join(dir, 'd3000.csv');
    expect(cli(['demo', '--n', '3000', '--seed', '2', '--out', d]).code).toBe(0);
    const one = cli(['forces', d, '--box', '1', '--tol', '1e-4', '--threads', '1', '--out', join(dir, 't1.csv')]);
    const two = cli(['forces', d, '--box', '1', '--tol', '1e-4', '--threads', '2', '--out', join(dir, 't2.csv')]);
    expect(one.code, one.stderr).toBe(0);
    expect(two.code, two.stderr).toBe(0);
    expect(two.stderr).toContain('on 2 threads');
    const a = forcesOutput(readFileSync(join(dir, 't1.csv'), 'utf8'));
    const b = forcesOutput(readFileSync(join(dir, 't2.csv'), 'utf8'));
    expect(b.ids).toEqual(a.ids);
    expect(maxVectorRelativeError(b.acc, a.acc)).toBeLessThanOrEqual(1e-12);
    expect(maxScalarErrorOverRms(b.phi, a.phi)).toBeLessThanOrEqual(1e-12);
  });

  it('wraps particles outside the box, says how many on stderr, and computes as if they were inside', () => {
    // Dyadic coordinates, so shifting by whole boxes and wrapping back is exact.
    const inside: number[][] = [];
    for (let i = 0; i < 40; i++) inside.push([((i * 37) % 64) / 64, ((i * 11) % 64) / 64, ((i * 23) % 64) / 64]);
    const shifts = [0, 1, -1, 0, 2, 0, -3, 0];
    const outside = inside.map((p, i) => (i % 8 === 1 || i % 8 === 2 || i % 8 === 4 || i % 8 === 6 ? [p[0] + shifts[i % 8], p[1], p[2] - shifts[i % 8]] : p));
    const write = (name: string, pts: number[][]) => writeFileSync(join(dir, name), 'x,y,z\n' + pts.map((p) => p.join(',')).join('\n') + '\n');
    write('inside.csv', inside);
    write('outside.csv', outside);
    const a = cli(['forces', join(dir, 'inside.csv'), '--box', '1', '--out', join(dir, 'fin.csv')]);
    const b = cli(['forces', join(dir, 'outside.csv'), '--box', '1', '--out', join(dir, 'fout.csv')]);
    expect(a.code, a.stderr).toBe(0);
    expect(b.code, b.stderr).toBe(0);
    expect(a.stderr).not.toContain('warning');
    expect(b.stderr).toMatch(/warning: 20 of 40 particles lie outside the box .* \(the first: .*outside\.csv line 3 \(particle 1\)\)/);
    expect(readFileSync(join(dir, 'fout.csv'), 'utf8')).toBe(readFileSync(join(dir, 'fin.csv'), 'utf8'));
  });

  it('coincident particles are fine with softening', () => {
    const f = join(dir, 'same.csv');
    writeFileSync(f, 'x,y,z\n0.5,0.5,0.5\n0.5,0.5,0.5\n0.1,0.2,0.3\n');
    const r = cli(['forces', f, '--box', '1', '--softening', 'spline:0.05', '--out', join(dir, 'same-out.csv')]);
    expect(r.code, r.stderr).toBe(0);
    expect(forcesOutput(readFileSync(join(dir, 'same-out.csv'), 'utf8')).ids).toEqual([0, 1, 2]);
  });
});
