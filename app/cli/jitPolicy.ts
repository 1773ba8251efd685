/**
 * V8's optimising compiler for a short run. In `torusgrav forces` on a small snapshot every JavaScript
 * loop over the particles (validation, wrapping, cell list, unsorting, finalising) runs once or twice, so
 * compiling it optimised in the background costs CPU on the two cores the kernels need and is ready only
 * when the loop is nearly done; the kernels themselves are WebAssembly, which this does not touch.
 * Measured 2026-12-02 (N = 16384, 2 threads, 6 alternating runs): 0.69–0.71 s against 0.72–0.76 s wall,
 * 1.14–1.18 s against 1.20–1.27 s CPU. Larger or compressed inputs keep the optimising compiler (gzip
 * inflation and particle-mesh loops are JavaScript and need it: PME on 2^18 particles took 4× longer
 * without). TORUSGRAV_FULL_JIT=1 keeps it always.
 */
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { setFlagsFromString } from 'node:v8';

/** Input size up to which a direct-Ewald run goes without the optimising compiler. */
const LIGHT_MAX_BYTES = 8 << 20;

/** Whether `file` is small enough and uncompressed (read-only peek; false on any failure). */
export function jitLightSuits(file: string): boolean {
  if (process.env.TORUSGRAV_FULL_JIT === '1') return false;
  try {
    if (statSync(file).size > LIGHT_MAX_BYTES) return false;
    const fd = openSync(file, 'r');
    try {
      const head = Buffer.alloc(2);
      const got = readSync(fd, head, 0, 2, 0);
      return !(got === 2 && head[0] === 0x1f && head[1] === 0x8b);
    } finally {
      closeSync(fd);
    }
  } catch {
    return false; // the reader reports the problem
  }
}

/** Turns V8's optimising compiler off for the rest of this process (and its worker threads). */
export function jitLight(): void {
  setFlagsFromString('--no-opt');
}
