/**
 * Summation-order benchmark: one JSON object per line. Run through scripts/bench.mjs (which bundles it) or
 * directly with `npx tsx scripts/bench/ordersBench.ts [--quick]`.
 * Figures: wall seconds of imageSumSetup (target-independent: multipole shell sums, structure factors),
 * of the target chunks and of the Ewald reference, for N = 4096 and 64 sampled targets; the estimated work
 * and seconds the cost check predicted; cell counts and the largest multipole order; and the largest
 * deviation of the final partial sum from the predicted limit, divided by the rms limit.
 */
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { type ImageSumOptions, imageSumFinalize, imageSumPartialAlloc, imageSumSetup, imageSumTargetsChunk } from '../../engine/orders/index';
import { targetsResolve } from '../../engine/targets';
import { randomSeeded } from '../../engine/util/random';
import { relaxedSimdEnable } from '../../app/cli/wasmFeatures';

relaxedSimdEnable(); // the kernels' relaxed-SIMD build, as the command line runs them

const quick = process.argv.includes('--quick');

function emit(o: Record<string, unknown>): void {
  process.stdout.write(JSON.stringify(o) + '\n');
}

function uniform(n: number, seed: number): Float64Array {
  const r = randomSeeded(seed);
  return Float64Array.from({ length: 3 * n }, () => r());
}

function maxOverRms(a: Float64Array, b: Float64Array): number {
  let m = 0, s = 0;
  for (let t = 0; t < b.length / 3; t++) {
    m = Math.max(m, Math.hypot(a[3 * t] - b[3 * t], a[3 * t + 1] - b[3 * t + 1], a[3 * t + 2] - b[3 * t + 2]));
    s += b[3 * t] ** 2 + b[3 * t + 1] ** 2 + b[3 * t + 2] ** 2;
  }
  return m / Math.sqrt(s / (b.length / 3));
}

const n = 4096;
const box = boxMake(1);
const targets = targetsResolve({ kind: 'sample', count: 64, seed: 5 }, n);
const masses = new Float64Array(n).fill(1 / n);
const snapshots = quick ? (['clumped'] as const) : (['clumped', 'uniform'] as const);
const cases: ImageSumOptions[] = quick
  ? [{ order: 'sphere', shells: 64 }]
  : [
      { order: 'sphere', shells: 64 },
      { order: 'cube', shells: 64 },
      { order: 'sphere', shells: 64, background: false },
      { order: 'slab-z', shells: 8 },
      { order: 'screened' },
      { order: 'nearest' },
    ];

for (const kind of snapshots) {
  const positions = kind === 'clumped' ? demoSnapshot(n, 1).positions : uniform(n, 11);
  for (const options of cases) {
    const t0 = performance.now();
    const setup = imageSumSetup(positions, masses, box, options, targets.length);
    const t1 = performance.now();
    const partial = imageSumPartialAlloc(setup, targets.length);
    imageSumTargetsChunk(setup, targets, 0, targets.length, partial);
    const t2 = performance.now();
    const ewald = ewaldForces(setup.positions, masses, box, targets, { tol: 1e-12 }).acc;
    const t3 = performance.now();
    const r = imageSumFinalize(setup, targets, partial, ewald);
    const p = r.params;
    emit({
      bench: 'orders',
      order: p.order,
      background: p.background,
      shells: p.shells,
      lambdas: p.lambdas ? Array.from(p.lambdas) : null,
      n,
      snapshot: kind,
      targets: targets.length,
      tol: p.tol,
      secondsSetup: +((t1 - t0) / 1000).toFixed(3),
      secondsTargets: +((t2 - t1) / 1000).toFixed(3),
      secondsEwaldReference: +((t3 - t2) / 1000).toFixed(3),
      secondsTotal: +((t3 - t0) / 1000).toFixed(3),
      estimatedWork: +p.work.toPrecision(3),
      estimatedSeconds: +p.estimatedSeconds.toFixed(3),
      nearCells: p.nearCells,
      farCells: p.farCells,
      maxOrder: p.maxOrder,
      finalMinusLimitOverRms: r.limit ? +maxOverRms(r.acc, r.limit).toPrecision(3) : null,
      extrapolatedMinusLimitOverRms: r.extrapolated && r.limit ? +maxOverRms(r.extrapolated, r.limit).toPrecision(3) : null,
      ewaldMinusLimitOverRms: r.limit ? +maxOverRms(r.ewald, r.limit).toPrecision(3) : null,
    });
  }
}
