/**
 * Direct-Ewald benchmark: one JSON object per line. Run through scripts/bench.mjs (which bundles it).
 * Figures: wall seconds of ewaldForces on one thread and ewaldForcesThreads on all cores, real-space pair
 * terms per second, k-vectors, the chosen parameters; plus the tol 1e-10 accuracy check.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ewaldForcesThreads } from '../../app/cli/parallelEwald';
import { boxMake, type Box } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces, ewaldPairCount, ewaldSetup } from '../../engine/ewald/ewald';
import { randomSeeded } from '../../engine/util/random';
import { relaxedSimdEnable } from '../../app/cli/wasmFeatures';
import { kernelVariant } from '../../engine/wasm/module';

relaxedSimdEnable(); // the kernels' relaxed-SIMD build, as the command line runs them

const workerUrl = new URL(process.env.TORUSGRAV_WORKER_URL!);
const quick = process.argv.includes('--quick');

function uniform(n: number, seed: number): Float64Array {
  const r = randomSeeded(seed);
  return Float64Array.from({ length: 3 * n }, () => r());
}

/** One JSON line; every figure names the build of the engine's kernels it ran on (in this process). */
function emit(o: Record<string, unknown>): void {
  process.stdout.write(JSON.stringify({ ...o, kernels: kernelVariant() ?? 'javascript' }) + '\n');
}

async function timeBest<T>(reps: number, f: () => Promise<T> | T): Promise<{ seconds: number; value: T }> {
  let best = Infinity;
  let value!: T;
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    value = await f();
    best = Math.min(best, (performance.now() - t0) / 1000);
  }
  return { seconds: best, value };
}

async function speed(): Promise<void> {
  const cores = availableParallelism();
  const sizes = quick ? [4096] : [4096, 16384, 65536];
  for (const n of sizes) {
    for (const kind of ['uniform', 'clumped'] as const) {
      const positions = kind === 'uniform' ? uniform(n, 11) : demoSnapshot(n, 1).positions;
      const masses = new Float64Array(n).fill(1 / n);
      const box = boxMake(1);
      const opts = { tol: 1e-6 };
      const setup = ewaldSetup(positions, masses, box, opts);
      const pairs = ewaldPairCount(setup, true);
      const reps = n <= 16384 ? 3 : 1;
      const one = await timeBest(reps, () => ewaldForces(positions, masses, box, null, opts));
      const many = await timeBest(reps, () => ewaldForcesThreads(positions, masses, box, null, opts, cores, undefined, workerUrl));
      const p = one.value.params;
      emit({
        bench: 'ewald-direct',
        n,
        snapshot: kind,
        tol: 1e-6,
        targets: 'all',
        secondsOneThread: +one.seconds.toFixed(4),
        secondsThreads: +many.seconds.toFixed(4),
        threads: cores,
        speedup: +(one.seconds / many.seconds).toFixed(2),
        realPairTerms: pairs,
        realPairTermsPerSecondOneThread: Math.round(pairs / one.seconds),
        kVectors: p.kVectors,
        alpha: p.alpha,
        rCut: p.rCut,
        kCut: p.kCut,
        cells: p.cells,
        stencilCells: p.stencilCells,
        clustering: +p.clustering.toFixed(3),
        predictedRelativeError: p.predictedRelativeError,
      });
    }
  }
}

function relErr(a: Float64Array, b: Float64Array, t: number): number {
  const d = Math.hypot(a[3 * t] - b[3 * t], a[3 * t + 1] - b[3 * t + 1], a[3 * t + 2] - b[3 * t + 2]);
  return d / Math.hypot(b[3 * t], b[3 * t + 1], b[3 * t + 2]);
}

