/**
 * What the exported report says, on a real comparison (our coarse mesh against Ewald on a seeded demo):
 * the header rows, the statistics, the JSON summary (the CLI's schema torusgrav.check/1 and key names,
 * figures equal to engine/stats on the same accelerations) and the residuals CSV (A and B read back bit
 * for bit). The SHA-256 is checked against node:crypto (an independent implementation).
 */
import { createHash } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { boxMake } from '../../engine/box';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { errorReport } from '../../engine/stats/errorReport';
import { errorSummary, percentileLinear, relativeErrors, sortedFinite } from '../../engine/stats';
import { sha256Hex, snapshotDigest } from '../../app/web/report/fileDigest';
import { type ReportInput, paramsText, reportContent, reportResidualsCsv, reportSummary } from '../../app/web/report/reportContent';
import { formatNumber } from '../../app/web/format';
import { type AppState, appStateInitial } from '../../app/web/state/store';
import type { Comparison, MethodRun, Snapshot } from '../../app/web/state/types';

const N = 300;
let state: AppState;
let snapshot: Snapshot;
let accA: Float64Array;
let accB: Float64Array;
let alpha: number;

function run(method: 'ewald' | 'mesh', label: string, acc: Float64Array, ewald: MethodRun['ewald'], mesh: MethodRun['mesh']): MethodRun {
  return { key: `${method}|k`, method, label, targetsKey: 'all', acc, ewald, mesh, wrapped: 0, workerMs: 10 };
}

beforeAll(() => {
  const d = demoSnapshot(N, 3);
  const box = boxMake(1);
  snapshot = {
    id: `demo:${N}:3`,
    kind: 'demo',
    source: 'built-in demo “three knots and a thread”',
    fileName: null,
    seed: 3,
    n: N,
    positions: d.positions,
    masses: d.masses,
    box,
    boxGuessed: false,
    totalMass: 1,
    accelerations: null,
    accelerationColumns: null,
    ids: Float64Array.from({ length: N }, (_, i) => 5000 + 7 * i),
    columns: ['x', 'y', 'z'],
    outside: 0,
  } as Snapshot;
  const e = ewaldForces(d.positions, d.masses, box, null, { tol: 1e-6 });
  const m = meshForces(d.positions, d.masses, box, null, { mesh: 16 });
  accA = m.acc;
  accB = e.acc;
  alpha = e.params.alpha;
  const rep = errorReport(accA, accB, 20);
  const indices = Int32Array.from({ length: N }, (_, i) => i);
  const comparison: Comparison = {
    snapshotId: snapshot.id,
    runA: run('mesh', 'mesh 16³', accA, null, m.params),
    runB: run('ewald', 'Ewald tol 1e-6', accB, e.params, null),
    targets: { key: 'all', all: true, indices },
    relative: rep.relative,
    summary: rep.summary,
    histogram: rep.histogram,
    cdf: rep.cdf,
    neighbours: null,
    wallMs: 1234,
    workerMs: 1000,
  };
  state = { ...appStateInitial(), snapshot, comparison };
});

function input(extra: Partial<ReportInput> = {}): ReportInput {
  return {
    state,
    digest: { sha256: 'ab'.repeat(32), of: 'of the generated positions then masses' },
    version: '9.8.7',
    created: new Date('2026-12-02T08:30:05.123Z'),
    verdict: { key: 'p99', limit: '1 %' },
    link: 'http://localhost/?a=mesh',
    ...extra,
  };
}

