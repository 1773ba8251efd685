/**
 * How many points a frame of the 3D view draws, as pure functions (scene.ts applies them). Without a GPU
 * the page's thread waits for each frame's pixels, so a frame draws at most `perFrame` points, adapted
 * to the measured wait; a still image with more points is drawn over several frames, each adding the
 * next points of the draw order to the kept drawing buffer.
 */

export interface FrameAsk {
  /** WebGL is rendered in software (frames are budgeted and still images progressive). */
  readonly software: boolean;
  /** The camera moves (each frame is thrown away by the next). */
  readonly moving: boolean;
  /** Something shown changed since the last frame: the image starts anew. */
  readonly fresh: boolean;
  /** Points of the current still image drawn so far. */
  readonly drawnUpTo: number;
  /** Software: most points a frame draws. */
  readonly perFrame: number;
  /** Points a finished still image shows. */
  readonly shown: number;
  /** Most points a still image shows (Infinity with a GPU). */
  readonly still: number;
  /** With a GPU: points drawn while moving. */
  readonly budget: number;
}

/**
 * The slots [from, to) of the draw order the next frame draws (from = 0: it clears and draws the box,
 * arrows and ring too), or null when the still image is already complete.
 */
export function frameRange(a: FrameAsk): { from: number; to: number } | null {
  if (!a.software) return { from: 0, to: a.moving ? Math.min(a.budget, a.still) : a.still };
  if (a.moving || a.fresh) return { from: 0, to: Math.min(a.shown, a.perFrame) };
  const from = a.drawnUpTo, to = Math.min(a.shown, a.drawnUpTo + a.perFrame);
  return to > from ? { from, to } : null;
}

/** The part of the frame's slots [from, to) in a piece holding slots [offset, offset + count): start within the piece and count. */
export function pieceRange(offset: number, count: number, from: number, to: number): { start: number; count: number } {
  const a = Math.max(from, offset), b = Math.min(to, offset + count);
  return b > a ? { start: a - offset, count: b - a } : { start: 0, count: 0 };
}

/**
 * The next frame's point budget after a frame of `points` points whose pixels took `waitMs`: scaled by
 * goalMs / waitMs (at most ×1.5 up, ×4 down; unchanged within 20 %), within [min, max]. A frame well short
 * of the budget says nothing about a full one unless it was slow.
 */
export function perFrameNext(perFrame: number, points: number, waitMs: number, goalMs: number, min: number, max: number): number {
  if (points < perFrame / 2 && waitMs < goalMs) return perFrame;
  const f = Math.min(1.5, Math.max(0.25, goalMs / Math.max(1, waitMs)));
  if (f >= 0.8 && f <= 1.25) return perFrame;
  return Math.max(min, Math.min(max, Math.round(Math.min(perFrame, Math.max(points, 1)) * f)));
}
