/**
 * Building the 3D view's point clouds without long tasks: the work (draw order, world positions, colours)
 * runs in units of a few thousand points and yields to the page whenever a slice of SLICE_MS is spent,
 * so that 10⁶ particles never hold the main thread for more than a frame or two. A build stops as soon as
 * it is superseded (a newer snapshot or comparison).
 */
import type { Box } from '../../../engine/box';
import { type Shuffle, shuffleStart, shuffleSteps, worldPositionsInto } from './geometry';

/** Longest stretch of cloud building between two yields (ms). */
export const SLICE_MS = 8;

/** Points handled between two looks at the clock. */
const UNIT = 16_384;

/** Ends the current task and resumes in a new one (a message to ourselves: no timer clamping). */
export function yieldTask(): Promise<void> {
  if (typeof MessageChannel === 'undefined') return new Promise((r) => setTimeout(r, 0));
  return new Promise((resolve) => {
    const { port1, port2 } = new MessageChannel();
    port1.onmessage = () => {
      port1.close();
      resolve();
    };
    port2.postMessage(null);
  });
}

/** `tick()` yields once SLICE_MS have passed since the last yield; it resolves false once `alive()` is false. */
export function slicer(alive: () => boolean, sliceMs = SLICE_MS): { tick(): Promise<boolean>; yieldNow(): Promise<boolean> } {
  let since = performance.now();
  const yieldNow = async () => {
    await yieldTask();
    since = performance.now();
    return alive();
  };
  return {
    async tick() {
      if (performance.now() - since < sliceMs) return alive();
      return yieldNow();
    },
    yieldNow,
  };
}

type Tick = () => Promise<boolean>;

/** A seeded random choice of m of n rows in random order (the draw order's prefix), or null when superseded. */
export async function drawOrderSliced(n: number, m: number, tick: Tick, seed = 12345): Promise<Uint32Array | null> {
  const sh: Shuffle = shuffleStart(n, m, seed);
  while (!shuffleSteps(sh, UNIT)) if (!(await tick())) return null;
  return sh.p.subarray(0, sh.m);
}

/** worldPositionsInto over slots [0, count) in slices; false when superseded. */
export async function worldPositionsSliced(out: Float32Array, positions: Float64Array, box: Box, rows: Int32Array | null, order: Uint32Array | undefined, count: number, tick: Tick): Promise<boolean> {
  for (let b = 0; b < count; b += UNIT) {
    if (!(await tick())) return false;
    worldPositionsInto(out, positions, box, rows, order, b, Math.min(count, b + UNIT));
  }
  return true;
}

/** Calls `work(begin, end)` over [0, count) in units, yielding as tick decides; false when superseded. */
export async function forSliced(count: number, work: (begin: number, end: number) => void, tick: Tick): Promise<boolean> {
  for (let b = 0; b < count; b += UNIT) {
    if (!(await tick())) return false;
    work(b, Math.min(count, b + UNIT));
  }
  return true;
}
