/**
 * How the plain image sum of one summation order converges, target by target: one small panel per
 * followed particle with one component of its partial sum against the shell radius R (or against the
 * screening λ, log axis, λ → 0 to the right), the Ewald value as a solid horizontal line and the limit
 * the order is predicted to reach as a dashed one. Each panel has its own linear y scale.
 */
import { scaleLinear, scaleLog } from 'd3';
import { type AnyScale, tickValues } from './axes';
import { THEME } from './theme';
import { px, shortNumber, svgDocument, tag, text } from './svg';

export interface OrderPanel {
  /** "row 17 · worst 1". */
  readonly title: string;
  /** The partial sums' component per row of x. */
  readonly y: readonly number[];
  readonly ewald: number;
  /** Predicted limit; null when the order has none. */
  readonly limit: number | null;
}

export interface OrderConvergenceData {
  readonly title: string;
  readonly xLabel: string;
  /** Shell radius R per row, or λ per row (then `logX`). */
  readonly x: readonly number[];
  readonly logX: boolean;
  /** Component plotted, for the y labels ("a_z"). */
  readonly yLabel: string;
  readonly panels: readonly OrderPanel[];
}

/** Columns of the panel grid. */
export const ORDER_PANEL_COLUMNS = 3;

/**
 * y range of a panel: every value from the first eighth of the rows on (the home cell and the first
 * shells can lie far off; they are drawn at the panel's edge), the Ewald value and the limit; padded.
 */
export function orderPanelDomain(p: OrderPanel): [number, number] {
  const skip = Math.floor(p.y.length / 8);
  const vals = [...p.y.slice(skip), p.ewald, ...(p.limit !== null ? [p.limit] : [])].filter(Number.isFinite);
  if (!vals.length) return [-1, 1];
  let lo = Math.min(...vals), hi = Math.max(...vals);
  const span = hi - lo;
  const pad = span > 0 ? 0.12 * span : Math.max(Math.abs(hi) * 0.01, 1e-300);
  lo -= pad;
  hi += pad;
  return [lo, hi];
}

/**
 * A tick label with enough significant digits to tell neighbouring ticks apart (a narrow range about a
 * large value: 125.98, 126.00), at least 3.
 */
export function tickText(v: number, ticks: readonly number[]): string {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : 0;
  const big = Math.max(...ticks.map(Math.abs));
  const digits = step > 0 && big > 0 ? Math.min(12, Math.max(3, Math.ceil(Math.log10(big / step) + 1e-9) + 1)) : 3;
  if (digits <= 3) return shortNumber(v);
  if (v === 0) return '0';
  return String(Number(v.toPrecision(digits)));
}