async function accuracy(): Promise<void> {
  // Clustered snapshot in a rectangular box, physical G (kpc, km/s, solar masses), tol 1e-10, all
  // particles, against a tol 1e-13 evaluation with a different splitting parameter.
  const n = quick ? 1024 : 4096;
  const d = demoSnapshot(n, 7);
  const box: Box = boxMake(50, 50, 100); // kpc
  const positions = d.positions.map((v, i) => v * (i % 3 === 2 ? 100 : 50));
  const masses = new Float64Array(n).fill(1e12 / n); // solar masses
  const G = 4.300917270036279e-6; // kpc (km/s)^2 / Msun, from CODATA 2018 G and IAU 2015 GM_sun
  const test = ewaldForces(positions, masses, box, null, { tol: 1e-10, G });
  const alphaRef = test.params.alpha * 0.6;
  const ref = ewaldForces(positions, masses, box, null, { tol: 1e-13, G, alpha: alphaRef });
  let maxA = 0, maxPhi = 0, rmsPhi = 0;
  for (let t = 0; t < n; t++) {
    maxA = Math.max(maxA, relErr(test.acc, ref.acc, t));
    rmsPhi += ref.phi[t] * ref.phi[t];
  }
  rmsPhi = Math.sqrt(rmsPhi / n);
  for (let t = 0; t < n; t++) maxPhi = Math.max(maxPhi, Math.abs(test.phi[t] - ref.phi[t]) / Math.max(Math.abs(ref.phi[t]), 1e-300));
  emit({
    bench: 'ewald-accuracy',
    n,
    snapshot: 'clumped, rectangular 50x50x100 kpc, G=4.3009e-6 kpc (km/s)^2/Msun',
    tol: 1e-10,
    reference: `tol 1e-13, alpha ${alphaRef.toPrecision(6)} (test alpha ${test.params.alpha.toPrecision(6)})`,
    maxRelativeAccelerationError: maxA,
    maxRelativePotentialError: maxPhi,
    rmsPotential: rmsPhi,
  });
}

/** Best wall seconds of `reps` runs of node with these arguments and environment. */
function nodeBest(args: string[], env: NodeJS.ProcessEnv, reps = 3): number {
  let best = Infinity;
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    const run = spawnSync(process.execPath, args, { env });
    if (run.status !== 0) throw new Error(`node ${args.join(' ')} failed: ${run.stderr}`);
    best = Math.min(best, (performance.now() - t0) / 1000);
  }
  return best;
}

/**
 * The whole `torusgrav forces` command (start, read CSV, compute, write), N = 16384, tol 1e-6, all
 * targets: best wall seconds of 3 runs per thread count, with the 1-minute load average beside it
 * (the machine may be shared), and Node's own start-up (`node -e 0`) in the same environment. When the
 * environment sets NODE_EXTRA_CA_CERTS (this workplace does: Node reads the certificates at every start,
 * ~0.07 s here, though the command makes no network connection), the command is also timed without it.
 */
function commandTimes(): void {
  const cli = fileURLToPath(new URL('torusgrav.mjs', workerUrl));
  const dir = mkdtempSync(join(tmpdir(), 'torusgrav-bench-'));
  const env = process.env;
  const extraCa = env.NODE_EXTRA_CA_CERTS !== undefined;
  const envPlain = { ...env };
  delete envPlain.NODE_EXTRA_CA_CERTS;
  try {
    const nodeStart = nodeBest(['-e', '0'], env, 5);
    const nodeStartPlain = extraCa ? nodeBest(['-e', '0'], envPlain, 5) : nodeStart;
    emit({ bench: 'node-start', secondsWallBestOf5: +nodeStart.toFixed(3), ...(extraCa ? { secondsWallBestOf5WithoutExtraCaCerts: +nodeStartPlain.toFixed(3) } : {}) });
    for (const n of quick ? [4096] : [16384, 65536]) {
      for (const kind of ['uniform', 'clumped'] as const) {
        const positions = kind === 'uniform' ? uniform(n, 11) : demoSnapshot(n, 1).positions;
        const rows = ['x,y,z,m'];
        for (let i = 0; i < n; i++) rows.push(`${positions[3 * i]},${positions[3 * i + 1]},${positions[3 * i + 2]},${1 / n}`);
        const file = join(dir, `${kind}-${n}.csv`);
        writeFileSync(file, rows.join('\n') + '\n');
        for (const threads of [1, 2]) {
          const args = [cli, 'forces', file, '--box', '1', '--tol', '1e-6', '--threads', String(threads), '--out', join(dir, 'out.csv')];
          const best = nodeBest(args, env);
          const plain = extraCa ? nodeBest(args, envPlain) : best;
          emit({
            bench: 'forces-command',
            n,
            snapshot: kind,
            tol: 1e-6,
            targets: 'all',
            threads,
            secondsWallBestOf3: +best.toFixed(3),
            ...(extraCa ? { secondsWallBestOf3WithoutExtraCaCerts: +plain.toFixed(3) } : {}),
            loadAverage1min: +loadavg()[0].toFixed(2),
          });
        }
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await speed();
await accuracy();
commandTimes();
