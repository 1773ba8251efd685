/**
 * What the exported report says, as plain data (no DOM): the header rows (snapshot, its SHA-256, N,
 * box, G, both methods with every parameter, version, date), the statistics rows, the verdict, the
 * plots to draw, the notes, and the JSON summary (schema torusgrav.check/1, built by the same code as
 * `torusgrav check --json`) and residuals CSV that go beside the image.
 */
import { csvChunks } from '../../../engine/formats/csvWrite';
import { type CheckFigures, type MethodRecord, checkFigures, checkReportJson, residualColumns } from '../../../engine/stats/checkSummary';
import { formatBox, formatCount, formatDuration, formatNumber } from '../format';
import { ORDER_PANEL_COLUMNS } from '../plots/orderConvergencePlot';
import { orderConvergenceData, orderDefaultComponent } from '../plots/plotData';
import type { AppState } from '../state/store';
import type { Comparison, MethodRun, Snapshot } from '../state/types';
import { type Verdict, type VerdictChoice, reportVerdict } from './reportVerdict';

/** Where the SHA-256 in the report comes from. */
export interface ReportDigest {
  /** Hex digest, or null when the bytes are not at hand (a snapshot restored from the browser's storage). */
  readonly sha256: string | null;
  /** What was hashed, in words ("file" for the file's bytes). */
  readonly of: string;
}

export interface ReportInput {
  readonly state: AppState;
  readonly digest: ReportDigest;
  /** torusgrav's version (package.json). */
  readonly version: string;
  readonly created: Date;
  readonly verdict: VerdictChoice;
  /** The page's settings link. */
  readonly link: string;
}

/** A plot of the report: which, and its height in CSS px (its width is the layout's column). */
export interface ReportPlot {
  readonly key: 'distribution' | 'vs-acc' | 'vs-neighbours' | `convergence-${string}` | `order-${string}`;
  readonly height: number;
  /** Drawn across the whole width (the image-sum orders' panels). */
  readonly full?: boolean;
}

export interface ReportContent {
  readonly title: string;
  readonly header: readonly (readonly [string, string])[];
  readonly verdict: Verdict;
  readonly stats: readonly (readonly [string, string])[];
  readonly plots: readonly ReportPlot[];
  readonly notes: readonly string[];
  /** Base of the three file names (…​.png, …-residuals.csv, …-summary.json). */
  readonly fileBase: string;
  readonly figures: CheckFigures;
}

/** "2026-12-02T08-30-05Z": an ISO time usable in file names. */
export function reportStamp(d: Date): string {
  return d.toISOString().replace(/\.\d+Z$/, 'Z').replace(/:/g, '-');
}

function g(v: number, digits = 4): string {
  return formatNumber(v, digits);
}

function softeningText(s: { kind: string; eps?: number; h?: number }): string {
  if (s.kind === 'plummer') return `Plummer ε = ${g(s.eps!)}`;
  if (s.kind === 'spline') return `cubic spline h = ${g(s.h!)}`;
  return 'none (point masses)';
}

/** Parameters of the methods without a field of their own here (image-sum orders, particle-mesh Ewald). */
function otherParams(run: MethodRun): Record<string, unknown> | null {
  const r = run as unknown as Record<string, unknown>;
  for (const k of ['order', 'pme']) if (r[k] && typeof r[k] === 'object') return r[k] as Record<string, unknown>;
  return null;
}

/** "name value, name value" for a parameter record: numbers to 4 digits, lists joined, softening in words. */
export function paramsText(p: Readonly<Record<string, unknown>>): string {
  const one = (v: unknown): string => {
    if (typeof v === 'number') return g(v);
    if (Array.isArray(v) || ArrayBuffer.isView(v)) return Array.from(v as ArrayLike<unknown>, one).join('×');
    if (v && typeof v === 'object' && 'kind' in v) return softeningText(v as { kind: string });
    if (v && typeof v === 'object') return `(${paramsText(v as Record<string, unknown>)})`;
    return String(v);
  };
  return Object.entries(p)
    .filter(([, v]) => v !== undefined && typeof v !== 'function')
    .map(([k, v]) => `${k} ${one(v)}`)
    .join(', ');
}

/** The method's record for the JSON summary: its name, words and every parameter it ran with. */
export function methodRecord(run: MethodRun, snap: Snapshot): MethodRecord {
  if (run.ewald) return { method: 'ewald', label: run.label, ...run.ewald };
  if (run.mesh) return { method: 'mesh', label: run.label, ...run.mesh, assignment: 'cloud-in-cell', shortRangeCorrection: false, predictedRmsError: null };
  if (run.method === 'file') return { method: 'file', label: run.label, accelerations: snap.accelerationColumns ? snap.accelerationColumns.join(',') : null };
  const more = otherParams(run);
  return { method: run.method, label: run.label, ...(more ?? {}) };
}

