/** Axes for the plots: ticks and labels from d3 scales, grid lines, drawn as SVG text. */
import type { ScaleLinear, ScaleLogarithmic } from 'd3';
import { THEME } from './theme';
import { pow10, powerLabel, px, shortNumber, tag, text } from './svg';

export type AnyScale = ScaleLinear<number, number> | ScaleLogarithmic<number, number>;

/** Tick values: whole powers of ten on a log scale (thinned to at most `max`), d3's ticks on a linear one. */
export function tickValues(scale: AnyScale, log: boolean, max = 8): number[] {
  if (!log) return scale.ticks(Math.min(max, 6));
  const [a, b] = scale.domain() as [number, number];
  const lo = Math.ceil(Math.log10(Math.min(a, b)) - 1e-9);
  const hi = Math.floor(Math.log10(Math.max(a, b)) + 1e-9);
  const span = hi - lo + 1;
  const step = Math.max(1, Math.ceil(span / max));
  const out: number[] = [];
  for (let e = lo; e <= hi; e += step) out.push(pow10(e));
  return out;
}

function label(v: number, log: boolean): string {
  return log ? powerLabel(v) : shortNumber(v);
}

export interface AxisSpec {
  readonly scale: AnyScale;
  readonly log: boolean;
  readonly title?: string;
  readonly max?: number;
  /** Own tick labels (e.g. mesh sizes) instead of generated ones. */
  readonly ticks?: readonly number[];
  readonly format?: (v: number) => string;
}

/** Bottom axis at y with grid lines up to `top`. */
export function axisBottom(spec: AxisSpec, y: number, top: number, grid = true): string {
  const values = spec.ticks ? [...spec.ticks] : tickValues(spec.scale, spec.log, spec.max);
  const [r0, r1] = spec.scale.range();
  let out = tag('line', { x1: r0, x2: r1, y1: y, y2: y, stroke: THEME.frame });
  for (const v of values) {
    const x = spec.scale(v);
    if (grid) out += tag('line', { x1: x, x2: x, y1: top, y2: y, stroke: THEME.grid });
    out += tag('line', { x1: x, x2: x, y1: y, y2: y + 4, stroke: THEME.frame });
    out += text(spec.format ? spec.format(v) : label(v, spec.log), { x, y: y + 15, 'text-anchor': 'middle', fill: THEME.muted });
  }
  if (spec.title) out += text(spec.title, { x: (r0 + r1) / 2, y: y + 31, 'text-anchor': 'middle', fill: THEME.ink });
  return out;
}

/** Left axis at x with grid lines across to `right`. */
export function axisLeft(spec: AxisSpec, x: number, right: number, grid = true): string {
  const values = spec.ticks ? [...spec.ticks] : tickValues(spec.scale, spec.log, spec.max ?? 6);
  const [r0, r1] = spec.scale.range();
  let out = tag('line', { x1: x, x2: x, y1: r0, y2: r1, stroke: THEME.frame });
  for (const v of values) {
    const y = spec.scale(v);
    if (grid) out += tag('line', { x1: x, x2: right, y1: y, y2: y, stroke: THEME.grid });
    out += tag('line', { x1: x - 4, x2: x, y1: y, y2: y, stroke: THEME.frame });
    out += text(spec.format ? spec.format(v) : label(v, spec.log), { x: x - 7, y: y + 3.5, 'text-anchor': 'end', fill: THEME.muted });
  }
  if (spec.title) {
    const cy = (r0 + r1) / 2;
    out += text(spec.title, { x: 0, y: 0, transform: `translate(${px(x - 44)},${px(cy)}) rotate(-90)`, 'text-anchor': 'middle', fill: THEME.ink });
  }
  return out;
}

/** The plotting area (for reuse of margins). */
export interface Frame {
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
}

/** Inner frame of a plot of width × height with the usual margins. */
export function frameOf(width: number, height: number, m: Partial<Frame> = {}): Frame {
  return { left: m.left ?? 58, right: width - (m.right ?? 16), top: m.top ?? 30, bottom: height - (m.bottom ?? 42) };
}
