/**
 * How one method's error falls as its parameter is refined (tolerance, mesh size, shell radius or λ of
 * an image-sum order): one faint line per followed target, their median in bold, and the
 * method's own prediction dashed, all as relative deviation from the tight Ewald value. Log–log.
 */
import { scaleLog } from 'd3';
import { axisBottom, axisLeft, frameOf } from './axes';
import { decadeDomain } from './distributionPlot';
import { THEME } from './theme';
import { px, shortNumber, svgDocument, tag, text } from './svg';

export interface ConvergenceData {
  readonly title: string;
  readonly xLabel: string;
  readonly x: readonly number[];
  /** Per x value, the relative deviation of each followed target. */
  readonly errors: readonly ArrayLike<number>[];
  readonly predicted: readonly (number | null)[];
  /** Reverse the x axis (tolerances: large to small, so that "better" is to the right). */
  readonly reverseX?: boolean;
  /** Label the x ticks with the values themselves (mesh sizes) instead of powers of ten. */
  readonly plainTicks?: boolean;
  /** The floor below which deviations are not resolved (the reference's own tolerance). */
  readonly floor?: number;
  /** y axis title (default: relative deviation from Ewald). */
  readonly yLabel?: string;
}

function median(v: ArrayLike<number>): number {
  const a = Array.from(v).filter((e) => Number.isFinite(e)).sort((p, q) => p - q);
  if (!a.length) return NaN;
  const h = (a.length - 1) / 2;
  return a[Math.floor(h)] + (h - Math.floor(h)) * (a[Math.ceil(h)] - a[Math.floor(h)]);
}

/** SVG text of the convergence plot, width × height px. */
export function convergencePlot(d: ConvergenceData, width = 520, height = 300): string {
  const f = frameOf(width, height, { top: 38 });
  const floor = d.floor ?? 1e-16;
  const clampY = (v: number) => (v > floor ? v : floor);
  let lo = Infinity, hi = 0;
  for (const e of d.errors) for (let i = 0; i < e.length; i++) if (Number.isFinite(e[i])) { lo = Math.min(lo, clampY(e[i])); hi = Math.max(hi, clampY(e[i])); }
  for (const p of d.predicted) if (p !== null && p > 0) { lo = Math.min(lo, p); hi = Math.max(hi, p); }
  const xs = d.x.filter((v) => v > 0);
  const xDomain: [number, number] = [Math.min(...xs), Math.max(...xs)];
  const pad = Math.pow(xDomain[1] / xDomain[0], 0.04);
  const xd: [number, number] = [xDomain[0] / pad, xDomain[1] * pad];
  const x = scaleLog().domain(d.reverseX ? [xd[1], xd[0]] : xd).range([f.left, f.right]);
  const y = scaleLog().domain(decadeDomain(lo, hi)).range([f.bottom, f.top]).clamp(true);
  let body = text(d.title, { x: f.left, y: 16, fill: THEME.ink, 'font-size': 12.5, 'font-weight': 600 });
  body += axisBottom({ scale: x, log: true, title: d.xLabel, ...(d.plainTicks ? { ticks: d.x, format: (v: number) => String(v) } : {}) }, f.bottom, f.top);
  body += axisLeft({ scale: y, log: true, title: d.yLabel ?? 'relative deviation from Ewald' }, f.left, f.right);
  const nt = d.errors.length ? d.errors[0].length : 0;
  let lines = '';
  for (let t = 0; t < nt; t++) {
    const pts = d.x.map((xv, i) => `${i ? 'L' : 'M'}${px(x(xv))},${px(y(clampY(d.errors[i][t])))}`).join('');
    lines += tag('path', { d: pts, fill: 'none', stroke: THEME.faint, 'stroke-width': 0.9, 'stroke-opacity': 0.8 });
  }
  body += tag('g', { 'data-part': 'targets' }, lines);
  const med = d.errors.map((e) => median(e));
  const medPath = d.x.map((xv, i) => `${i ? 'L' : 'M'}${px(x(xv))},${px(y(clampY(med[i])))}`).join('');
  body += tag('path', { d: medPath, fill: 'none', stroke: THEME.accent, 'stroke-width': 2.2, 'data-part': 'median' });
  body += d.x.map((xv, i) => tag('circle', { cx: x(xv), cy: y(clampY(med[i])), r: 2.6, fill: THEME.accent })).join('');
  const pred = d.x.map((xv, i) => [xv, d.predicted[i]] as const).filter(([, p]) => p !== null && p > 0) as [number, number][];
  if (pred.length > 1) {
    body += tag('path', { d: pred.map(([xv, p], i) => `${i ? 'L' : 'M'}${px(x(xv))},${px(y(p))}`).join(''), fill: 'none', stroke: THEME.second, 'stroke-width': 1.6, 'stroke-dasharray': '5 4', 'data-part': 'predicted' });
  }
  // legend
  const lx = f.right - 150, ly = f.top + 8;
  let legend = tag('line', { x1: lx, x2: lx + 18, y1: ly, y2: ly, stroke: THEME.accent, 'stroke-width': 2.2 }) + text(`median of ${nt} targets`, { x: lx + 23, y: ly + 3.5, fill: THEME.ink, 'font-size': 10 });
  legend += tag('line', { x1: lx, x2: lx + 18, y1: ly + 14, y2: ly + 14, stroke: THEME.faint }) + text('each target', { x: lx + 23, y: ly + 17.5, fill: THEME.ink, 'font-size': 10 });
  if (pred.length > 1) legend += tag('line', { x1: lx, x2: lx + 18, y1: ly + 28, y2: ly + 28, stroke: THEME.second, 'stroke-width': 1.6, 'stroke-dasharray': '5 4' }) + text('predicted (rms estimate)', { x: lx + 23, y: ly + 31.5, fill: THEME.ink, 'font-size': 10 });
  body += tag('g', { 'data-part': 'legend' }, legend);
  if (d.floor) body += text(`reference: Ewald at tolerance ${shortNumber(d.floor)}`, { x: f.left, y: 29, fill: THEME.muted, 'font-size': 10 });
  return svgDocument(width, height, d.title, body, 'convergence');
}