/** One line about a method with every parameter and its chosen values and predicted error. */
export function methodText(run: MethodRun, snap: Snapshot): string {
  const e = run.ewald;
  if (e) {
    return (
      `${run.label}: tolerance ${e.tol.toExponential()}, softening ${softeningText(e.softening)}${e.rSoft > 0 ? ` (kept to r = ${g(e.rSoft)})` : ''}; ` +
      `chosen α = ${g(e.alpha)} /length, r_c = ${g(e.rCut)}, k_c = ${g(e.kCut)} /length (${formatCount(e.kVectors)} k-vectors, |h| ≤ ${e.hMax.join(', ')}), ` +
      `cell grid ${e.cells.join('×')}, clustering factor ${g(e.clustering, 3)}; predicted rms error ${g(e.predictedRmsError, 3)} ` +
      `(real ${g(e.realSpaceError, 3)}, Fourier ${g(e.fourierError, 3)}), relative ${g(e.predictedRelativeError, 3)} of |a| scale ${g(e.accelerationScale, 3)}; G = ${g(e.G)}`
    );
  }
  const m = run.mesh;
  if (m) {
    return (
      `${run.label}: ${m.mesh}³ mesh points, cells ${m.cell.map((c) => g(c)).join(' × ')} (length), cloud-in-cell assignment, ` +
      `no short-range correction; no error estimate (forces smoothed below about 2 cells); G = ${g(m.G)}`
    );
  }
  if (run.method === 'file') return `${run.label}: accelerations stored in the snapshot${snap.accelerationColumns ? `, columns ${snap.accelerationColumns.join(', ')}` : ''}`;
  const more = otherParams(run);
  return more ? `${run.label}: ${paramsText(more)}` : run.label;
}

/** The G of the comparison: from a computed method's parameters, else the page's setting. */
function gravityOf(c: Comparison, draftG: string): number {
  return c.runB.ewald?.G ?? c.runA.ewald?.G ?? c.runB.mesh?.G ?? c.runA.mesh?.G ?? Number(draftG);
}

/** Shown id of each target (the file's ids, else the 0-based rows). */
export function targetIdsOf(c: Comparison, snap: Snapshot): Float64Array {
  const rows = c.targets.indices;
  return Float64Array.from(rows, (r) => (snap.ids ? snap.ids[r] : r));
}

function snapshotName(snap: Snapshot): string {
  return snap.kind === 'demo' ? `${snap.source}, N ${snap.n}, seed ${snap.seed}` : snap.fileName ?? snap.source;
}

