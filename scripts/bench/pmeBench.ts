/**
 * Particle-mesh Ewald benchmark: one JSON object per line. `npx tsx scripts/bench/pmeBench.ts [--quick]`
 * (through `npm run bench`, bundled; the worker is dist-cli/pmeWorker.mjs, built when missing).
 * For N = 2^15, 2^18 and 10^6, uniform and clumped (engine demo snapshot), seeded, at tol 1e-4 and 1e-6,
 * on one and on two threads (each case in a fresh child process, so the peak resident memory is its
 * own): wall and CPU seconds of the whole all-particle computation as the CLI runs it (pmeForcesThreads
 * in app/cli/parallelPme.ts: parameter choice included, file reading and writing not) with its phases,
 * the process's peak resident memory (getrusage maxRSS, threads included), the chosen parameters, and
 * the measured relative acceleration error against direct Ewald (ewaldForces at tol 1e-10) on 1000
 * random targets: rms, percentiles, max, and the ratio of the measured rms to the predicted one (flag
 * withinFactor3). After both thread counts of a case, a `pme-speedup` line. The machine is shared: the
 * load average is printed with every line.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { targetsResolve } from '../../engine/targets';
import { randomSeeded } from '../../engine/util/random';
import { pmeForcesThreads } from '../../app/cli/parallelPme';
import { relaxedSimdEnable } from '../../app/cli/wasmFeatures';
import { kernelVariant } from '../../engine/wasm/module';

relaxedSimdEnable(); // the kernels' relaxed-SIMD build, as the command line runs them

const SEED = 20240611;
const TARGETS = 1000;
const REF_TOL = 1e-10;

/** One JSON line; every figure names the build of the engine's kernels it ran on (in this process). */
function emit(o: Record<string, unknown>): void {
  process.stdout.write(JSON.stringify({ ...o, kernels: kernelVariant() ?? 'javascript' }) + '\n');
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

/** One case, in this (child) process: the same pieces in the same order as pmeForces, timed. */
async function runCase(n: number, kind: string, tol: number, threads: number, workerUrl: URL): Promise<void> {
  const { positions, masses } = snapshot(n, kind);
  const box = boxMake(1);
  const rssBefore = process.memoryUsage().rss;
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const result = await pmeForcesThreads(positions, masses, box, { tol }, threads, undefined, workerUrl, 0);
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const peakRss = process.resourceUsage().maxRSS * 1024;
  const load = loadavg()[0];
  const acc = result.acc;

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
  let sp = 0;
  for (let k = 0; k < targets.length; k++) sp += (result.predictedErrors![targets[k]] / Math.hypot(ref.acc[3 * k], ref.acc[3 * k + 1], ref.acc[3 * k + 2])) ** 2;
  const predictedTargets = Math.sqrt(sp / targets.length);
  const p = result.params;
  const ratio = rms / predictedTargets;
  emit({
    bench: 'pme',
    n,
    snapshot: kind,
    tol,
    threads,
    seconds: round(seconds),
    cpuSeconds: round((cpu.user + cpu.system) / 1e6),
    threadsUsed: result.threadsUsed,
    workerUnits: result.workerUnits,
    phases: Object.fromEntries(Object.entries(result.phases).map(([k, v]) => [k, round(v)])),
    cpuPhases: Object.fromEntries(Object.entries(result.cpuPhases ?? {}).map(([k, v]) => [k, round(v)])),
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
      allParticles: round(result.predictedRmsRelativeError),
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
    measuredOverPredicted: round(ratio, 3),
    withinFactor3: ratio <= 3 && ratio >= 1 / 3,
    belowTol: rms < tol,
    reference: { method: 'ewaldForces', tol: REF_TOL, targets: TARGETS, seconds: round(ref.seconds), cached: ref.cached },
  });
}

const args = process.argv.slice(2);
const threadsAt = args.indexOf('--threads');
const caseAt = args.indexOf('--case');
const root = process.cwd(); // the project folder (npm run bench runs there)
const workerFile = process.env.TORUSGRAV_WORKER_URL ? fileURLToPath(new URL('./pmeWorker.mjs', process.env.TORUSGRAV_WORKER_URL)) : join(root, 'dist-cli', 'pmeWorker.mjs');
if (caseAt >= 0) {
  await runCase(Number(args[caseAt + 1]), args[caseAt + 2], Number(args[caseAt + 3]), threadsAt >= 0 ? Number(args[threadsAt + 1]) : 2, pathToFileURL(workerFile));
} else {
  if (!existsSync(workerFile)) execFileSync('npm', ['run', '--silent', 'build:cli'], { cwd: root, stdio: 'inherit' });
  const quick = args.includes('--quick');
  const sizes = quick ? [2 ** 15] : [2 ** 15, 2 ** 18, 1_000_000];
  const threadCounts = threadsAt >= 0 ? [Number(args[threadsAt + 1])] : [1, 2];
  const self = fileURLToPath(import.meta.url);
  for (const n of sizes) {
    for (const kind of ['uniform', 'clumped']) {
      for (const tol of [1e-4, 1e-6]) {
        const seconds: Record<number, number> = {};
        for (const threads of threadCounts) {
          const r = spawnSync(process.execPath, [...process.execArgv, self, '--case', String(n), kind, String(tol), '--threads', String(threads)], {
            stdio: ['ignore', 'pipe', 'inherit'],
            encoding: 'utf8',
            maxBuffer: 1 << 24,
          });
          process.stdout.write(r.stdout);
          if (r.status !== 0) emit({ bench: 'pme', n, snapshot: kind, tol, threads, error: `case exited with status ${r.status}` });
          else seconds[threads] = JSON.parse(r.stdout.trim().split('\n').pop()!).seconds;
        }
        if (seconds[1] && seconds[2]) emit({ bench: 'pme-speedup', n, snapshot: kind, tol, seconds1: seconds[1], seconds2: seconds[2], speedup: round(seconds[1] / seconds[2], 3), loadAverage: round(loadavg()[0], 3) });
      }
    }
  }
}
