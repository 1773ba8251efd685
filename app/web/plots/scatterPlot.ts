/**
 * Relative error against another per-target quantity (|a_B|, nearest-neighbour distance, local
 * density), log–log. Up to `pointLimit` targets are drawn as dots; more are binned into a grid of
 * cells shaded by count, with the worst targets still drawn as dots. A running median (per x bin) is
 * drawn on top. A pure function from data and size to SVG text.
 */
import { scaleLog } from 'd3';
import { axisBottom, axisLeft, frameOf } from './axes';
import { decadeDomain } from './distributionPlot';
import { THEME } from './theme';
import { px, svgDocument, tag, text } from './svg';

export interface ScatterData {
  readonly x: ArrayLike<number>;
  readonly y: ArrayLike<number>;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly title: string;
  /** Indices drawn as dots even when binning (e.g. the worst targets). */
  readonly emphasis?: ArrayLike<number>;
  /** A highlighted index (the picked particle). */
  readonly selected?: number | null;
}

export interface ScatterOptions {
  readonly pointLimit?: number;
  readonly binsX?: number;
  readonly binsY?: number;
  readonly medianBins?: number;
}

function positiveRange(v: ArrayLike<number>): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < v.length; i++) {
    const a = v[i];
    if (a > 0 && Number.isFinite(a)) {
      if (a < lo) lo = a;
      if (a > hi) hi = a;
    }
  }
  return [lo, hi];
}

