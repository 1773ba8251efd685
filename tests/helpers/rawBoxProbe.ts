/**
 * Child-process probe for tests/engine/ewaldEdgeCases.test.ts: calls ewaldForces with a box object built
 * WITHOUT boxMake (sides from argv) and prints one JSON line {outcome, name, message}. Run in its own process
 * because an invalid box can make the engine allocate without bound and abort V8 (an uncatchable crash).
 */
import { ewaldForces } from '../../engine/index';

const [lx, ly, lz] = process.argv.slice(2).map(Number);
const positions = new Float64Array([0.1, 0.2, 0.3, 0.5, 0.6, 0.7]);
const masses = new Float64Array([1, 1]);
try {
  const r = ewaldForces(positions, masses, { lx, ly, lz }, null, { tol: 1e-6 });
  console.log(JSON.stringify({ outcome: 'returned', name: '', message: `acc[0] = ${r.acc[0]}` }));
} catch (e) {
  const err = e as Error;
  console.log(JSON.stringify({ outcome: 'threw', name: err.name, message: err.message }));
}