function panelSvg(d: OrderConvergenceData, p: OrderPanel, left: number, top: number, w: number, h: number, bottomAxis: boolean): string {
  const x: AnyScale = (d.logX ? scaleLog() : scaleLinear()).domain(d.logX ? [Math.max(...d.x) * 1.15, Math.min(...d.x) / 1.15] : [Math.min(...d.x), Math.max(...d.x)]).range([left, left + w]);
  const y = scaleLinear().domain(orderPanelDomain(p)).range([top + h, top]).clamp(true);
  let out = tag('rect', { x: left, y: top, width: w, height: h, fill: 'none', stroke: THEME.frame });
  const yt = y.ticks(3);
  for (const v of yt) {
    out += tag('line', { x1: left, x2: left + w, y1: y(v), y2: y(v), stroke: THEME.grid });
    out += text(tickText(v, yt), { x: left - 4, y: y(v) + 3.5, 'text-anchor': 'end', fill: THEME.muted, 'font-size': 9 });
  }
  // λ values are few: each gets its tick; shell radii get round numbers
  const xt = d.logX ? (d.x.length <= 6 ? [...d.x] : tickValues(x, true, 4)) : scaleLinear().domain(x.domain()).ticks(4);
  for (const v of xt) {
    out += tag('line', { x1: x(v), x2: x(v), y1: top + h, y2: top + h + 3, stroke: THEME.frame });
    if (bottomAxis) out += text(d.logX ? shortNumber(v) : String(v), { x: x(v), y: top + h + 13, 'text-anchor': 'middle', fill: THEME.muted, 'font-size': 9 });
  }
  out += tag('line', { x1: left, x2: left + w, y1: y(p.ewald), y2: y(p.ewald), stroke: THEME.second, 'stroke-width': 1.6, 'data-part': 'ewald' });
  if (p.limit !== null) out += tag('line', { x1: left, x2: left + w, y1: y(p.limit), y2: y(p.limit), stroke: THEME.alarm, 'stroke-width': 1.4, 'stroke-dasharray': '5 3', 'data-part': 'limit' });
  const pts = d.x.map((xv, i) => [x(xv), y(p.y[i])] as const);
  out += tag('path', { d: pts.map(([a, b], i) => `${i ? 'L' : 'M'}${px(a)},${px(b)}`).join(''), fill: 'none', stroke: THEME.accent, 'stroke-width': 1.5, 'data-part': 'partial' });
  if (pts.length <= 40) out += pts.map(([a, b]) => tag('circle', { cx: a, cy: b, r: 1.8, fill: THEME.accent })).join('');
  out += text(p.title, { x: left, y: top - 5, fill: THEME.ink, 'font-size': 10 });
  return tag('g', { 'data-part': 'panel' }, out);
}

/** SVG text of the order's convergence panels, width × height px (about 180 px of height per row of panels). */
export function orderConvergencePlot(d: OrderConvergenceData, width = 560, height?: number): string {
  const cols = Math.min(ORDER_PANEL_COLUMNS, Math.max(1, d.panels.length));
  const rows = Math.max(1, Math.ceil(d.panels.length / cols));
  const H = height ?? 80 + rows * 160;
  const left = 54, right = 10, top = 62, bottom = 36, gapX = 52, gapY = 34;
  const w = (width - left - right - gapX * (cols - 1)) / cols;
  const h = (H - top - bottom - gapY * (rows - 1)) / rows;
  let body = text(d.title, { x: 10, y: 16, fill: THEME.ink, 'font-size': 12.5, 'font-weight': 600 });
  // legend
  let lx = 10;
  const ly = 34;
  const item = (svg: string, label: string) => {
    body += svg.replace(/X0/g, String(lx)).replace(/X1/g, String(lx + 18)) + text(label, { x: lx + 23, y: ly + 3.5, fill: THEME.ink, 'font-size': 10 });
    lx += 30 + label.length * 5.4;
  };
  item(`<line x1="X0" x2="X1" y1="${ly}" y2="${ly}" stroke="${THEME.accent}" stroke-width="1.5"/>`, `partial sum, ${d.yLabel}`);
  item(`<line x1="X0" x2="X1" y1="${ly}" y2="${ly}" stroke="${THEME.second}" stroke-width="1.6"/>`, 'Ewald');
  if (d.panels.some((p) => p.limit !== null)) item(`<line x1="X0" x2="X1" y1="${ly}" y2="${ly}" stroke="${THEME.alarm}" stroke-width="1.4" stroke-dasharray="5 3"/>`, 'predicted limit');
  d.panels.forEach((p, i) => {
    const c = i % cols, r = Math.floor(i / cols);
    const last = r === rows - 1 || i + cols >= d.panels.length;
    body += panelSvg(d, p, left + c * (w + gapX), top + r * (h + gapY), w, h, last);
  });
  body += text(d.xLabel, { x: (left + width - right) / 2, y: H - 8, 'text-anchor': 'middle', fill: THEME.ink });
  body += text(`${d.yLabel} (acceleration units)`, { x: 0, y: 0, transform: `translate(12,${px((top + H - bottom) / 2)}) rotate(-90)`, 'text-anchor': 'middle', fill: THEME.ink });
  return svgDocument(width, H, d.title, body, 'order-convergence');
}
