/**
 * The legend under the 3D view in the exported report, as SVG text: the relative-error colour bar
 * (plots/colourScale) and a key for every other colour the view may show (other particles, residual
 * arrows, the picked particle's ring, the slab outline, the box edges). Only what is shown is listed.
 */
import type { ErrorColourScale } from '../plots/colourScale';
import { errorLegend } from '../plots/colourScale';
import { THEME } from '../plots/theme';
import { svgDocument, tag, text } from '../plots/svg';

export interface ViewLegendInput {
  readonly scale: ErrorColourScale;
  /** CSS colours of the view (view3d/scene.ts VIEW_COLOURS as #rrggbb). */
  readonly colours: { readonly background: string; readonly box: string; readonly context: string; readonly arrow: string; readonly ring: string; readonly slab: string };
  /** Words for the arrows shown ("a_A − a_B of the 200 worst"), or null when none are drawn. */
  readonly arrows: string | null;
  readonly contextShown: boolean;
  /** The picked particle's id, or null. */
  readonly picked: string | null;
  /** Words for the slab shown ("slab ⟂ z at 0.5 ± 0.1 of the box"), or null. */
  readonly slab: string | null;
}

/** One key entry: a swatch (dot, line or ring) and words. */
interface Entry {
  readonly kind: 'dot' | 'line' | 'ring';
  readonly colour: string;
  readonly words: string;
}

/** The legend SVG, width × height px; keys go in columns right of the colour bar, 3 per column. */
export function viewLegendSvg(o: ViewLegendInput, width: number, height: number): string {
  const barW = Math.min(300, Math.max(200, width * 0.36));
  const bar = errorLegend(o.scale, barW, 46, 'colour: relative error |a_A − a_B| / |a_B|');
  let body = tag('g', { transform: 'translate(0,4)' }, bar);
  const entries: Entry[] = [{ kind: 'line', colour: o.colours.box, words: 'box edges' }];
  if (o.contextShown) entries.push({ kind: 'dot', colour: o.colours.context, words: 'other particles (not targets)' });
  if (o.arrows) entries.push({ kind: 'line', colour: o.colours.arrow, words: o.arrows });
  if (o.picked) entries.push({ kind: 'ring', colour: o.colours.ring, words: `picked particle ${o.picked}` });
  if (o.slab) entries.push({ kind: 'line', colour: o.colours.slab, words: o.slab });
  const cols = Math.max(1, Math.ceil(entries.length / 3));
  const colW = (width - barW - 16) / Math.max(2, cols);
  entries.forEach((e, i) => {
    const x = barW + 16 + Math.floor(i / 3) * colW;
    const y = 14 + (i % 3) * 18;
    // swatches sit on the view's dark background, as in the view
    body += tag('rect', { x, y: y - 7, width: 22, height: 14, rx: 2, fill: o.colours.background });
    if (e.kind === 'dot') body += tag('circle', { cx: x + 11, cy: y, r: 2.6, fill: e.colour });
    else if (e.kind === 'ring') body += tag('circle', { cx: x + 11, cy: y, r: 5, fill: 'none', stroke: e.colour, 'stroke-width': 1.6 });
    else body += tag('line', { x1: x + 3, x2: x + 19, y1: y, y2: y, stroke: e.colour, 'stroke-width': 1.6 });
    body += text(e.words, { x: x + 28, y: y + 4, fill: THEME.ink, 'font-size': 11 });
  });
  return svgDocument(width, height, 'legend of the 3D view', body, 'view-legend');
}

/** #rrggbb of a 0xRRGGBB number or of [r, g, b] in [0, 1]. */
export function cssColour(c: number | readonly [number, number, number]): string {
  const v = typeof c === 'number' ? c : (Math.round(c[0] * 255) << 16) | (Math.round(c[1] * 255) << 8) | Math.round(c[2] * 255);
  return `#${v.toString(16).padStart(6, '0')}`;
}
