/**
 * The colour scale of relative error in the 3D view: log10 of the error mapped onto viridis (a
 * perceptually uniform scientific colour map, via d3-scale-chromatic), on a domain of whole decades
 * chosen from the distribution. Also its legend as SVG text.
 */
import { interpolateViridis } from 'd3';
import { THEME } from './theme';
import { pow10, powerLabel, px, svgDocument, tag, text } from './svg';

export interface ErrorColourScale {
  /** Domain in powers of ten: errors ≤ lo get the first colour, ≥ hi the last. */
  readonly lo: number;
  readonly hi: number;
  /** 256 RGB triples in [0, 1]. */
  readonly table: Float32Array;
}

/** Whole-decade domain from a low quantile and the maximum (spanning 1 to 8 decades). */
export function errorColourScale(low: number, max: number): ErrorColourScale {
  let e1 = Number.isFinite(max) && max > 0 ? Math.ceil(Math.log10(max) - 1e-9) : 0;
  let e0 = Number.isFinite(low) && low > 0 ? Math.floor(Math.log10(low) + 1e-9) : e1 - 4;
  if (e1 <= e0) e1 = e0 + 1;
  if (e1 - e0 > 8) e0 = e1 - 8;
  const table = new Float32Array(256 * 3);
  for (let i = 0; i < 256; i++) {
    const c = interpolateViridis(i / 255);
    const m = /rgb\((\d+), ?(\d+), ?(\d+)\)/.exec(c) ?? /#(..)(..)(..)/.exec(c);
    const rgb = c.startsWith('#') ? [1, 2, 3].map((k) => parseInt(m![k], 16)) : [1, 2, 3].map((k) => Number(m![k]));
    table.set(rgb.map((v) => v / 255), 3 * i);
  }
  return { lo: pow10(e0), hi: pow10(e1), table };
}

/** Table index (0..255) of an error value; zeros and NaN map to 0. */
export function errorColourIndex(s: ErrorColourScale, v: number): number {
  if (!(v > 0)) return 0;
  const t = (Math.log10(v) - Math.log10(s.lo)) / (Math.log10(s.hi) - Math.log10(s.lo));
  return Math.max(0, Math.min(255, Math.round(t * 255)));
}

/** Fills rgb (3 per value, in [0, 1]) for `values`. */
export function errorColours(s: ErrorColourScale, values: ArrayLike<number>, rgb: Float32Array, offset = 0): void {
  const l0 = Math.log10(s.lo), span = Math.log10(s.hi) - l0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    let k = 0;
    if (v > 0) k = Math.max(0, Math.min(255, Math.round(((Math.log10(v) - l0) / span) * 255)));
    rgb[3 * (offset + i)] = s.table[3 * k];
    rgb[3 * (offset + i) + 1] = s.table[3 * k + 1];
    rgb[3 * (offset + i) + 2] = s.table[3 * k + 2];
  }
}

function hex(s: ErrorColourScale, k: number): string {
  return '#' + [0, 1, 2].map((c) => Math.round(s.table[3 * k + c] * 255).toString(16).padStart(2, '0')).join('');
}

/** The legend: a horizontal colour bar with decade labels, width × height px. */
export function errorLegend(s: ErrorColourScale, width = 260, height = 46, title = 'relative error'): string {
  const x0 = 10, x1 = width - 10, y0 = 18, h = 10;
  const stops = Array.from({ length: 11 }, (_, i) => tag('stop', { offset: `${i * 10}%`, 'stop-color': hex(s, Math.round((i / 10) * 255)) })).join('');
  let body = tag('defs', {}, tag('linearGradient', { id: 'tg-err-grad', x1: '0', x2: '1', y1: '0', y2: '0' }, stops));
  body += text(title, { x: x0, y: 12, fill: THEME.ink, 'font-size': 10.5 });
  body += tag('rect', { x: x0, y: y0, width: x1 - x0, height: h, fill: 'url(#tg-err-grad)', stroke: THEME.frame, 'stroke-width': 0.5 });
  const e0 = Math.round(Math.log10(s.lo)), e1 = Math.round(Math.log10(s.hi));
  // at least ~52 px between labels
  const step = Math.max(1, Math.ceil((e1 - e0) / Math.max(1, Math.floor((x1 - x0) / 52))));
  const marks: number[] = [];
  for (let e = e0; e <= e1; e += step) marks.push(e);
  // the top end is always labelled; an inner label too close to it gives way
  if (marks[marks.length - 1] !== e1) {
    if (e1 - marks[marks.length - 1] < step) marks.pop();
    marks.push(e1);
  }
  for (const e of marks) {
    const xx = x0 + ((e - e0) / (e1 - e0)) * (x1 - x0);
    body += tag('line', { x1: xx, x2: xx, y1: y0 + h, y2: y0 + h + 3, stroke: THEME.muted });
    body += text((e === e0 ? '≤ ' : e === e1 ? '≥ ' : '') + powerLabel(pow10(e)), { x: px(xx), y: y0 + h + 14, 'text-anchor': e === e0 ? 'start' : e === e1 ? 'end' : 'middle', fill: THEME.muted, 'font-size': 10 });
  }
  return svgDocument(width, height, 'colour scale of relative error', body, 'legend');
}
