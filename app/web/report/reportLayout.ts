/**
 * Where everything of the exported report goes, in CSS pixels (the image is drawn at `pixelRatio`
 * times that): title, header rows, verdict banner, statistics beside the 3D view and its legend, the
 * plots two to a row, notes. A pure function of the content and a text-measuring function (canvas
 * measureText in the page, an estimate in tests): long text is wrapped, so nothing runs off the image.
 */
import { THEME } from '../plots/theme';

/** Width in CSS px of `text` drawn in the CSS `font`. */
export type Measure = (text: string, font: string) => number;

export interface Rect {
  readonly x: number;
  readonly y: number;
  readonly w: number;
  readonly h: number;
}

export type ReportItem =
  | { readonly kind: 'rect'; readonly rect: Rect; readonly fill: string; readonly stroke?: string }
  /** Text with its top at y; `right` is the edge it must stay left of (`align` right: it ends at x). */
  | { readonly kind: 'text'; readonly text: string; readonly x: number; readonly y: number; readonly font: string; readonly fill: string; readonly align: 'left' | 'right'; readonly right: number }
  | { readonly kind: 'svg'; readonly key: string; readonly rect: Rect }
  | { readonly kind: 'view'; readonly rect: Rect };

export interface LayoutContent {
  readonly title: string;
  readonly header: readonly (readonly [string, string])[];
  readonly verdict: { readonly text: string; readonly result: { readonly pass: boolean } };
  readonly stats: readonly (readonly [string, string])[];
  /** Plots two to a row in order; a `full` one takes a row of its own, the whole width. */
  readonly plots: readonly { readonly key: string; readonly height: number; readonly full?: boolean }[];
  readonly notes: readonly string[];
  /** Heading of the 3D view (default: what it shows, "as framed on screen"). */
  readonly viewTitle?: string;
}

export interface LayoutOptions {
  /** CSS px (default 1200). */
  readonly width?: number;
  /** Width ÷ height of the 3D view as framed on screen, or null when there is none. */
  readonly viewAspect: number | null;
  readonly pixelRatio?: number;
}

export interface ReportLayout {
  readonly width: number;
  readonly height: number;
  readonly pixelRatio: number;
  /** Drawn in order. */
  readonly items: readonly ReportItem[];
  /** The blocks, for tests and for the pixel probe: none overlaps another. */
  readonly blocks: Readonly<Record<string, Rect>>;
}

export const REPORT_WIDTH = 1200;
export const REPORT_PIXEL_RATIO = 2;
const MARGIN = 24;
const GAP = 16;
const PAD = 12;
const STATS_WIDTH = 380;
const VIEW_LEGEND_HEIGHT = 64;

export const FONTS = {
  title: `600 22px ${THEME.font}`,
  section: `600 15px ${THEME.font}`,
  label: `600 13px ${THEME.font}`,
  body: `13px ${THEME.font}`,
  verdict: `600 17px ${THEME.font}`,
  note: `12px ${THEME.font}`,
} as const;

const LINE: Record<keyof typeof FONTS, number> = { title: 28, section: 20, label: 18, body: 18, verdict: 23, note: 16 };

/**
 * Splits text into lines no wider than `width` at ordinary spaces (a no-break space, U+00A0, holds its
 * neighbours together); a word too long for a line is cut between characters.
 */
export function wrapText(text: string, width: number, font: string, measure: Measure): string[] {
  const lines: string[] = [];
  let line = '';
  const push = (word: string) => {
    const cand = line ? `${line} ${word}` : word;
    if (measure(cand, font) <= width) {
      line = cand;
      return;
    }
    if (line) lines.push(line);
    line = '';
    // a word wider than the line: cut it into pieces that fit
    let rest = word;
    while (measure(rest, font) > width && rest.length > 1) {
      let k = rest.length - 1;
      while (k > 1 && measure(rest.slice(0, k), font) > width) k--;
      lines.push(rest.slice(0, k));
      rest = rest.slice(k);
    }
    line = rest;
  };
  for (const word of text.split(/[ \t\n\r]+/).filter(Boolean)) push(word);
  if (line || lines.length === 0) lines.push(line);
  return lines;
}

