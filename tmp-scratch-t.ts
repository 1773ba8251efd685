import { demoSnapshot, ewaldForces, boxMake, targetsResolve } from './engine/index';
const t00 = performance.now();
const d = demoSnapshot(65536, 1);
console.log('gen', performance.now() - t00);
for (const k of [256, 1024]) {
  const t0 = performance.now();
  const tg = targetsResolve({ kind: 'sample', count: k, seed: 1 }, 65536);
  const r = ewaldForces(d.positions, d.masses, boxMake(1), tg, { tol: 1e-6 }, (f) => { });
  console.log(k, (performance.now() - t0).toFixed(0), 'ms', r.params.kVectors, r.params.cells);
}
const prog: number[] = [];
const t1 = performance.now();
ewaldForces(d.positions, d.masses, boxMake(1), null, { tol: 1e-6 }, (f) => { prog.push(Math.round(performance.now() - t1)); });
console.log(prog.slice(0,5));
