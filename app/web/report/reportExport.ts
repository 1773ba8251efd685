/**
 * "Export report": composes the PNG (reportContent → reportLayout → reportCanvas, the plots drawn at
 * the layout's sizes by the same plot functions as the page) and downloads it with the residuals CSV
 * and the JSON summary beside it.
 */
import { version } from '../../../package.json';
import { colourScaleOf } from '../components/View3DPanel';
import { convergencePlot } from '../plots/convergencePlot';
import { distributionPlot } from '../plots/distributionPlot';
import { orderConvergencePlot } from '../plots/orderConvergencePlot';
import { convergenceData, distributionData, orderConvergenceData, orderDefaultComponent, scatterByAcceleration, scatterByNeighbours } from '../plots/plotData';
import { scatterPlot } from '../plots/scatterPlot';
import type { AppState } from '../state/store';
import { VIEW_COLOURS } from '../view3d/scene';
import { snapshotDigest } from './fileDigest';
import { canvasMeasure, type ReportViewImage, reportCanvasDraw } from './reportCanvas';
import { reportContent, reportOrderTraces, reportResidualsCsv, reportSummary } from './reportContent';
import { type ReportLayout, reportLayout } from './reportLayout';
import type { VerdictChoice } from './reportVerdict';
import { cssColour, viewLegendSvg } from './reportViewLegend';

export interface ExportedFile {
  readonly name: string;
  readonly blob: Blob;
}

/** The SVG text of every plot and legend the layout places, drawn at its size. */
export function reportSvgs(s: AppState, layout: ReportLayout): Record<string, string> {
  const c = s.comparison!;
  const out: Record<string, string> = {};
  const v = s.draft.view;
  for (const [name, r] of Object.entries(layout.blocks)) {
    if (!name.startsWith('plot-')) continue;
    const key = name.slice(5);
    if (key === 'distribution') out[key] = distributionPlot(distributionData(c), r.w, r.h);
    else if (key === 'vs-acc') out[key] = scatterPlot(scatterByAcceleration(c, s.selected), r.w, r.h);
    else if (key === 'vs-neighbours') {
      const d = scatterByNeighbours(c, v.scatterX, s.selected);
      if (d) out[key] = scatterPlot(d, r.w, r.h);
    } else if (key.startsWith('order-')) {
      const t = reportOrderTraces(s).find((x) => x.key === key)?.trace;
      if (t) out[key] = orderConvergencePlot(orderConvergenceData(t, orderDefaultComponent(t), s.snapshot?.ids ?? null), r.w, r.h);
    } else if (key.startsWith('convergence-') && s.convergence) {
      const ser = s.convergence.series.find((x) => `convergence-${x.method}` === key);
      if (ser) out[key] = convergencePlot(convergenceData(s.convergence, ser), r.w, r.h);
    }
  }
  const lr = layout.blocks.viewLegend;
  if (lr) {
    const snap = s.snapshot!;
    const arrows = v.arrows === 'none' ? null : v.arrows === 'all' ? 'residual arrows a_A − a_B' : `a_A − a_B, the ${v.worstK} worst`;
    const picked = s.selected !== null ? String(snap.ids ? snap.ids[c.targets.indices[s.selected]] : c.targets.indices[s.selected]) : null;
    const slab = v.slabAxis === 'none' ? null : `slab ⟂ ${v.slabAxis} at ${v.slabCenter}, ${v.slabThickness} thick`;
    out['view-legend'] = viewLegendSvg(
      {
        scale: colourScaleOf(c),
        colours: {
          background: cssColour(VIEW_COLOURS.background),
          box: cssColour(VIEW_COLOURS.box),
          context: cssColour(VIEW_COLOURS.context),
          arrow: cssColour(VIEW_COLOURS.arrow),
          ring: cssColour(VIEW_COLOURS.ring),
          slab: '#d9c9a0',
        },
        arrows: arrows ? `${arrows}${v.arrowLog ? ' (log length)' : ''}` : null,
        contextShown: v.context && !c.targets.all,
        picked,
        slab,
      },
      lr.w,
      lr.h,
    );
  }
  return out;
}

/** The chunks of a generator, yielding to the page every few chunks (a large CSV takes seconds to format). */
async function chunksCollect(gen: Iterable<string>): Promise<string[]> {
  const out: string[] = [];
  for (const c of gen) {
    out.push(c);
    if (out.length % 8 === 0) await new Promise((r) => setTimeout(r, 0));
  }
  return out;
}

function canvasBlob(canvas: HTMLCanvasElement): Promise<Blob> {
  return new Promise((res, rej) => canvas.toBlob((b) => (b ? res(b) : rej(new Error('the report image could not be encoded as PNG'))), 'image/png'));
}

/** The three report files of the store's comparison, with `view` (a copy of the 3D view's finished image, or null). */
export async function reportFiles(s: AppState, view: ReportViewImage | null, choice: VerdictChoice, when: Date, link: string): Promise<ExportedFile[]> {
  const digest = await snapshotDigest(s.snapshot!);
  const input = { state: s, digest, version, created: when, verdict: choice, link };
  const content = reportContent(input);
  // under software WebGL the view draws a random subset of very large clouds, and says so: so does the report
  const drawnNote = document.querySelector('[data-testid=drawn-note]')?.textContent?.trim();
  const viewTitle = `Where the discrepancy sits (the 3D view as framed on screen${drawnNote ? `; ${drawnNote}` : ''})`;
  const layout = reportLayout({ ...content, viewTitle }, canvasMeasure(), { viewAspect: view ? view.width / view.height : null });
  const canvas = await reportCanvasDraw(layout, reportSvgs(s, layout), view);
  const png = await canvasBlob(canvas);
  const csv = await chunksCollect(reportResidualsCsv(s, content.figures));
  const summary = `${JSON.stringify(reportSummary(input, content, { width: layout.width, height: layout.height, pixelRatio: layout.pixelRatio, regions: layout.blocks }), null, 2)}\n`;
  return [
    { name: `${content.fileBase}.png`, blob: png },
    { name: `${content.fileBase}-residuals.csv`, blob: new Blob(csv, { type: 'text/csv' }) },
    { name: `${content.fileBase}-summary.json`, blob: new Blob([summary], { type: 'application/json' }) },
  ];
}

/** Saves a file through a temporary link. */
export function download(f: ExportedFile): void {
  const url = URL.createObjectURL(f.blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = f.name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 60_000);
}
