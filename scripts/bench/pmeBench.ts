/**
 * Particle-mesh Ewald benchmark: one JSON object per line. `npx tsx scripts/bench/pmeBench.ts [--quick]`.
 * For N = 2^15, 2^18 and 10^6, uniform and clumped (engine demo snapshot), seeded, at tol 1e-4 and 1e-6:
 * wall and CPU seconds of the whole all-particle computation on one thread (setup included) with its
 * phases, the process's peak resident memory (each case runs in a fresh child process so the high-water
 * mark is its own), the chosen parameters, and the measured relative acceleration error against direct
 * Ewald (ewaldForces at tol 1e-10) on 1000 random targets: rms, percentiles, max, and the ratio of the
 * measured rms to the predicted one. The machine is shared: the load average is printed with each line.
 * `--threads 2` (default; `--threads 1` for one thread): the main thread chooses the parameters; a worker
 * thread builds a pinned setup over shared buffers, and every phase is split between the two: mass
 * assignment in x-slab blocks that write disjoint mesh planes (even blocks, then odd), FFT column blocks
 * and slabs, interpolation by particle halves, real-space cells from a shared counter (a sketch of the
 * scheduling the CLI can adopt).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker, isMainThread, parentPort } from 'node:worker_threads';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import {
  pmeFinalize,
  pmeForwardChunk,
  pmeInterpolateChunk,
  pmeInverseChunk,
  pmeMeshLength,
  pmePredictedErrors,
  pmeRealChunk,
  pmeRealCollect,
  pmeScratch,
  pmeSetup,
  pmeSetupPinned,
  type PmeParams,
  type PmeSetup,
  pmeSolveChunk,
  pmeSpreadBlocks,
  pmeSpreadChunk,
  pmeWorkUnits,
} from '../../engine/pme/index';
import { targetsResolve } from '../../engine/targets';
import { randomSeeded } from '../../engine/util/random';

const SEED = 20240611;
const TARGETS = 1000;
const REF_TOL = 1e-10;

function emit(o: Record<string, unknown>): void {
  process.stdout.write(JSON.stringify(o) + '\n');
}

function snapshot(n: number, kind: string): { positions: Float64Array; masses: Float64Array } {
  if (kind === 'clumped') {
    const d = demoSnapshot(n, SEED % 1000);
    return { positions: d.positions, masses: d.masses };
  }
  const r = randomSeeded(SEED);
  return { positions: Float64Array.from({ length: 3 * n }, () => r()), masses: new Float64Array(n).fill(1 / n) };
}

function round(x: number, digits = 4): number {
  return Number.isFinite(x) ? +x.toPrecision(digits) : x;
}

/** Reference accelerations on the sampled targets, cached in the temp folder (both tolerances use them). */
function reference(n: number, kind: string, positions: Float64Array, masses: Float64Array, targets: Int32Array): { acc: Float64Array; seconds: number; cached: boolean } {
  const dir = join(tmpdir(), 'torusgrav-pme-bench');
  const file = join(dir, `ref-${kind}-${n}-${SEED}-${TARGETS}.bin`);
  if (existsSync(file)) {
    const buf = readFileSync(file);
    const all = new Float64Array(buf.buffer, buf.byteOffset, buf.byteLength / 8);
    return { acc: Float64Array.from(all.subarray(1)), seconds: all[0], cached: true };
  }
  const t0 = performance.now();
  const ref = ewaldForces(positions, masses, boxMake(1), targets, { tol: REF_TOL });
  const seconds = (performance.now() - t0) / 1000;
  mkdirSync(dir, { recursive: true });
  const out = new Float64Array(1 + ref.acc.length);
  out[0] = seconds;
  out.set(ref.acc, 1);
  writeFileSync(file, new Uint8Array(out.buffer));
  return { acc: ref.acc, seconds, cached: false };
}

function percentile(sorted: Float64Array, q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
}

