/**
 * What the exported report says, on a real comparison (our coarse mesh against Ewald on a seeded demo):
 * the header rows, the statistics, the JSON summary (the CLI's schema torusgrav.check/1 and key names,
 * figures equal to engine/stats on the same accelerations) and the residuals CSV (A and B read back bit
 * for bit). The SHA-256 is checked against node:crypto (an independent implementation).
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { boxMake } from '../../engine/box';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { errorReport } from '../../engine/stats/errorReport';
import { errorSummary, percentileLinear, relativeErrors, sortedFinite } from '../../engine/stats';
import { sha256Hex, snapshotDigest } from '../../app/web/report/fileDigest';
import { type ReportInput, methodRecord, methodText, paramsText, reportContent, reportResidualsCsv, reportSummary } from '../../app/web/report/reportContent';
import { imageSumOrder } from '../../engine/orders/imageSumOrder';
import { orderRun, pmeRun } from '../../app/web/worker/methodRequests';
import { methodRunFrom } from '../../app/web/state/orderRuns';
import type { SlotPlan } from '../../app/web/state/runPlan';
import type { MethodId } from '../../app/web/methods/registry';
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

// ---- image-sum orders and particle-mesh Ewald ---------------------------------------------------------
// Runs made as the page makes them: the worker's request functions (engine calls) and methodRunFrom.

const NO = 200;
const G2 = 2; // the runs' own G, unlike the page's draft G (1): the header must take the runs'

function orderSnapshot(): Snapshot {
  const d = demoSnapshot(NO, 11);
  return { ...snapshot, id: `demo:${NO}:11`, seed: 11, n: NO, positions: d.positions, masses: d.masses, ids: null, source: 'demo' } as Snapshot;
}

function slot(method: MethodId, label: string): SlotPlan {
  return { key: `${method}|${label}`, method, label } as SlotPlan;
}

function comparisonOf(snap: Snapshot, runA: MethodRun, runB: MethodRun): AppState {
  const rep = errorReport(runA.acc, runB.acc, 20);
  const indices = Int32Array.from({ length: snap.n }, (_, i) => i);
  const cmp: Comparison = {
    snapshotId: snap.id,
    runA,
    runB,
    targets: { key: 'all', all: true, indices },
    relative: rep.relative,
    summary: rep.summary,
    histogram: rep.histogram,
    cdf: rep.cdf,
    neighbours: null,
    wallMs: 10,
    workerMs: 5,
  };
  return { ...appStateInitial(), snapshot: snap, comparison: cmp };
}

describe('the report of an image-sum order against particle-mesh Ewald', () => {
  let snap: Snapshot;
  let orderRunA: MethodRun;
  let pmeRunB: MethodRun;
  let st: AppState;
  const progress = () => {};

  beforeAll(() => {
    snap = orderSnapshot();
    const base = { positions: snap.positions, masses: snap.masses, box: snap.box, targets: null };
    const o = orderRun({ type: 'order', ...base, options: { order: 'sphere', shells: 4, background: true, G: G2, tol: 1e-8 } }, progress);
    orderRunA = methodRunFrom(slot('sphere', 'sphere R 4'), 'all', o, 1);
    const p = pmeRun({ type: 'pme', ...base, options: { G: G2, tol: 1e-3 } }, progress);
    pmeRunB = methodRunFrom(slot('pme', 'PME tol 1e-3'), 'all', p, 1);
    st = comparisonOf(snap, orderRunA, pmeRunB);
  });

  const inp = (): ReportInput => ({ ...input(), state: st });

  it('header: the order with shells, mean density, exact-part tolerance and what it chose, work and predicted limit', () => {
    const p = orderRunA.order!;
    const h = Object.fromEntries(reportContent(inp()).header);
    const a = h['A (compared)'];
    expect(a.startsWith('sphere R 4: spherical shells |s| ≤ R·L_max for R = 0 … 4, mean density removed')).toBe(true);
    expect(a).toContain('exact parts to tolerance 1e-8');
    for (const k of ['nearRadius', 'maxOrder', 'nearCells', 'farCells'] as const) expect(p[k]).toBeDefined();
    expect(a).toContain(`cells within ${formatNumber(p.nearRadius!)} (length)`);
    expect(a).toContain(`multipoles to order ${p.maxOrder}`);
    expect(a).toContain(`work ${formatNumber(p.work, 3)} pair terms`);
    expect(a).toContain('predicted limit: Ewald + G N·D/V with N (4π/3) I (sphere)');
    expect(a).toContain('truncation at R = 4 is not estimated');
    expect(a.endsWith('G = 2')).toBe(true);
    expect(h['units and G']).toMatch(/^G = 2;/);
  });

  it("the order's predicted shift G N·D/V: (4π/3) G D/V for a sphere (de Leeuw, Perram & Smith 1980), and the engine's limit − Ewald", () => {
    const rec = methodRecord(orderRunA, snap) as Record<string, any>;
    const lim = rec.predictedLimit;
    // independent: the box's mass dipole about its centre from the wrapped positions, unit box (V = 1)
    const D = [0, 0, 0];
    for (let j = 0; j < NO; j++) for (let d = 0; d < 3; d++) D[d] += snap.masses[j] * ((((snap.positions[3 * j + d] % 1) + 1) % 1) - 0.5);
    for (let d = 0; d < 3; d++) {
      expect(lim.dipole[d]).toBeCloseTo(D[d], 14);
      expect(lim.shift[d]).toBeCloseTo(((4 * Math.PI) / 3) * G2 * D[d], 13);
    }
    expect(Math.hypot(...D)).toBeGreaterThan(1e-3); // a shift that could be told from zero
    const h = Object.fromEntries(reportContent(inp()).header);
    expect(h['A (compared)']).toContain(`|G N·D/V| = ${formatNumber(Math.hypot(...lim.shift), 3)}`);
    // the engine's own predicted limit of the same order: limit − Ewald is that shift for every target
    const res = imageSumOrder(snap.positions, snap.masses, snap.box, Int32Array.of(0, 7, 99), { order: 'sphere', shells: 4, G: G2, tol: 1e-8 });
    for (let t = 0; t < 3; t++) for (let d = 0; d < 3; d++) expect(res.limit![3 * t + d] - res.ewald[3 * t + d]).toBeCloseTo(lim.shift[d], 10);
  });

  it('header: PME with α, r_c, mesh, B-spline order, influence function and predicted error', () => {
    const p = pmeRunB.pme!;
    const b = Object.fromEntries(reportContent(inp()).header)['B (reference)'];
    expect(b).toContain('PME tol 1e-3: particle-mesh Ewald, tolerance 1e-3');
    expect(b).toContain(`α = ${formatNumber(p.alpha)} /length, r_c = ${formatNumber(p.rCut)}`);
    expect(b).toContain(`mesh ${p.mesh.join('×')}, B-spline order p = ${p.order}, optimal influence function`);
    expect(b).toContain(`predicted rms error ${formatNumber(p.predictedRmsError, 3)}`);
    expect(b).toContain(`rms relative ${formatNumber(p.predictedRelativeError, 3)}`);
  });

  it('JSON: every parameter of both runs, numbers as the engine gave them, typed arrays as plain lists', () => {
    const c = reportContent(inp());
    const j = JSON.parse(JSON.stringify(reportSummary(inp(), c)));
    expect(j.G).toBe(G2);
    expect(j.compared.method).toBe('sphere');
    for (const [k, v] of Object.entries(orderRunA.order!)) expect(j.compared[k]).toEqual(v);
    expect(j.compared.predictedLimit.limit).toBe('Ewald + G N·D/V');
    expect(j.reference.method).toBe('pme');
    for (const [k, v] of Object.entries(pmeRunB.pme!)) expect(j.reference[k]).toEqual(v);
    // the figures are those of A against B
    expect(j.relativeError.p99).toBe(percentileLinear(sortedFinite(relativeErrors(orderRunA.acc, pmeRunB.acc)), 0.99));
  });

  it("README's check section names every key of the summary and of every method record", () => {
    const readme = readFileSync(join(__dirname, '..', '..', 'README.md'), 'utf8');
    const section = readme.slice(readme.indexOf('## Force-accuracy gate'));
    const documented = (k: string) => section.includes(`\`${k}\``) || new RegExp(`\`[^\`]*\\b${k}\\b[^\`]*\``).test(section);
    const j = reportSummary(inp(), reportContent(inp()), { width: 1, height: 1, pixelRatio: 2, regions: {} });
    const mesh = methodRecord(state.comparison!.runA, snapshot);
    const ewald = methodRecord(state.comparison!.runB, snapshot);
    const keys = new Set([...Object.keys(j), ...Object.keys(j.compared as object), ...Object.keys(j.reference as object), ...Object.keys(mesh), ...Object.keys(ewald), 'predictedLimit']);
    for (const k of Object.keys((j.compared as { predictedLimit: object }).predictedLimit)) keys.add(k);
    const missing = [...keys].filter((k) => !documented(k));
    expect(missing).toEqual([]);
  });

  it('the screened order: its λ list in words and in the JSON, limit Ewald; the nearest image: no limit', () => {
    const base = { positions: snap.positions, masses: snap.masses, box: snap.box, targets: Int32Array.of(1, 2, 3) };
    const scr = methodRunFrom(slot('screened', 'screened'), 'k', orderRun({ type: 'order', ...base, options: { order: 'screened', G: 1, tol: 1e-9, lambdas: [4, 2, 1] } }, progress), 1);
    const near = methodRunFrom(slot('nearest', 'nearest image'), 'k', orderRun({ type: 'order', ...base, options: { order: 'nearest', G: 1 } }, progress), 1);
    expect(methodText(scr, snap)).toContain('screened sums at λ = 4, 2, 1 (1/length), extrapolated to λ → 0');
    expect(methodText(scr, snap)).toContain(`exact parts to tolerance 1e-9 (α = ${formatNumber(scr.order!.alpha!)} /length, r_c = ${formatNumber(scr.order!.rCut!)})`);
    expect(methodText(scr, snap)).toContain('predicted limit: Ewald (λ → 0)');
    const rec = JSON.parse(JSON.stringify(methodRecord(scr, snap)));
    expect(rec.lambdas).toEqual([4, 2, 1]);
    expect(rec.shells).toBeNull();
    expect(methodText(near, snap)).toContain('nearest image of every particle only');
    expect(methodText(near, snap)).toContain('predicted limit: none');
    expect(methodRecord(near, snap)).toMatchObject({ method: 'nearest', order: 'nearest', predictedLimit: { shift: null } });
  });

  it('a slab order names its normal and layers; with the mean density kept the limit is the homologous one', () => {
    const base = { positions: snap.positions, masses: snap.masses, box: snap.box, targets: Int32Array.of(5) };
    const slab = methodRunFrom(slot('slab', 'slab z R 2'), 'k', orderRun({ type: 'order', ...base, options: { order: 'slab-z', shells: 2, background: false, G: 1, tol: 1e-6 } }, progress), 1);
    const t = methodText(slab, snap);
    expect(t).toContain('layers |n_z| ≤ R for R = 0 … 2, mean density kept');
    expect(t).toContain('predicted limit: Ewald − G ρ̄ N·(r − x_com)');
    expect(t).toContain('N 4π ẑẑ (slab)');
    expect(t).not.toContain('|G N·D/V|');
    expect((methodRecord(slab, snap) as Record<string, any>).predictedLimit.depolarisation).toEqual([0, 0, 0, 0, 0, 0, 0, 0, 4 * Math.PI]);
  });
});
