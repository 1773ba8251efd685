/**
 * The distribution of relative error on a log axis: a histogram (counts per bin, top) over the
 * cumulative distribution (fraction of targets at or below, bottom), with the 50/90/99/99.9th
 * percentiles and the maximum marked. A pure function from data and size to SVG text.
 */
import { scaleLinear, scaleLog } from 'd3';
import { axisBottom, axisLeft, frameOf } from './axes';
import { THEME } from './theme';
import { pow10, px, shortNumber, svgDocument, tag, text } from './svg';

export interface DistributionData {
  /** Histogram bin edges (bins + 1, ascending, positive) and counts. */
  readonly edges: ArrayLike<number>;
  readonly counts: ArrayLike<number>;
  /** Thinned cumulative distribution: values and fractions ≤ them. */
  readonly cdfX: ArrayLike<number>;
  readonly cdfF: ArrayLike<number>;
  /** Percentile levels (fractions) and values, and the maximum. */
  readonly levels: readonly number[];
  readonly percentiles: readonly number[];
  readonly max: number;
  /** Targets whose error is exactly zero (not on the log axis). */
  readonly zeros: number;
  readonly label?: string;
}

/** Log-axis domain covering the data, whole decades, at least one decade. */
export function decadeDomain(lo: number, hi: number): [number, number] {
  const a = Number.isFinite(lo) && lo > 0 ? lo : 1e-16;
  const b = Number.isFinite(hi) && hi > 0 ? hi : a * 10;
  let e0 = Math.floor(Math.log10(a) + 1e-9);
  let e1 = Math.ceil(Math.log10(b) - 1e-9);
  if (e1 <= e0) e1 = e0 + 1;
  if (e1 - e0 > 14) e0 = e1 - 14;
  return [pow10(e0), pow10(e1)];
}

function levelName(q: number): string {
  return `${Number((q * 100).toPrecision(4))} %`;
}

/** SVG text of the distribution plot, width × height px. */
export function distributionPlot(d: DistributionData, width = 520, height = 360): string {
  const nb = d.counts.length;
  const positive: number[] = [];
  for (let i = 0; i < d.cdfX.length; i++) if (d.cdfX[i] > 0) positive.push(d.cdfX[i]);
  const lo = Math.min(nb ? d.edges[0] : Infinity, positive.length ? positive[0] : Infinity);
  const hi = Math.max(nb ? d.edges[nb] : 0, d.max > 0 ? d.max : 0);
  const domain = decadeDomain(lo, hi);
  const f = frameOf(width, height, { top: 34, bottom: 44 });
  const split = f.top + (f.bottom - f.top) * 0.38;
  const gap = 24;
  const x = scaleLog().domain(domain).range([f.left, f.right]).clamp(true);
  let maxCount = 0;
  for (let i = 0; i < nb; i++) maxCount = Math.max(maxCount, d.counts[i]);
  const yh = scaleLinear().domain([0, maxCount > 0 ? maxCount : 1]).nice(3).range([split - gap / 2, f.top]);
  const yc = scaleLinear().domain([0, 1]).range([f.bottom, split + gap / 2]);

  let body = text(d.label ?? 'Relative error |a_A − a_B| / |a_B|', { x: f.left, y: 16, fill: THEME.ink, 'font-size': 12.5, 'font-weight': 600 });
  // histogram
  body += axisLeft({ scale: yh, log: false, max: 3, format: (v) => shortNumber(v) }, f.left, f.right);
  let bars = '';
  for (let i = 0; i < nb; i++) {
    if (!(d.counts[i] > 0)) continue;
    const x0 = x(d.edges[i]), x1 = x(d.edges[i + 1]);
    const y = yh(d.counts[i]);
    bars += tag('rect', { x: x0 + 0.5, y, width: Math.max(0.5, x1 - x0 - 1), height: yh(0) - y, fill: THEME.accentSoft, stroke: THEME.accent, 'stroke-width': 0.6 });
  }
  body += tag('g', { 'data-part': 'histogram' }, bars);
  body += text('targets per bin', { x: f.left + 4, y: f.top - 4, fill: THEME.muted, 'font-size': 10 });
  // cumulative distribution
  body += axisBottom({ scale: x, log: true, title: 'relative error' }, f.bottom, split + gap / 2);
  body += axisLeft({ scale: yc, log: false, ticks: [0, 0.5, 1], format: (v) => `${Math.round(v * 100)} %` }, f.left, f.right);
  let path = '';
  for (let i = 0; i < d.cdfX.length; i++) {
    const v = d.cdfX[i];
    if (!(v > 0)) continue;
    const xx = x(v), yy = yc(d.cdfF[i]);
    const prevF = i > 0 ? d.cdfF[i - 1] : 0;
    path += path ? `H${px(xx)}V${px(yy)}` : `M${px(xx)},${px(yc(prevF))}V${px(yy)}`;
  }
  if (path) body += tag('path', { d: path, fill: 'none', stroke: THEME.accent, 'stroke-width': 1.6, 'data-part': 'cdf' });
  body += text('fraction of targets ≤ error', { x: f.left + 4, y: split + gap / 2 + 9, fill: THEME.muted, 'font-size': 10 });
  // percentile and max marks over both panels; one label row each (top of the lower panel, in x
  // order) so that labels never collide, each beside its line on the side with room
  let marks = '';
  const entries: { name: string; v: number; colour: string; dash: string }[] = d.levels.map((q, i) => ({ name: levelName(q), v: d.percentiles[i], colour: THEME.muted, dash: '3 3' }));
  entries.push({ name: 'max', v: d.max, colour: THEME.alarm, dash: '' });
  const shown = entries.filter((e) => e.v > 0 && Number.isFinite(e.v));
  const rowTop = split + gap / 2 + 24;
  shown.forEach((e, row) => {
    const xx = x(e.v);
    const label = `${e.name} ${shortNumber(e.v)}`;
    const right = xx + 4 + label.length * 5.6 < f.right;
    marks += tag('line', { x1: xx, x2: xx, y1: f.top, y2: f.bottom, stroke: e.colour, 'stroke-dasharray': e.dash || undefined, 'stroke-width': 1 });
    marks += text(label, {
      x: right ? xx + 4 : xx - 4,
      y: rowTop + row * 12.5,
      fill: e.colour,
      'font-size': 10,
      'text-anchor': right ? 'start' : 'end',
      stroke: THEME.background,
      'stroke-width': 3,
      'paint-order': 'stroke',
    });
  });
  body += tag('g', { 'data-part': 'marks' }, marks);
  if (d.zeros > 0) body += text(`${d.zeros} exactly 0 (not shown)`, { x: f.right, y: 16, 'text-anchor': 'end', fill: THEME.muted, 'font-size': 10 });
  return svgDocument(width, height, 'distribution of relative error', body, 'distribution');
}