/** Running median of y in `bins` equal log-x bins (bins with fewer than 3 points are skipped). */
export function runningMedian(x: ArrayLike<number>, y: ArrayLike<number>, domain: [number, number], bins: number): [number, number][] {
  const l0 = Math.log10(domain[0]), l1 = Math.log10(domain[1]);
  const groups: number[][] = Array.from({ length: bins }, () => []);
  for (let i = 0; i < x.length; i++) {
    if (!(x[i] > 0 && y[i] > 0) || !Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    const b = Math.min(bins - 1, Math.max(0, Math.floor(((Math.log10(x[i]) - l0) / (l1 - l0)) * bins)));
    groups[b].push(y[i]);
  }
  const out: [number, number][] = [];
  groups.forEach((g, b) => {
    if (g.length < 3) return;
    g.sort((p, q) => p - q);
    const h = (g.length - 1) / 2;
    const med = g[Math.floor(h)] + (h - Math.floor(h)) * (g[Math.ceil(h)] - g[Math.floor(h)]);
    out.push([10 ** (l0 + ((b + 0.5) / bins) * (l1 - l0)), med]);
  });
  return out;
}

/** SVG text of the scatter plot, width × height px. */
export function scatterPlot(d: ScatterData, width = 520, height = 300, o: ScatterOptions = {}): string {
  const pointLimit = o.pointLimit ?? 3000;
  const f = frameOf(width, height, { top: 36 });
  const xDomain = decadeDomain(...positiveRange(d.x));
  const yDomain = decadeDomain(...positiveRange(d.y));
  const x = scaleLog().domain(xDomain).range([f.left, f.right]).clamp(true);
  const y = scaleLog().domain(yDomain).range([f.bottom, f.top]).clamp(true);
  let body = text(d.title, { x: f.left, y: 16, fill: THEME.ink, 'font-size': 12.5, 'font-weight': 600 });
  body += axisBottom({ scale: x, log: true, title: d.xLabel }, f.bottom, f.top);
  body += axisLeft({ scale: y, log: true, title: d.yLabel }, f.left, f.right);
  const n = Math.min(d.x.length, d.y.length);
  const ok = (i: number) => d.x[i] > 0 && d.y[i] > 0 && Number.isFinite(d.x[i]) && Number.isFinite(d.y[i]);
  // dots of one colour share one path (a DOM of a few elements, however many targets)
  const dotPath = (indices: Iterable<number>, r: number) => {
    let d = '';
    for (const i of indices) {
      if (!ok(i)) continue;
      const cx = x(d0(i)), cy = y(d1(i));
      d += `M${px(cx - r)},${px(cy)}a${r},${r} 0 1,0 ${2 * r},0a${r},${r} 0 1,0 ${-2 * r},0`;
    }
    return d;
  };
  const d0 = (i: number) => d.x[i], d1 = (i: number) => d.y[i];
  if (n <= pointLimit) {
    const all = dotPath(Array.from({ length: n }, (_, i) => i), 1.6);
    body += tag('g', { 'data-part': 'points', 'data-count': n }, all ? tag('path', { d: all, fill: THEME.accent, 'fill-opacity': 0.75 }) : '');
  } else {
    const bx = o.binsX ?? 90, by = o.binsY ?? 50;
    const counts = new Float64Array(bx * by);
    let top = 0;
    for (let i = 0; i < n; i++) {
      if (!ok(i)) continue;
      const cx = Math.min(bx - 1, Math.max(0, Math.floor(((x(d.x[i]) - f.left) / (f.right - f.left)) * bx)));
      const cy = Math.min(by - 1, Math.max(0, Math.floor(((f.bottom - y(d.y[i])) / (f.bottom - f.top)) * by)));
      top = Math.max(top, ++counts[cy * bx + cx]);
    }
    // cells shaded in LEVELS steps of log(1 + count); the cells of one step share one path
    const LEVELS = 8;
    const w = (f.right - f.left) / bx, h = (f.bottom - f.top) / by;
    const paths: string[] = Array.from({ length: LEVELS }, () => '');
    for (let c = 0; c < counts.length; c++) {
      if (!counts[c]) continue;
      const level = Math.min(LEVELS - 1, Math.floor((Math.log1p(counts[c]) / Math.log1p(top)) * LEVELS - 1e-9));
      paths[level] += `M${px(f.left + (c % bx) * w)},${px(f.bottom - (Math.floor(c / bx) + 1) * h)}h${px(w + 0.2)}v${px(h + 0.2)}h${px(-(w + 0.2))}z`;
    }
    body += tag(
      'g',
      { 'data-part': 'density' },
      paths.map((p, l) => (p ? tag('path', { d: p, fill: THEME.accent, 'fill-opacity': Number((0.15 + (0.85 * (l + 1)) / LEVELS).toFixed(2)) }) : '')).join(''),
    );
    const em = d.emphasis ?? [];
    const emPath = dotPath(Array.from(em), 1.8);
    body += tag('g', { 'data-part': 'points', 'data-count': Array.from(em).filter(ok).length }, emPath ? tag('path', { d: emPath, fill: THEME.second, 'fill-opacity': 0.85 }) : '');
    body += text(`${n} targets shaded by count per cell; the worst ${em.length} as dots`, { x: f.left, y: 29, fill: THEME.muted, 'font-size': 10 });
  }
  const med = runningMedian(d.x, d.y, xDomain, 16);
  if (med.length > 1) {
    const path = med.map(([mx, my], i) => `${i ? 'L' : 'M'}${px(x(mx))},${px(y(my))}`).join('');
    body += tag('path', { d: path, fill: 'none', stroke: THEME.second, 'stroke-width': 2, 'data-part': 'median' });
    body += text('running median', { x: x(med[med.length - 1][0]) - 4, y: y(med[med.length - 1][1]) - 7, 'text-anchor': 'end', fill: THEME.second, 'font-size': 10, stroke: THEME.background, 'stroke-width': 3, 'paint-order': 'stroke' });
  }
  const s = d.selected;
  if (s !== null && s !== undefined && s >= 0 && s < n && ok(s)) {
    body += tag('circle', { cx: x(d.x[s]), cy: y(d.y[s]), r: 5, fill: 'none', stroke: THEME.alarm, 'stroke-width': 1.8, 'data-part': 'selected' });
  }
  return svgDocument(width, height, d.title, body, 'scatter');
}