describe('reportContent(input)', () => {
  it('header: snapshot, SHA-256 and what it is of, N, box, G, both methods with their chosen parameters, version and date', () => {
    const c = reportContent(input());
    const h = Object.fromEntries(c.header);
    expect(h.snapshot).toContain(`N ${N}, seed 3`);
    expect(h['SHA-256']).toBe(`${'ab'.repeat(32)} (of the generated positions then masses)`);
    expect(h['N, targets']).toContain(`all ${N} are targets`);
    expect(h.box).toBe('1 (cube)');
    expect(h['units and G']).toMatch(/^G = 1;/);
    expect(h['A (compared)']).toMatch(/^mesh 16³: 16³ mesh points, cells 0.0625 × 0.0625 × 0.0625/);
    expect(h['B (reference)']).toContain('tolerance 1e-6');
    expect(h['B (reference)']).toContain(`α = ${formatNumber(alpha)} /length`);
    expect(h['B (reference)']).toMatch(/predicted rms error .* relative/);
    expect(h['made by']).toBe('torusgrav 9.8.7, 2026-12-02T08:30:05.123Z');
    expect(c.fileBase).toBe('torusgrav-report-2026-12-02T08-30-05Z');
    expect(c.title).toContain('torusgrav');
  });

  it('statistics: percentiles by the linear rule, max and rms ratio of engine/stats, ids from the file', () => {
    const c = reportContent(input());
    const s = Object.fromEntries(c.stats);
    const sorted = sortedFinite(relativeErrors(accA, accB));
    expect(s['99th percentile']).toBe(formatNumber(percentileLinear(sorted, 0.99)));
    expect(s['median (p50)']).toBe(formatNumber(percentileLinear(sorted, 0.5)));
    expect(s.max).toBe(formatNumber(sorted[sorted.length - 1]));
    expect(s['rms error ÷ rms |a_B|']).toBe(formatNumber(errorSummary(accA, accB).rmsRatio));
    const worst = errorSummary(accA, accB, 10).worst;
    expect(s["worst 10 (id: error)"].startsWith(`${5000 + 7 * worst[0]}:\u00a0`)).toBe(true);
    expect(c.plots.map((p) => p.key)).toEqual(['distribution', 'vs-acc']);
  });

  it('verdict against the chosen figure and limit', () => {
    const p99 = percentileLinear(sortedFinite(relativeErrors(accA, accB)), 0.99);
    const c = reportContent(input({ verdict: { key: 'p99', limit: '1 %' } }));
    expect(c.verdict.result.pass).toBe(p99 <= 0.01);
    expect(c.verdict.text.startsWith('99th percentile ')).toBe(true);
  });

  it('throws a RangeError when there is no comparison of the loaded snapshot', () => {
    expect(() => reportContent(input({ state: { ...state, comparison: null } }))).toThrow(RangeError);
  });
});

describe('paramsText(record)', () => {
  it('writes every parameter: numbers to 4 digits, lists joined with ×, softening in words, nested records in brackets', () => {
    expect(paramsText({ shells: 8, cells: [2, 2, 4], alpha: 6.674199, softening: { kind: 'plummer', eps: 0.001 }, background: true, split: { a: 0.5 } })).toBe(
      'shells 8, cells 2×2×4, alpha 6.674, softening Plummer ε = 0.001, background true, split (a 0.5)',
    );
  });
});

