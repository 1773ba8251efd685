/**
 * The exported report: a single HTML file (inline SVG plots, the 3D view as a PNG data URL, the
 * numbers and the settings) that opens anywhere without this app. A pure function of the store.
 */
import { ERROR_PERCENTILES } from '../../../engine/stats/errorSummary';
import { formatBox, formatCount, formatDuration, formatNumber } from '../format';
import { convergencePlot } from '../plots/convergencePlot';
import { distributionPlot } from '../plots/distributionPlot';
import { convergenceData, distributionData, scatterByAcceleration, scatterByNeighbours } from '../plots/plotData';
import { scatterPlot } from '../plots/scatterPlot';
import { esc } from '../plots/svg';
import type { AppState } from '../state/store';

function row(label: string, value: string): string {
  return `<tr><th>${esc(label)}</th><td>${esc(value)}</td></tr>`;
}

/** File name and HTML text of the report of the current comparison. */
export function exportReportHtml(s: AppState, viewPng: string | null, when: Date, link: string): { name: string; html: string } {
  const c = s.comparison;
  const snap = s.snapshot;
  const stamp = when.toISOString().replace(/[:]/g, '-').replace(/\..*$/, '');
  const name = `torusgrav-report-${stamp}.html`;
  if (!c || !snap) return { name, html: '<!doctype html><title>torusgrav report</title><p>No comparison.</p>' };
  const sm = c.summary;
  const rows = [
    row('snapshot', snap.kind === 'demo' ? `${snap.source}, seed ${snap.seed}` : snap.source),
    row('N (particles)', formatCount(snap.n)),
    row('box', formatBox(snap.box)),
    row('G', s.draft.G),
    row('A (compared)', c.runA.label),
    row('B (reference)', c.runB.label),
    row('targets', c.targets.all ? `all ${formatCount(c.targets.indices.length)}` : `${formatCount(c.targets.indices.length)} sampled (seed ${s.draft.seed})`),
    ...ERROR_PERCENTILES.map((q, i) => row(`${q * 100}th percentile`, formatNumber(sm.percentiles[i], 4))),
    row('max', formatNumber(sm.max, 4)),
    row('rms |a_A − a_B|', formatNumber(sm.rmsError, 4)),
    row('rms |a_B|', formatNumber(sm.rmsReference, 4)),
    row('rms error ÷ rms |a_B|', formatNumber(sm.rmsRatio, 4)),
    row('time to result', formatDuration(c.wallMs)),
  ].join('');
  const worst = Array.from(sm.worst.subarray(0, 20))
    .map((t) => {
      const r = c.targets.indices[t];
      return `<tr><td>${snap.ids ? snap.ids[r] : r}</td><td>${esc(formatNumber(c.relative[t], 4))}</td></tr>`;
    })
    .join('');
  const plots = [distributionPlot(distributionData(c), 560, 340), scatterPlot(scatterByAcceleration(c, null), 560, 300)];
  const nb = scatterByNeighbours(c, s.draft.view.scatterX, null);
  if (nb) plots.push(scatterPlot(nb, 560, 300));
  if (s.convergence && s.convergence.snapshotId === c.snapshotId) for (const ser of s.convergence.series) plots.push(convergencePlot(convergenceData(s.convergence, ser), 560, 300));
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>torusgrav report ${esc(stamp)}</title>
<style>body{font-family:system-ui,sans-serif;color:#1f2b2a;background:#eceee8;margin:24px;max-width:1180px}
h1{color:#225349;font-size:1.5rem}table{border-collapse:collapse;background:#fbfbf7}th,td{padding:3px 10px;border-bottom:1px solid #d3d9d1;text-align:left;font-variant-numeric:tabular-nums}
th{color:#5a6764;font-weight:500}.plots{display:flex;flex-wrap:wrap;gap:12px}.plots svg{border:1px solid #d3d9d1;border-radius:6px}img{max-width:100%;border-radius:6px}</style></head>
<body><h1>torusgrav — force comparison</h1>
<p>Made ${esc(when.toISOString())}. Relative error |a_A − a_B| / |a_B| per target; percentiles by linear interpolation between order statistics. Settings: <a href="${esc(link)}">${esc(link)}</a></p>
<table>${rows}</table>
<h2>Worst particles</h2><table><tr><th>id</th><th>relative error</th></tr>${worst}</table>
${viewPng ? `<h2>3D view</h2><img alt="particles coloured by relative error" src="${viewPng}">` : ''}
<h2>Plots</h2><div class="plots">${plots.join('\n')}</div>
</body></html>`;
  return { name, html };
}