/** The report's content; throws when there is no comparison of the loaded snapshot. */
export function reportContent(o: ReportInput): ReportContent {
  const s = o.state;
  const c = s.comparison;
  const snap = s.snapshot;
  if (!c || !snap || c.snapshotId !== snap.id) throw new RangeError('report: no comparison of the loaded snapshot to report');
  const f = checkFigures(c.runA.acc, c.runB.acc);
  const verdict = reportVerdict(f, o.verdict);
  const K = c.targets.indices.length;
  const G = gravityOf(c, s.draft.G);
  const header: [string, string][] = [
    ['snapshot', snap.kind === 'demo' ? snapshotName(snap) : snap.source],
    ['SHA-256', o.digest.sha256 ? `${o.digest.sha256} (${o.digest.of})` : `not available (${o.digest.of})`],
    ['N, targets', `${formatCount(snap.n)} particles; ${c.targets.all ? `all ${formatCount(K)} are targets` : `${formatCount(K)} targets drawn at random (seed ${s.draft.seed})`}`],
    ['box', `${formatBox(snap.box)}${snap.boxGuessed ? ' (guessed from the coordinates)' : ''}${snap.outside > 0 ? `; ${formatCount(snap.outside)} particles outside, wrapped` : ''}`],
    ['units and G', `G = ${g(G)}; lengths and masses as in the snapshot; accelerations in G·mass/length²`],
    ['A (compared)', methodText(c.runA, snap)],
    ['B (reference)', methodText(c.runB, snap)],
    ['made by', `torusgrav ${o.version}, ${o.created.toISOString()}`],
  ];
  const e = f.relativeError;
  // no-break spaces keep each "id: error" on one line
  const worst = Array.from(f.worst, (t) => `${snap.ids ? snap.ids[c.targets.indices[t]] : c.targets.indices[t]}: ${g(f.rel[t], 3)}`.replace(/ /g, '\u00a0'));
  const stats: [string, string][] = [
    ['N (particles)', formatCount(snap.n)],
    ['targets', c.targets.all ? `all ${formatCount(K)}` : `${formatCount(K)} sampled`],
    ['median (p50)', g(e.p50)],
    ['90th percentile', g(e.p90)],
    ['99th percentile', g(e.p99)],
    ['99.9th percentile', g(e.p999)],
    ['max', g(e.max)],
    ['rms of relative error', g(e.rms)],
    ['rms |a_A − a_B|', g(f.rmsError)],
    ['rms |a_B|', g(f.rmsReference)],
    ['rms error ÷ rms |a_B|', g(f.rmsErrorOverRmsAcceleration)],
  ];
  if (f.zeroReference + f.nonFinite > 0) stats.push(['undefined', `${formatCount(f.zeroReference)} with |a_B| = 0, ${formatCount(f.nonFinite)} not finite`]);
  stats.push(['time to result', formatDuration(c.wallMs)], [`worst ${worst.length} (id: error)`, worst.join(', ')]);
  const plots: ReportPlot[] = [{ key: 'distribution', height: 340 }, { key: 'vs-acc', height: 340 }];
  if (c.neighbours) plots.push({ key: 'vs-neighbours', height: 340 });
  if (s.convergence && s.convergence.snapshotId === c.snapshotId) {
    for (const ser of s.convergence.series) plots.push({ key: `convergence-${ser.method}`, height: 340 });
    // an image-sum order's partial sums: one panel per followed target, ORDER_PANEL_COLUMNS to a row
    for (const t of s.convergence.orders ?? []) {
      const panels = orderConvergenceData(t, orderDefaultComponent(t), snap.ids).panels.length;
      const rows = Math.max(1, Math.ceil(panels / ORDER_PANEL_COLUMNS));
      plots.push({ key: `order-${t.method}`, height: 80 + rows * 180, full: true });
    }
  }
  const fileBase = `torusgrav-report-${reportStamp(o.created)}`;
  const notes = [
    'Relative error per target: |a_A − a_B| / |a_B|, B being the reference. Percentiles: linear interpolation between order statistics (Hyndman & Fan 1996, definition 7; NumPy’s "linear").',
    `Beside this image: ${fileBase}-residuals.csv (id,x,y,z,ax_A,ay_A,az_A,ax_B,ay_B,az_B,rel_error per target) and ${fileBase}-summary.json (schema torusgrav.check/1, as torusgrav check --json).`,
    `Settings: ${o.link}`,
  ];
  return { title: 'torusgrav — force comparison report', header, verdict, stats, plots, notes, fileBase, figures: f };
}

/** Where the image's regions are (CSS px; the PNG has pixelRatio times as many pixels). */
export interface ReportImageInfo {
  readonly width: number;
  readonly height: number;
  readonly pixelRatio: number;
  readonly regions: Readonly<Record<string, { readonly x: number; readonly y: number; readonly w: number; readonly h: number }>>;
}

/**
 * The JSON summary (schema torusgrav.check/1, the CLI's key names) plus what only the app knows: the
 * verdict in words, how targets were chosen, timings, the settings link and the image's regions.
 */
export function reportSummary(o: ReportInput, content: ReportContent, image?: ReportImageInfo): Record<string, unknown> {
  const c = o.state.comparison!;
  const snap = o.state.snapshot!;
  const json = checkReportJson({
    file: snap.kind === 'demo' ? snapshotName(snap) : snap.fileName ?? snap.source,
    sha256: o.digest.sha256,
    sha256Of: o.digest.of,
    n: snap.n,
    box: snap.box,
    G: gravityOf(c, o.state.draft.G),
    units: null,
    reference: methodRecord(c.runB, snap),
    compared: methodRecord(c.runA, snap),
    figures: content.figures,
    ids: targetIdsOf(c, snap),
    results: [content.verdict.result],
    version: o.version,
    created: o.created.toISOString(),
  });
  return {
    ...json,
    verdict: content.verdict.text,
    targetSelection: c.targets.all ? { kind: 'all' } : { kind: 'sample', count: c.targets.indices.length, seed: Number(o.state.draft.seed) },
    timing: { wallMs: c.wallMs, workerMs: c.workerMs },
    settings: o.link,
    ...(image ? { image: { file: `${content.fileBase}.png`, ...image } } : {}),
  };
}

/** The residuals CSV (RESIDUAL_COLUMNS, 17 significant digits), as chunks of text (header first). */
export function reportResidualsCsv(state: AppState, figures: CheckFigures): Generator<string> {
  const c = state.comparison!;
  const snap = state.snapshot!;
  const rows = c.targets.indices;
  const K = rows.length;
  const pos = new Float64Array(3 * K);
  for (let t = 0; t < K; t++) for (let d = 0; d < 3; d++) pos[3 * t + d] = snap.positions[3 * rows[t] + d];
  return csvChunks(residualColumns(targetIdsOf(c, snap), pos, c.runA.acc, c.runB.acc, figures.rel), K);
}