describe('reportSummary(input, content)', () => {
  it("has the CLI's schema and keys, with figures equal to engine/stats on the same A and B", () => {
    const inp = input();
    const c = reportContent(inp);
    const j = reportSummary(inp, c, { width: 1200, height: 3000, pixelRatio: 2, regions: { view: { x: 1, y: 2, w: 3, h: 4 } } }) as Record<string, any>;
    // the keys of `torusgrav check --json` (README.md, "Force-accuracy gate"), in that order
    const cliKeys = ['schema', 'file', 'sha256', 'n', 'targets', 'box', 'G', 'units', 'reference', 'relativeError', 'rmsErrorOverRmsAcceleration', 'worst', 'requirements', 'pass'];
    expect(Object.keys(j).slice(0, cliKeys.length)).toEqual(cliKeys);
    expect(j.schema).toBe('torusgrav.check/1');
    expect(j.n).toBe(N);
    expect(j.targets).toBe(N);
    expect(j.box).toEqual({ lx: 1, ly: 1, lz: 1 });
    expect(j.G).toBe(1);
    expect(Object.keys(j.relativeError)).toEqual(['p50', 'p90', 'p99', 'p999', 'max', 'rms']);
    const sorted = sortedFinite(relativeErrors(accA, accB));
    for (const [k, q] of [['p50', 0.5], ['p90', 0.9], ['p99', 0.99], ['p999', 0.999]] as const) expect(j.relativeError[k]).toBe(percentileLinear(sorted, q));
    expect(j.relativeError.max).toBe(sorted[sorted.length - 1]);
    expect(j.relativeError.rms).toBeCloseTo(Math.sqrt(sorted.reduce((t, v) => t + v * v, 0) / sorted.length), 15);
    const s = errorSummary(accA, accB, 10);
    expect(j.rmsErrorOverRmsAcceleration).toBe(s.rmsRatio);
    expect(j.rmsError).toBe(s.rmsError);
    expect(j.rmsReference).toBe(s.rmsReference);
    expect(j.worst.map((w: { id: number }) => w.id)).toEqual(Array.from(s.worst, (t) => 5000 + 7 * t));
    expect(j.reference).toMatchObject({ method: 'ewald', tol: 1e-6, alpha });
    expect(j.compared).toMatchObject({ method: 'mesh', mesh: 16, assignment: 'cloud-in-cell' });
    expect(j.requirements).toEqual([{ text: 'p99<=0.01', key: 'p99', op: '<=', limit: 0.01, value: j.relativeError.p99, pass: j.relativeError.p99 <= 0.01 }]);
    expect(j.pass).toBe(j.requirements[0].pass);
    expect(j.version).toBe('9.8.7');
    expect(j.created).toBe('2026-12-02T08:30:05.123Z');
    expect(j.sha256Of).toBe('of the generated positions then masses');
    expect(j.timing).toEqual({ wallMs: 1234, workerMs: 1000 });
    expect(j.image).toMatchObject({ file: 'torusgrav-report-2026-12-02T08-30-05Z.png', width: 1200, pixelRatio: 2 });
    // JSON round trip keeps every number (no Infinity/NaN to lose)
    expect(JSON.parse(JSON.stringify(j)).relativeError).toEqual(j.relativeError);
  });
});

describe('reportResidualsCsv(state, figures)', () => {
  it('writes the header and one row per target; A, B and the relative error read back exactly', () => {
    const c = reportContent(input());
    const text = [...reportResidualsCsv(state, c.figures)].join('');
    const lines = text.trim().split('\n');
    expect(lines[0]).toBe('id,x,y,z,ax_A,ay_A,az_A,ax_B,ay_B,az_B,rel_error');
    expect(lines.length - 1).toBe(N);
    const rows = lines.slice(1).map((l) => l.split(',').map(Number));
    expect(rows.map((r) => r[0])).toEqual(Array.from({ length: N }, (_, i) => 5000 + 7 * i));
    expect(Float64Array.from(rows.flatMap((r) => r.slice(1, 4)))).toEqual(snapshot.positions);
    expect(Float64Array.from(rows.flatMap((r) => r.slice(4, 7)))).toEqual(accA);
    expect(Float64Array.from(rows.flatMap((r) => r.slice(7, 10)))).toEqual(accB);
    expect(Float64Array.from(rows.map((r) => r[10]))).toEqual(relativeErrors(accA, accB));
  });
});

describe('sha256Hex / snapshotDigest', () => {
  it('sha256Hex of several arrays equals node:crypto of their concatenated bytes', async () => {
    const a = Float64Array.of(1, 2.5, -3), b = Float64Array.of(0.125);
    const expected = createHash('sha256').update(Buffer.concat([Buffer.from(a.buffer), Buffer.from(b.buffer)])).digest('hex');
    expect(await sha256Hex([a, b])).toBe(expected);
    // FIPS 180-4 test vector: SHA-256("abc")
    expect(await sha256Hex([new TextEncoder().encode('abc')])).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('the demo is hashed as its positions then masses; a file never seen has no hash and says why', async () => {
    const d = await snapshotDigest(snapshot);
    expect(d.sha256).toBe(createHash('sha256').update(Buffer.concat([Buffer.from(snapshot.positions.buffer), Buffer.from(snapshot.masses.buffer)])).digest('hex'));
    expect(d.of).toMatch(/positions .* then masses as float64/);
    const f = await snapshotDigest({ ...snapshot, kind: 'file', fileName: 'never-dropped.csv' } as Snapshot);
    expect(f.sha256).toBeNull();
    expect(f.of).toMatch(/not at hand/);
  });
});
