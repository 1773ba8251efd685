import { describe, expect, test } from 'vitest';
import { type FrameAsk, frameRange, perFrameNext, pieceRange } from '../../app/web/view3d/frameBudget';

const ask = (o: Partial<FrameAsk>): FrameAsk => ({ software: true, moving: false, fresh: false, drawnUpTo: 0, perFrame: 25_000, shown: 100_000, still: 100_000, budget: 250_000, ...o });

describe('frameRange', () => {
  test('a still software image is drawn in consecutive frames that cover every slot once, in order, then stops', () => {
    const slots: number[] = [];
    let drawnUpTo = 0, fresh = true, frames = 0;
    for (;;) {
      const r = frameRange(ask({ fresh, drawnUpTo, perFrame: 30_000, shown: 95_000 }));
      if (!r) break;
      frames++;
      expect(r.from === 0).toBe(fresh); // only the first frame clears
      slots.push(r.from, r.to);
      drawnUpTo = r.to;
      fresh = false;
    }
    // ⌈95 000 / 30 000⌉ = 4 frames: [0, 30k) [30k, 60k) [60k, 90k) [90k, 95k)
    expect(frames).toBe(4);
    expect(slots).toEqual([0, 30_000, 30_000, 60_000, 60_000, 90_000, 90_000, 95_000]);
  });

  test('a change or a moving camera starts again from the first slot; without software GL one frame draws all', () => {
    expect(frameRange(ask({ fresh: true, drawnUpTo: 50_000 }))).toEqual({ from: 0, to: 25_000 });
    expect(frameRange(ask({ moving: true, drawnUpTo: 50_000 }))).toEqual({ from: 0, to: 25_000 });
    expect(frameRange(ask({ software: false, still: Infinity, shown: 10 ** 6 }))).toEqual({ from: 0, to: Infinity });
    expect(frameRange(ask({ software: false, moving: true, still: Infinity }))).toEqual({ from: 0, to: 250_000 });
    // a cloud smaller than a frame's budget is drawn at once
    expect(frameRange(ask({ fresh: true, shown: 4096 }))).toEqual({ from: 0, to: 4096 });
    expect(frameRange(ask({ drawnUpTo: 4096, shown: 4096 }))).toBeNull();
  });
});

describe('pieceRange', () => {
  test('splits a frame’s slots over the pieces without overlap or gap', () => {
    const counts = [65_536, 65_536, 10_000];
    for (const [from, to] of [[0, 25_000], [25_000, 70_000], [60_000, 141_072], [140_000, 200_000]]) {
      let o = 0, total = 0;
      const seen: number[] = [];
      for (const c of counts) {
        const r = pieceRange(o, c, from, to);
        expect(r.start >= 0 && r.start + r.count <= c).toBe(true);
        if (r.count > 0) seen.push(o + r.start, o + r.start + r.count);
        total += r.count;
        o += c;
      }
      const want = Math.max(0, Math.min(to, o) - from);
      expect(total).toBe(want);
      // consecutive pieces continue where the previous stopped
      for (let k = 2; k < seen.length; k += 2) expect(seen[k]).toBe(seen[k - 1]);
      if (seen.length) expect(seen[0]).toBe(from);
    }
  });
});

describe('perFrameNext', () => {
  test('halves (up to quarters) after a slow frame, grows by half after a fast full one, keeps within bounds', () => {
    expect(perFrameNext(25_000, 25_000, 70, 35, 4096, 100_000)).toBe(12_500);
    expect(perFrameNext(25_000, 25_000, 400, 35, 4096, 100_000)).toBe(6250);
    expect(perFrameNext(25_000, 25_000, 10, 35, 4096, 100_000)).toBe(37_500);
    expect(perFrameNext(40_000, 40_000, 5, 35, 4096, 50_000)).toBe(50_000);
    expect(perFrameNext(5000, 5000, 500, 35, 4096, 100_000)).toBe(4096);
    // near the goal: unchanged
    expect(perFrameNext(25_000, 25_000, 38, 35, 4096, 100_000)).toBe(25_000);
  });

  test('a short frame that was fast says nothing; a short frame that was slow scales its own size', () => {
    expect(perFrameNext(25_000, 3000, 5, 35, 4096, 100_000)).toBe(25_000);
    expect(perFrameNext(25_000, 10_000, 140, 35, 4096, 100_000)).toBe(4096);
    expect(perFrameNext(25_000, 12_000, 70, 35, 1000, 100_000)).toBe(6000);
  });
});
