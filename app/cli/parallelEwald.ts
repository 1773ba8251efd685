/**
 * Ewald forces on several worker_threads over shared memory. Scheduling only: the numerics are the
 * engine's (ewald.ts), run in the same order of pieces as ewaldForces on one thread:
 *   setup (each worker, with the parameters the main thread chose) → partial structure factors over
 *   source ranges (summed here) → target/cell chunks handed out on demand → unsort + finalize here.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { type Box } from '../../engine/box';
import {
  type EwaldResult,
  type Progress,
  ewaldFinalize,
  ewaldRefineWeak,
  ewaldSetup,
  ewaldTargetsValidate,
  ewaldUnsort,
  ewaldWeighStructureFactor,
} from '../../engine/ewald/ewald';
import type { EwaldOptions } from '../../engine/ewald/params';
import { ewaldForces } from '../../engine/ewald/ewald';
import type { WorkerReply, WorkerRequest } from './parallelProtocol';

/** Default thread count: all cores. */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

function shared(a: Float64Array | Int32Array): SharedArrayBuffer {
  const buf = new SharedArrayBuffer(a.byteLength);
  new Uint8Array(buf).set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
  return buf;
}

class Pool {
  private workers: Worker[] = [];
  private waiting: ((r: WorkerReply) => void)[] = [];
  private failed: Error | null = null;

  constructor(count: number, url: URL) {
    for (let i = 0; i < count; i++) {
      const w = new Worker(url);
      const idx = i;
      w.on('message', (r: WorkerReply) => {
        const cb = this.waiting[idx];
        if (r.type === 'error') this.failed = new Error(r.message);
        if (cb) cb(r);
      });
      w.on('error', (e) => {
        this.failed = e instanceof Error ? e : new Error(String(e));
        this.waiting[idx]?.({ type: 'error', message: this.failed.message });
      });
      this.workers.push(w);
    }
  }

  get size(): number {
    return this.workers.length;
  }

  send(i: number, msg: WorkerRequest): Promise<WorkerReply> {
    return new Promise((resolve, reject) => {
      this.waiting[i] = (r) => {
        if (r.type === 'error') reject(new Error(r.message));
        else resolve(r);
      };
      this.workers[i].postMessage(msg);
    });
  }

  /** Hands chunks [k·step, …) of [0, total) to whichever worker is free. */
  async distribute(type: 'targets' | 'fourier' | 'cells', total: number, step: number, onChunk: (doneCount: number) => void): Promise<void> {
    let next = 0;
    let done = 0;
    const loop = async (i: number) => {
      while (next < total) {
        const begin = next;
        const end = Math.min(total, begin + step);
        next = end;
        await this.send(i, { type, begin, end });
        done += end - begin;
        onChunk(done);
      }
    };
    await Promise.all(this.workers.map((_, i) => loop(i)));
  }

  close(): Promise<unknown> {
    return Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/**
 * Accelerations (G·mass/length²) and potentials (zero-mean) for `targets` (input rows; null = all) on
 * `threads` worker threads; threads = 1 runs in this thread. Same results as ewaldForces up to rounding.
 * workerUrl: the compiled worker module (defaults to forceWorker.mjs beside this bundle).
 */
export async function ewaldForcesThreads(
  positions: Float64Array,
  masses: Float64Array,
  box: Box,
  targets: Int32Array | null,
  options: EwaldOptions,
  threads: number = defaultThreads(),
  onProgress?: Progress,
  workerUrl: URL = new URL('./forceWorker.mjs', import.meta.url),
): Promise<EwaldResult> {
  const n = masses.length;
  if (threads <= 1 || n < 2048) return ewaldForces(positions, masses, box, targets, options, onProgress);
  const tg = targets ?? Int32Array.from({ length: n }, (_, i) => i);
  ewaldTargetsValidate(tg, n);
  const all = tg.length === n && tg.every((v, i) => v === i);
  // Workers start loading while the parameters are chosen here; they are pinned so that every worker
  // builds the identical setup.
  const pool = new Pool(threads, workerUrl);
  let setup;
  try {
    setup = ewaldSetup(positions, masses, box, options, all ? n : tg.length);
  } catch (e) {
    await pool.close();
    throw e;
  }
  const p = setup.params;
  const pinned: EwaldOptions = { ...options, alpha: p.alpha, rCut: p.rCut, kCut: p.kCut };
  const K = tg.length;
  const accBuf = new SharedArrayBuffer(8 * 3 * K);
  const phiBuf = new SharedArrayBuffer(8 * K);
  try {
    const posBuf = shared(setup.positions);
    const massBuf = shared(masses);
    const tgBuf = shared(tg);
    await Promise.all(
      Array.from({ length: pool.size }, (_, i) =>
        pool.send(i, { type: 'setup', positions: posBuf, masses: massBuf, box: [box.lx, box.ly, box.lz], options: pinned, targetCount: all ? n : K, targets: tgBuf, acc: accBuf, phi: phiBuf }),
      ),
    );
    // Structure factor: one source range per worker, summed here.
    const parts = await Promise.all(
      Array.from({ length: pool.size }, (_, i) =>
        pool.send(i, { type: 'structure', begin: Math.floor((i * n) / pool.size), end: Math.floor(((i + 1) * n) / pool.size) }),
      ),
    );
    const s = new Float64Array(2 * setup.kspace.count);
    for (const r of parts) if (r.type === 'structure') for (let k = 0; k < s.length; k++) s[k] += r.s[k];
    const weighted = ewaldWeighStructureFactor(setup, s);
    const wBuf = shared(weighted);
    await Promise.all(Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'weighted', weighted: wBuf })));
    onProgress?.(0.2);
    const acc = new Float64Array(accBuf);
    const phi = new Float64Array(phiBuf);
    if (all) {
      const nc = setup.cells.start.length - 1;
      const cellStep = Math.max(1, Math.ceil(nc / (pool.size * 24)));
      await pool.distribute('cells', nc, cellStep, (d) => onProgress?.(0.2 + (0.45 * d) / nc));
      await pool.distribute('fourier', K, Math.max(64, Math.ceil(K / (pool.size * 24))), (d) => onProgress?.(0.65 + (0.35 * d) / K));
      const collected = await Promise.all(Array.from({ length: pool.size }, (_, i) => pool.send(i, { type: 'collect' })));
      for (const r of collected) if (r.type === 'collected') ewaldUnsort(setup, r.accSorted, r.phiSorted, acc, phi);
    } else {
      await pool.distribute('targets', K, Math.max(16, Math.ceil(K / (pool.size * 24))), (d) => onProgress?.(0.2 + (0.8 * d) / K));
    }
    const accOut = Float64Array.from(acc);
    const phiOut = Float64Array.from(phi);
    ewaldFinalize(setup, tg, accOut, phiOut);
    const refined = ewaldRefineWeak(positions, masses, box, tg, accOut, phiOut, setup.params, options);
    return { targets: tg, acc: accOut, phi: phiOut, params: setup.params, wrapped: setup.wrapped, refined };
  } finally {
    await pool.close();
  }
}
