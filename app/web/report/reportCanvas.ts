/**
 * Draws a report layout (reportLayout.ts) on a canvas at its pixel ratio: an opaque background, boxes,
 * text, the SVG plots (rasterised through an Image from a blob URL; the page's CSP allows blob: images)
 * and a copy of the 3D view (a canvas copy or the view worker's bitmap). The only DOM part of the report.
 */
import { THEME } from '../plots/theme';
import type { Measure, ReportLayout } from './reportLayout';

/** A text measure backed by a 2D canvas context. */
export function canvasMeasure(): Measure {
  const ctx = document.createElement('canvas').getContext('2d')!;
  return (text, font) => {
    ctx.font = font;
    return ctx.measureText(text).width;
  };
}

/** The root <svg>'s width and height set to `scale` times theirs (the viewBox stays): a sharp raster. */
export function svgScaled(svg: string, scale: number): string {
  const end = svg.indexOf('>');
  const root = svg.slice(0, end).replace(/ (width|height)="([\d.]+)"/g, (_, k: string, v: string) => ` ${k}="${Number(v) * scale}"`);
  return root + svg.slice(end);
}

/** An SVG text as a decoded image. */
export async function svgImage(svg: string, scale: number): Promise<HTMLImageElement> {
  const url = URL.createObjectURL(new Blob([svgScaled(svg, scale)], { type: 'image/svg+xml' }));
  try {
    const img = new Image();
    img.src = url;
    await img.decode();
    return img;
  } finally {
    // the decoded image keeps its pixels; the URL is not needed after decoding
    setTimeout(() => URL.revokeObjectURL(url), 0);
  }
}

/** The 3D view's image as the report draws it: a canvas copy, or a bitmap from the view worker. */
export type ReportViewImage = CanvasImageSource & { readonly width: number; readonly height: number };

/** A copy of a canvas as it is now (the 3D view keeps its drawing buffer), or null. */
export function canvasSnapshot(src: HTMLCanvasElement | null): HTMLCanvasElement | null {
  if (!src || src.width === 0 || src.height === 0) return null;
  const c = document.createElement('canvas');
  c.width = src.width;
  c.height = src.height;
  c.getContext('2d')!.drawImage(src, 0, 0);
  return c;
}

/** The report drawn on a new canvas of layout.width·ratio × layout.height·ratio pixels. */
export async function reportCanvasDraw(layout: ReportLayout, svgs: Readonly<Record<string, string>>, view: ReportViewImage | null): Promise<HTMLCanvasElement> {
  const r = layout.pixelRatio;
  const images = new Map<string, HTMLImageElement>();
  await Promise.all(
    layout.items.map(async (it) => {
      if (it.kind === 'svg' && svgs[it.key] && !images.has(it.key)) images.set(it.key, await svgImage(svgs[it.key], r));
    }),
  );
  const canvas = document.createElement('canvas');
  canvas.width = Math.round(layout.width * r);
  canvas.height = Math.round(layout.height * r);
  const ctx = canvas.getContext('2d', { alpha: false })!;
  ctx.setTransform(r, 0, 0, r, 0, 0);
  ctx.fillStyle = '#eceee8';
  ctx.fillRect(0, 0, layout.width, layout.height);
  ctx.textBaseline = 'top';
  for (const it of layout.items) {
    if (it.kind === 'rect') {
      ctx.fillStyle = it.fill;
      ctx.fillRect(it.rect.x, it.rect.y, it.rect.w, it.rect.h);
      if (it.stroke) {
        ctx.strokeStyle = it.stroke;
        ctx.lineWidth = 1;
        ctx.strokeRect(it.rect.x + 0.5, it.rect.y + 0.5, it.rect.w - 1, it.rect.h - 1);
      }
    } else if (it.kind === 'text') {
      ctx.font = it.font;
      ctx.fillStyle = it.fill;
      ctx.textAlign = it.align;
      ctx.fillText(it.text, it.x, it.y);
    } else if (it.kind === 'svg') {
      const img = images.get(it.key);
      if (img) ctx.drawImage(img, it.rect.x, it.rect.y, it.rect.w, it.rect.h);
      ctx.strokeStyle = THEME.frame;
      ctx.lineWidth = 1;
      ctx.strokeRect(it.rect.x + 0.5, it.rect.y + 0.5, it.rect.w - 1, it.rect.h - 1);
    } else if (it.kind === 'view' && view) {
      ctx.imageSmoothingQuality = 'high';
      ctx.drawImage(view, it.rect.x, it.rect.y, it.rect.w, it.rect.h);
    }
  }
  return canvas;
}
