/**
 * What the exported report says, as plain data (no DOM): the header rows (snapshot, its SHA-256, N,
 * box, G, both methods with every parameter, version, date), the statistics rows, the verdict, the
 * plots to draw, the notes, and the JSON summary (schema torusgrav.check/1, built by the same code as
 * `torusgrav check --json`) and residuals CSV that go beside the image.
 */
import { csvChunks } from '../../../engine/formats/csvWrite';
import { type CheckFigures, checkFigures, checkReportJson, residualColumns } from '../../../engine/stats/checkSummary';
import { formatBox, formatCount, formatDuration, formatNumber } from '../format';
import { ORDER_PANEL_COLUMNS } from '../plots/orderConvergencePlot';
import { orderConvergenceData, orderDefaultComponent } from '../plots/plotData';
import type { AppState } from '../state/store';
import type { OrderTrace } from '../state/orderRuns';
import type { Comparison, Snapshot } from '../state/types';
import { methodRecord, methodText, runGravity } from './reportMethods';
import { type Verdict, type VerdictChoice, reportVerdict } from './reportVerdict';

export { methodRecord, methodText, paramsText } from './reportMethods';

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

/** The G of the comparison: from a computed method's parameters, else the page's setting. */
function gravityOf(c: Comparison, draftG: string): number {
  return runGravity(c.runB) ?? runGravity(c.runA) ?? Number(draftG);
}

/**
 * The partial sums of the comparison's own image-sum runs (as the page shows them) with their plot keys:
 * "order-sphere", and "order-sphere-2" for a second run of the same order.
 */
export function reportOrderTraces(s: AppState): { key: `order-${string}`; trace: OrderTrace }[] {
  const c = s.comparison;
  if (!c || !s.convergence || s.convergence.snapshotId !== c.snapshotId) return [];
  const seen = new Map<string, number>();
  return (s.convergence.orders ?? [])
    .filter((t) => t.runKey === c.runA.key || t.runKey === c.runB.key)
    .map((trace) => {
      const k = (seen.get(trace.method) ?? 0) + 1;
      seen.set(trace.method, k);
      return { key: k === 1 ? (`order-${trace.method}` as const) : (`order-${trace.method}-${k}` as const), trace };
    });
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
    for (const { key, trace: t } of reportOrderTraces(s)) {
      const panels = orderConvergenceData(t, orderDefaultComponent(t), snap.ids).panels.length;
      const rows = Math.max(1, Math.ceil(panels / ORDER_PANEL_COLUMNS));
      plots.push({ key, height: 80 + rows * 180, full: true });
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
