/**
 * `torusgrav check`, the force-accuracy gate: exit codes (0 pass, 1 a requirement fails, 2 bad input),
 * the JSON report (schema torusgrav.check/1) against engine/stats computed in this process on the same
 * data, and the residuals CSV. The file's accelerations are the engine's Ewald accelerations with seeded
 * per-component relative noise (our own invention), so the errors are of a known size (~0.3%).
 * Whether percentileLinear itself follows its published definition is tested with engine/stats.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { errorSummary, percentileLinear, relativeErrors, sortedFinite } from '../../engine/stats';
import { randomSeeded } from '../../engine/util/random';
import { targetsResolve } from '../../engine/targets';
import { maxVectorRelativeError, pickRows } from '../helpers/tolerance';
import { shortNumber } from '../../app/web/plots/svg';
import { ROOT, cli, cliEnsureBuilt, csvParseSimple, tempDir, tempDirsRemove } from './cliHarness';

const N = 200;
let dir: string;
let input: string;
let accA: Float64Array;
let accB: Float64Array;

beforeAll(() => {
  cliEnsureBuilt();
  dir = tempDir();
  input = join(dir, 'sim.csv');
  const demo = demoSnapshot(N, 6);
  // The reference at the CLI's default tolerance; the noise (~3e-3) dwarfs its error (~1e-7).
  accB = ewaldForces(demo.positions, demo.masses, { lx: 1, ly: 1, lz: 1 }, null, { tol: 1e-7 }).acc;
  const rand = randomSeeded(11);
  accA = Float64Array.from(accB, (a) => a * (1 + 0.006 * (rand() - 0.5)));
  const lines = ['x,y,z,m,gx,gy,gz'];
  for (let i = 0; i < N; i++) {
    const p = [demo.positions[3 * i], demo.positions[3 * i + 1], demo.positions[3 * i + 2], demo.masses[i], accA[3 * i], accA[3 * i + 1], accA[3 * i + 2]];
    lines.push(p.map((v) => v.toPrecision(17)).join(','));
  }
  writeFileSync(input, lines.join('\n') + '\n');
});

afterAll(tempDirsRemove);

const base = (json: string, ...extra: string[]) => ['check', input, '--box', '1', '--accelerations', 'gx,gy,gz', '--threads', '1', '--json', json, ...extra];

describe('torusgrav check', () => {
  it('passes (exit 0) when every requirement holds; JSON figures equal engine/stats on the same data', () => {
    const json = join(dir, 'pass.json');
    const residuals = join(dir, 'res.csv');
    const r = cli(base(json, '--require', 'p99<=0.01', '--require', 'max < 0.05', '--residuals', residuals));
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/p99 [0-9.e-]+/);
    expect(r.stdout).toContain('result: PASS');
    const report = JSON.parse(readFileSync(json, 'utf8'));
    expect(report.schema).toBe('torusgrav.check/1');
    expect(report.sha256).toBe(createHash('sha256').update(readFileSync(input)).digest('hex'));
    expect(report.n).toBe(N);
    expect(report.targets).toBe(N);
    expect(report.box).toEqual({ lx: 1, ly: 1, lz: 1 });
    expect(report.G).toBe(1);
    expect(report.reference.method).toBe('ewald');
    expect(report.pass).toBe(true);
    expect(report.sha256Of).toBe('file');
    expect(report.compared).toEqual({ method: 'file', accelerations: 'gx,gy,gz' });
    expect(report.version).toBe(JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')).version);
    expect(report.undefinedTargets).toEqual({ zeroReference: 0, nonFinite: 0 });

    // The residuals hold A (the file) and B (the reference) to 17 digits; B is the engine's Ewald result.
    const { header, rows } = csvParseSimple(readFileSync(residuals, 'utf8'));
    expect(header).toEqual(['id', 'x', 'y', 'z', 'ax_A', 'ay_A', 'az_A', 'ax_B', 'ay_B', 'az_B', 'rel_error']);
    expect(rows.map((row) => row[0])).toEqual(Array.from({ length: N }, (_, i) => i));
    const A = Float64Array.from(rows.flatMap((row) => row.slice(4, 7)));
    const B = Float64Array.from(rows.flatMap((row) => row.slice(7, 10)));
    expect(A).toEqual(accA);
    expect(maxVectorRelativeError(B, accB)).toBeLessThan(1e-12);

    // Every figure from engine/stats on the same A and B.
    const rel = relativeErrors(A, B);
    const sorted = sortedFinite(rel);
    const s = errorSummary(A, B, 10);
    expect(Float64Array.from(rows.map((row) => row[10]))).toEqual(rel);
    const e = report.relativeError;
    expect(e.p99).toBe(percentileLinear(sorted, 0.99));
    expect(e.p50).toBe(percentileLinear(sorted, 0.5));
    expect(e.p90).toBe(percentileLinear(sorted, 0.9));
    expect(e.p999).toBe(percentileLinear(sorted, 0.999));
    expect(e.max).toBe(sorted[sorted.length - 1]);
    expect(e.rms).toBeCloseTo(Math.sqrt(sorted.reduce((t, v) => t + v * v, 0) / sorted.length), 15);
    expect(report.rmsErrorOverRmsAcceleration).toBe(s.rmsRatio);
    expect(report.worst.map((w: { id: number }) => w.id)).toEqual(Array.from(s.worst));
    expect(report.worst[0].relErr).toBe(e.max);
    expect(report.rmsError).toBe(s.rmsError);
    expect(report.rmsReference).toBe(s.rmsReference);
    // Noise uniform in ±0.3% per component: relative errors below 0.3%·√3 and far above the reference error.
    expect(e.max).toBeLessThan(0.003 * Math.sqrt(3));
    expect(e.p50).toBeGreaterThan(1e-4);
    expect(report.requirements).toEqual([
      { text: 'p99<=0.01', key: 'p99', op: '<=', limit: 0.01, value: e.p99, pass: true },
      { text: 'max < 0.05', key: 'max', op: '<', limit: 0.05, value: e.max, pass: true },
    ]);
  });

  it('fails (exit 1) when a requirement does not hold, and still writes the report', () => {
    const json = join(dir, 'fail.json');
    const r = cli(base(json, '--require', 'p99<=0.01', '--require', 'p50<1e-4'));
    expect(r.code, r.stderr).toBe(1);
    expect(r.stdout).toContain('FAIL  p50 < 0.0001');
    expect(r.stdout).toContain('result: FAIL');
    const report = JSON.parse(readFileSync(json, 'utf8'));
    expect(report.pass).toBe(false);
    expect(report.requirements.map((q: { pass: boolean }) => q.pass)).toEqual([true, false]);
  });

  it('--sample checks a seeded subsample: p99 is percentileLinear of those targets\' relative errors', () => {
    const json = join(dir, 'sample.json');
    const residuals = join(dir, 'sample-res.csv');
    const r = cli(base(json, '--sample', '50', '--seed', '3', '--require', 'p999>=0', '--residuals', residuals));
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(readFileSync(json, 'utf8'));
    expect(report.targets).toBe(50);
    expect(report.pass).toBe(true);
    // The targets are the engine's seeded draw; A and B as the CLI used them come from the residuals
    // (the reference for a subset has its own Ewald parameters, so it differs from accB at the 1e-8 level).
    const { rows } = csvParseSimple(readFileSync(residuals, 'utf8'));
    const picked = targetsResolve({ kind: 'sample', count: 50, seed: 3 }, N);
    expect(rows.map((row) => row[0])).toEqual(Array.from(picked));
    const A = Float64Array.from(rows.flatMap((row) => row.slice(4, 7)));
    const B = Float64Array.from(rows.flatMap((row) => row.slice(7, 10)));
    expect(A).toEqual(pickRows(accA, picked, 3));
    // Both references meet tol 1e-7 against the exact sum, so they agree far inside 1e-6.
    expect(maxVectorRelativeError(B, pickRows(accB, picked, 3))).toBeLessThan(1e-6);
    expect(report.relativeError.p99).toBe(percentileLinear(sortedFinite(relativeErrors(A, B)), 0.99));
  });

  it('help lists every option and the exit codes', () => {
    const r = cli(['check', '--help']);
    expect(r.code).toBe(0);
    for (const o of ['--box', '--accelerations', '--reference', '--tol', '--sample', '--seed', '--require', '--json', '--residuals', '--svg']) expect(r.stdout).toMatch(new RegExp(`^\\s+${o}\\b`, 'm'));
    expect(r.stdout).toContain('torusgrav.check/1');
    expect(r.stdout).toContain('1 a requirement fails');
  });

  it('--svg DIR writes the distribution and the error-against-|a_ref| and -neighbour-distance plots as SVG, with the report\'s numbers', () => {
    const json = join(dir, 'svg.json');
    const out = join(dir, 'plots', 'nested');
    const r = cli(base(json, '--require', 'p99<=0.01', '--svg', out));
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual(['distribution.svg', 'error-vs-acceleration.svg', 'error-vs-neighbour-distance.svg']);
    const report = JSON.parse(readFileSync(json, 'utf8'));
    for (const name of readdirSync(out)) {
      const svg = readFileSync(join(out, name), 'utf8');
      // one svg root in the SVG namespace, with its size, and balanced elements (well-formed)
      expect(svg).toMatch(/^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="560" height="340" viewBox="0 0 560 340"/);
      expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
      const stack: string[] = [];
      for (const m of svg.matchAll(/<(\/?)([a-zA-Z][\w-]*)[^>]*?(\/?)>/g)) {
        if (m[1]) expect(stack.pop(), `${name}: </${m[2]}>`).toBe(m[2]);
        else if (!m[3]) stack.push(m[2]);
      }
      expect(stack, name).toEqual([]);
      expect(svg).not.toMatch(/NaN|undefined|Infinity/);
    }
    // the distribution marks the percentiles and the max of the JSON report
    const dist = readFileSync(join(out, 'distribution.svg'), 'utf8');
    const e = report.relativeError;
    for (const [label, v] of [['50 %', e.p50], ['90 %', e.p90], ['99 %', e.p99], ['99.9 %', e.p999], ['max', e.max]] as const) expect(dist).toContain(`>${label} ${shortNumber(v)}</text>`);
    expect(dist).toContain('|a_file − a_ref|');
    // the scatter plots draw one dot per target (N = 200 is below the binning threshold)
    for (const name of ['error-vs-acceleration.svg', 'error-vs-neighbour-distance.svg']) {
      const svg = readFileSync(join(out, name), 'utf8');
      const points = /<g data-part="points" data-count="(\d+)"><path d="([^"]*)"/.exec(svg);
      expect(points, name).not.toBeNull();
      expect(Number(points![1])).toBe(N);
      expect(points![2].match(/M/g)!.length).toBe(N);
    }
  });

  it('--svg naming an existing file is bad input (exit 2, nothing written)', () => {
    const json = join(dir, 'svg-bad.json');
    const file = join(dir, 'a-file.txt');
    writeFileSync(file, 'x');
    const r = cli(base(json, '--require', 'p99<=0.01', '--svg', file));
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toContain('--svg');
    expect(existsSync(json)).toBe(false);
  });

  const BAD: readonly { what: string; args: (json: string) => string[]; says: string[] }[] = [
    { what: 'a missing file', args: (j) => ['check', join(dir, 'none.csv'), '--box', '1', '--accelerations', 'gx,gy,gz', '--require', 'p99<=0.01', '--json', j], says: ['none.csv'] },
    { what: 'an unknown column', args: (j) => base(j, '--require', 'p99<=0.01').map((a) => (a === 'gx,gy,gz' ? 'gx,gy,bz' : a)), says: ['sim.csv', 'column "bz"'] },
    { what: 'an unknown key', args: (j) => base(j, '--require', 'p95<=0.01'), says: ['--require', 'unknown key "p95"'] },
    { what: 'an unknown operator', args: (j) => base(j, '--require', 'p99=0.01'), says: ['--require', 'KEY OP LIMIT'] },
    { what: 'a non-finite limit', args: (j) => base(j, '--require', 'max<=inf'), says: ['--require', 'not a finite number'] },
    { what: 'no requirement', args: (j) => base(j), says: ['at least one --require'] },
    { what: 'an unknown reference', args: (j) => base(j, '--require', 'p99<=1', '--reference', 'direct'), says: ['--reference', 'only reference is ewald'] },
    { what: 'no --accelerations', args: (j) => ['check', input, '--box', '1', '--require', 'p99<=1', '--json', j], says: ['--accelerations SPEC is required'] },
  ];
  for (const c of BAD) {
    it(`bad input: ${c.what} → exit 2, one line, no report`, () => {
      const json = join(dir, `bad-${c.what.replace(/\W+/g, '-')}.json`);
      const r = cli(c.args(json));
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      const lines = r.stderr.split('\n').filter((l) => l.length > 0);
      expect(lines.length, r.stderr).toBe(1);
      for (const s of c.says) expect(lines[0]).toContain(s);
      expect(existsSync(json)).toBe(false);
    });
  }
});