/** Requests from the main thread to the worker; the worker replies { done: true } or with its sums. */
type WorkerRequest =
  | {
      readonly type: 'setup';
      readonly positions: SharedArrayBuffer;
      readonly masses: SharedArrayBuffer;
      readonly box: [number, number, number];
      readonly params: PmeParams;
      readonly mesh: SharedArrayBuffer;
      readonly acc: SharedArrayBuffer;
      readonly phi: SharedArrayBuffer;
      readonly counter: SharedArrayBuffer;
      readonly step: number;
    }
  | { readonly type: 'spread' | 'forward' | 'solve' | 'inverse' | 'interpolate'; readonly begin: number; readonly end: number }
  | { readonly type: 'real' }
  | { readonly type: 'collect' };

/** Worker side: a pinned setup over the shared mesh and result arrays, then pieces on request. */
function workerMain(): void {
  let setup: PmeSetup | null = null;
  let mesh: Float64Array = new Float64Array(0), acc: Float64Array = new Float64Array(0), phi: Float64Array = new Float64Array(0);
  let counter: Int32Array = new Int32Array(1);
  let step = 1;
  let scratch: ReturnType<typeof pmeScratch> | null = null;
  parentPort!.on('message', (r: WorkerRequest) => {
    if (r.type === 'setup') {
      setup = pmeSetupPinned(new Float64Array(r.positions), new Float64Array(r.masses), boxMake(...r.box), r.params);
      mesh = new Float64Array(r.mesh);
      acc = new Float64Array(r.acc);
      phi = new Float64Array(r.phi);
      counter = new Int32Array(r.counter);
      step = r.step;
      scratch = pmeScratch(setup);
    } else if (r.type === 'spread') pmeSpreadChunk(setup!, mesh, r.begin, r.end);
    else if (r.type === 'forward') pmeForwardChunk(setup!, mesh, r.begin, r.end, scratch!);
    else if (r.type === 'solve') pmeSolveChunk(setup!, mesh, r.begin, r.end, scratch!);
    else if (r.type === 'inverse') pmeInverseChunk(setup!, mesh, r.begin, r.end, scratch!);
    else if (r.type === 'interpolate') pmeInterpolateChunk(setup!, mesh, r.begin, r.end, acc, phi);
    else if (r.type === 'real') realFromCounter(setup!, counter, step);
    else if (r.type === 'collect') {
      const n = setup!.masses.length;
      const a = new Float64Array(3 * n), p = new Float64Array(n);
      pmeRealCollect(setup!, a, p);
      parentPort!.postMessage({ acc: a, phi: p }, [a.buffer, p.buffer]);
      return;
    }
    parentPort!.postMessage({ done: true });
  });
}

/** Real-space cells taken from a shared counter until none are left. */
function realFromCounter(setup: PmeSetup, counter: Int32Array, step: number): void {
  const total = pmeWorkUnits(setup).cells;
  for (;;) {
    const c = Atomics.add(counter, 0, step);
    if (c >= total) break;
    pmeRealChunk(setup, c, Math.min(total, c + step));
  }
}

/** A worker running this same file (as TypeScript through tsx's loader, or as the bundled script). */
function startWorker(): Worker {
  const self = import.meta.url;
  if (!self.endsWith('.ts')) return new Worker(fileURLToPath(self));
  const boot = `import('tsx/esm/api').then((m) => { m.register(); return import(${JSON.stringify(self)}); })`;
  return new Worker(boot, { eval: true, execArgv: [] });
}

/** Sends a request and resolves with the worker's reply. */
function ask<T>(worker: Worker, request: WorkerRequest): Promise<T> {
  return new Promise((resolve, reject) => {
    const onError = (e: Error) => reject(e);
    worker.once('error', onError);
    worker.once('message', (m: T) => {
      worker.off('error', onError);
      resolve(m);
    });
    worker.postMessage(request);
  });
}

function sharedCopy(a: Float64Array): SharedArrayBuffer {
  const buf = new SharedArrayBuffer(a.byteLength);
  new Float64Array(buf).set(a);
  return buf;
}