/** The layout of `c` (see the module comment). */
export function reportLayout(c: LayoutContent, measure: Measure, o: LayoutOptions): ReportLayout {
  const W = o.width ?? REPORT_WIDTH;
  const inner = W - 2 * MARGIN;
  const items: ReportItem[] = [];
  const blocks: Record<string, Rect> = {};
  const text = (t: string, x: number, y: number, font: keyof typeof FONTS, fill: string, right: number, align: 'left' | 'right' = 'left') =>
    items.push({ kind: 'text', text: t, x, y, font: FONTS[font], fill, align, right });
  /** Wrapped text from (x, y) within width; returns the height used. */
  const para = (t: string, x: number, y: number, width: number, font: keyof typeof FONTS, fill: string): number => {
    const lines = wrapText(t, width, FONTS[font], measure);
    lines.forEach((l, i) => text(l, x, y + i * LINE[font], font, fill, x + width));
    return lines.length * LINE[font];
  };
  let y = MARGIN;

  // title
  for (const l of wrapText(c.title, inner, FONTS.title, measure)) {
    text(l, MARGIN, y, 'title', THEME.ink, MARGIN + inner);
    y += LINE.title;
  }
  blocks.title = { x: MARGIN, y: MARGIN, w: inner, h: y - MARGIN };
  y += 8;

  // header rows: label column, wrapped values
  const labelW = 130;
  const headerTop = y;
  const headerItems: ReportItem[] = [];
  const start = items.length;
  let hy = y + PAD;
  for (const [label, value] of c.header) {
    const lh = para(label, MARGIN + PAD, hy, labelW, 'label', THEME.muted);
    const vh = para(value, MARGIN + PAD + labelW + PAD, hy, inner - 3 * PAD - labelW, 'body', THEME.ink);
    hy += Math.max(lh, vh) + 4;
  }
  headerItems.push(...items.splice(start));
  blocks.header = { x: MARGIN, y: headerTop, w: inner, h: hy - headerTop + PAD - 4 };
  items.push({ kind: 'rect', rect: blocks.header, fill: '#ffffff', stroke: THEME.frame }, ...headerItems);
  y = headerTop + blocks.header.h + GAP;

  // verdict banner
  const pass = c.verdict.result.pass;
  const vStart = items.length;
  const vh = para(`Verdict: ${c.verdict.text}`, MARGIN + PAD, y + 10, inner - 2 * PAD, 'verdict', pass ? THEME.accent : THEME.alarm);
  const verdictItems = items.splice(vStart);
  blocks.verdict = { x: MARGIN, y, w: inner, h: vh + 20 };
  items.push({ kind: 'rect', rect: blocks.verdict, fill: pass ? '#e4f0ea' : '#f7e4de', stroke: pass ? THEME.accent : THEME.alarm }, ...verdictItems);
  y += blocks.verdict.h + GAP;

  // statistics (left) beside the 3D view (right)
  const rowTop = y;
  const sStart = items.length;
  let sy = y + PAD;
  text('Statistics', MARGIN + PAD, sy, 'section', THEME.ink, MARGIN + STATS_WIDTH - PAD);
  sy += LINE.section + 6;
  const sLabelW = 150;
  for (const [label, value] of c.stats) {
    const lh = para(label, MARGIN + PAD, sy, sLabelW, 'body', THEME.muted);
    const vh2 = para(value, MARGIN + PAD + sLabelW + PAD, sy, STATS_WIDTH - 3 * PAD - sLabelW, 'body', THEME.ink);
    sy += Math.max(lh, vh2) + 2;
  }
  const statsItems = items.splice(sStart);
  let rowBottom = sy + PAD;
  if (o.viewAspect !== null && o.viewAspect > 0 && Number.isFinite(o.viewAspect)) {
    const vx = MARGIN + STATS_WIDTH + GAP;
    const vw = inner - STATS_WIDTH - GAP;
    const vStart2 = items.length;
    const th = para(c.viewTitle ?? 'Where the discrepancy sits (the 3D view as framed on screen)', vx, y, vw, 'section', THEME.ink);
    const viewTitleItems = items.splice(vStart2);
    let w = vw, h = vw / o.viewAspect;
    if (h > 560) {
      h = 560;
      w = h * o.viewAspect;
    } else if (h < 240) {
      h = 240;
      w = Math.min(vw, h * o.viewAspect);
      h = w / o.viewAspect;
    }
    blocks.view = { x: vx + (vw - w) / 2, y: y + th + 4, w, h };
    blocks.viewLegend = { x: vx, y: blocks.view.y + h + 6, w: vw, h: VIEW_LEGEND_HEIGHT };
    items.push(...viewTitleItems, { kind: 'view', rect: blocks.view }, { kind: 'svg', key: 'view-legend', rect: blocks.viewLegend });
    rowBottom = Math.max(rowBottom, blocks.viewLegend.y + blocks.viewLegend.h);
  }
  blocks.stats = { x: MARGIN, y: rowTop, w: STATS_WIDTH, h: rowBottom - rowTop };
  items.push({ kind: 'rect', rect: blocks.stats, fill: '#ffffff', stroke: THEME.frame }, ...statsItems);
  y = rowBottom + GAP;

  // plots, two to a row (a full-width one alone)
  const colW = (inner - GAP) / 2;
  for (let i = 0; i < c.plots.length; ) {
    const row = c.plots[i].full ? [c.plots[i]] : c.plots.slice(i, i + 2).filter((p, k) => k === 0 || !p.full);
    i += row.length;
    const h = Math.max(...row.map((p) => p.height));
    row.forEach((p, k) => {
      const r = { x: MARGIN + k * (colW + GAP), y, w: p.full ? inner : colW, h: p.height };
      blocks[`plot-${p.key}`] = r;
      items.push({ kind: 'svg', key: p.key, rect: r });
    });
    y += h + GAP;
  }

  // notes
  const nTop = y;
  for (const n of c.notes) y += para(n, MARGIN, y, inner, 'note', THEME.muted) + 4;
  blocks.notes = { x: MARGIN, y: nTop, w: inner, h: y - nTop };
  const height = Math.ceil(y - 4 + MARGIN);
  return { width: W, height, pixelRatio: o.pixelRatio ?? REPORT_PIXEL_RATIO, items, blocks };
}

/** Whether two rectangles share any area. */
export function rectsOverlap(a: Rect, b: Rect): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}
