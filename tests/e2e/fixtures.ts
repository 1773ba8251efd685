/**
 * Snapshot files for the browser tests, written into the folder given as the first argument:
 * - small-with-acc.csv: 2000 particles of a seeded demo stretched to a box of side 100, masses, ids, and
 *   "user code" accelerations that are the Ewald sum at tolerance 1e-3 (so errors are small but real);
 * - large-with-acc.csv: 100 000 particles (box 1) whose accelerations come from our coarse mesh solver
 *   at 64³ (so errors against Ewald are large where the mesh smooths).
 * Run: node --import tsx tests/e2e/fixtures.ts DIR
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { boxMake } from '../../engine/box';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';

function csv(positions: Float64Array, masses: Float64Array, acc: Float64Array, ids: boolean): string {
  const rows: string[] = [ids ? 'id,x,y,z,mass,ax,ay,az' : 'x,y,z,m,ax,ay,az'];
  for (let i = 0; i < masses.length; i++) {
    const p = [positions[3 * i], positions[3 * i + 1], positions[3 * i + 2]].map((v) => v.toPrecision(12));
    const a = [acc[3 * i], acc[3 * i + 1], acc[3 * i + 2]].map((v) => v.toPrecision(12));
    rows.push([...(ids ? [String(1000 + i)] : []), ...p, masses[i].toPrecision(12), ...a].join(','));
  }
  return rows.join('\n') + '\n';
}

const dir = process.argv[2];
if (!dir) throw new Error('usage: fixtures.ts DIR');
mkdirSync(dir, { recursive: true });

{
  const d = demoSnapshot(2000, 5);
  const L = 100;
  const positions = d.positions.map((v) => v * L);
  const e = ewaldForces(positions, d.masses, boxMake(L), null, { tol: 1e-3 });
  writeFileSync(join(dir, 'small-with-acc.csv'), csv(positions, d.masses, e.acc, true));
}
{
  const d = demoSnapshot(100_000, 6);
  const m = meshForces(d.positions, d.masses, boxMake(1), null, { mesh: 64 });
  writeFileSync(join(dir, 'large-with-acc.csv'), csv(d.positions, d.masses, m.acc, false));
}
console.log(`fixtures written to ${dir}`);