/** One case, in this (child) process: the same pieces in the same order as pmeForces, timed. */
async function runCase(n: number, kind: string, tol: number, threads: number): Promise<void> {
  const { positions, masses } = snapshot(n, kind);
  const box = boxMake(1);
  const rssBefore = process.memoryUsage().rss;
  const times: Record<string, number> = {};
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  let t = t0;
  const lap = (name: string) => {
    const now = performance.now();
    times[name] = round((now - t) / 1000);
    t = now;
  };
  const worker = threads > 1 ? startWorker() : null;
  const setup: PmeSetup = pmeSetup(positions, masses, box, { tol });
  lap('setup');
  const units = pmeWorkUnits(setup);
  const counter = new SharedArrayBuffer(4);
  // Fine-grained chunks: a few cells in a dense clump can cost as much as thousands elsewhere.
  const step = Math.max(1, Math.ceil(units.cells / 2048));
  const meshBuf = new SharedArrayBuffer(8 * pmeMeshLength(setup));
  const accBuf = new SharedArrayBuffer(8 * 3 * n), phiBuf = new SharedArrayBuffer(8 * n);
  const mesh = new Float64Array(meshBuf);
  const accSorted = new Float64Array(accBuf);
  const phiSorted = new Float64Array(phiBuf);
  const scratch = pmeScratch(setup);
  const blocks = worker ? pmeSpreadBlocks(setup, 4) : null;
  if (!worker) {
    pmeSpreadChunk(setup, mesh, 0, n);
    lap('spread');
    pmeForwardChunk(setup, mesh, 0, units.columnBlocks, scratch);
    pmeSolveChunk(setup, mesh, 0, units.slabs, scratch);
    pmeInverseChunk(setup, mesh, 0, units.columnBlocks, scratch);
    lap('fft');
    pmeInterpolateChunk(setup, mesh, 0, n, accSorted, phiSorted);
    lap('interpolate');
    realFromCounter(setup, new Int32Array(counter), step);
    pmeRealCollect(setup, accSorted, phiSorted);
    lap('real');
  } else {
    // Each phase: the worker takes its half (message), this thread its own half, then both are awaited.
    const both = async (request: WorkerRequest, mine: () => void) => {
      const reply = ask<unknown>(worker, request);
      mine();
      await reply;
    };
    await ask(worker, {
      type: 'setup', positions: sharedCopy(setup.positions), masses: sharedCopy(masses), box: [box.lx, box.ly, box.lz],
      params: setup.params, mesh: meshBuf, acc: accBuf, phi: phiBuf, counter, step,
    });
    lap('workerSetup');
    if (blocks) {
      await both({ type: 'spread', begin: blocks[2], end: blocks[3] }, () => pmeSpreadChunk(setup, mesh, blocks[0], blocks[1]));
      await both({ type: 'spread', begin: blocks[3], end: blocks[4] }, () => pmeSpreadChunk(setup, mesh, blocks[1], blocks[2]));
    } else {
      pmeSpreadChunk(setup, mesh, 0, n);
    }
    lap('spread');
    const half = (total: number) => Math.floor(total / 2);
    await both({ type: 'forward', begin: half(units.columnBlocks), end: units.columnBlocks }, () => pmeForwardChunk(setup, mesh, 0, half(units.columnBlocks), scratch));
    await both({ type: 'solve', begin: half(units.slabs), end: units.slabs }, () => pmeSolveChunk(setup, mesh, 0, half(units.slabs), scratch));
    await both({ type: 'inverse', begin: half(units.columnBlocks), end: units.columnBlocks }, () => pmeInverseChunk(setup, mesh, 0, half(units.columnBlocks), scratch));
    lap('fft');
    await both({ type: 'interpolate', begin: half(n), end: n }, () => pmeInterpolateChunk(setup, mesh, 0, half(n), accSorted, phiSorted));
    lap('interpolate');
    await both({ type: 'real' }, () => realFromCounter(setup, new Int32Array(counter), step));
    pmeRealCollect(setup, accSorted, phiSorted);
    const w = await ask<{ acc: Float64Array; phi: Float64Array }>(worker, { type: 'collect' });
    for (let k = 0; k < accSorted.length; k++) accSorted[k] += w.acc[k];
    for (let k = 0; k < phiSorted.length; k++) phiSorted[k] += w.phi[k];
    await worker.terminate();
    lap('real');
  }
  const { acc } = pmeFinalize(setup, accSorted, phiSorted);
  const predictedAll = pmePredictedErrors(setup, acc);
  lap('finalize');
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const peakRss = process.resourceUsage().maxRSS * 1024;
  const load = loadavg()[0];

  const targets = targetsResolve({ kind: 'sample', count: TARGETS, seed: SEED }, n);
  const ref = reference(n, kind, positions, masses, targets);
  const rel = new Float64Array(targets.length);
  let se = 0, sa = 0;
  for (let k = 0; k < targets.length; k++) {
    const i = targets[k];
    const d = Math.hypot(acc[3 * i] - ref.acc[3 * k], acc[3 * i + 1] - ref.acc[3 * k + 1], acc[3 * i + 2] - ref.acc[3 * k + 2]);
    const a = Math.hypot(ref.acc[3 * k], ref.acc[3 * k + 1], ref.acc[3 * k + 2]);
    rel[k] = d / a;
    se += d * d;
    sa += a * a;
  }
  let sr = 0;
  for (const e of rel) sr += e * e;
  const rms = Math.sqrt(sr / rel.length);
  const sorted = Float64Array.from(rel).sort();
  const predictedTargets = pmePredictedErrors(setup, acc, targets).rmsRelative;
  const p = setup.params;
  emit({
    bench: 'pme',
    n,
    snapshot: kind,
    tol,
    threads,
    seconds: round(seconds),
    cpuSeconds: round((cpu.user + cpu.system) / 1e6),
    phases: times,
    peakRssMB: Math.round(peakRss / 2 ** 20),
    rssBeforeMB: Math.round(rssBefore / 2 ** 20),
    loadAverage: round(load, 3),
    params: {
      alpha: round(p.alpha),
      rCut: round(p.rCut),
      mesh: p.mesh,
      order: p.order,
      influence: p.influence,
      cells: p.cells,
      pairEstimate: Math.round(p.pairEstimate),
      modelSeconds: round(p.modelSeconds),
    },
    predicted: {
      aPriori: round(p.predictedRelativeError),
      allParticles: round(predictedAll.rmsRelative),
      targets: round(predictedTargets),
    },
    measured: {
      rms: round(rms),
      p50: round(percentile(sorted, 0.5)),
      p90: round(percentile(sorted, 0.9)),
      p99: round(percentile(sorted, 0.99)),
      p999: round(percentile(sorted, 0.999)),
      max: round(sorted[sorted.length - 1]),
      rmsErrorOverRmsAcc: round(Math.sqrt(se / sa)),
    },
    measuredOverPredicted: round(rms / predictedTargets, 3),
    belowTol: rms < tol,
    reference: { method: 'ewaldForces', tol: REF_TOL, targets: TARGETS, seconds: round(ref.seconds), cached: ref.cached },
  });
}

const args = process.argv.slice(2);
const threadsAt = args.indexOf('--threads');
const threadCount = threadsAt >= 0 ? Number(args[threadsAt + 1]) : 2;
const caseAt = args.indexOf('--case');
if (!isMainThread) {
  workerMain();
} else if (caseAt >= 0) {
  await runCase(Number(args[caseAt + 1]), args[caseAt + 2], Number(args[caseAt + 3]), threadCount);
} else {
  const quick = args.includes('--quick');
  const sizes = quick ? [2 ** 15] : [2 ** 15, 2 ** 18, 1_000_000];
  const self = fileURLToPath(import.meta.url);
  for (const n of sizes) {
    for (const kind of ['uniform', 'clumped']) {
      for (const tol of [1e-4, 1e-6]) {
        const r = spawnSync(process.execPath, [...process.execArgv, self, '--case', String(n), kind, String(tol), '--threads', String(threadCount)], {
          stdio: ['ignore', 'inherit', 'inherit'],
        });
        if (r.status !== 0) emit({ bench: 'pme', n, snapshot: kind, tol, error: `case exited with status ${r.status}` });
      }
    }
  }
}
