/**
 * Snapshot files for the browser tests, written into the folder given as the first argument:
 * - small-with-acc.csv: 2000 particles of a seeded demo stretched to a box of side 100, masses, ids, and
 *   "user code" accelerations that are the Ewald sum at tolerance 1e-3 (so errors are small but real);
 * - large-with-acc.csv: 100 000 particles (box 1) whose accelerations come from our coarse mesh solver
 *   at 64³ (so errors against Ewald are large where the mesh smooths);
 * - swarm-split.h5: the small snapshot in an HDF5 layout of our own invention — positions split into
 *   /swarm/east, /swarm/north, /swarm/up, masses /swarm/heft, accelerations /swarm/pull (N×3), ids
 *   /swarm/tag, per-particle softening lengths /swarm/blur, the box
 *   side as attribute "extent" of /swarm — names no proposal recognises, so they must be mapped;
 * - bodies.npz: the small snapshot as arrays pos (N×3), mass, acc (N×3) (stored, not deflated);
 * - table4.npy: the small snapshot as one (N, 4) array x, y, z, m;
 * - million.npy: 10⁶ seeded uniform particles in the unit box, (N, 4) float64 x, y, z, m (32 MB).
 * Run: node --import tsx tests/e2e/fixtures.ts DIR
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { boxMake } from '../../engine/box';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { hdf5Bytes, npyBytes, seededUniform, zipBytes } from '../engine/formats/fixtures';

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
  await binaryFixtures(dir, positions, d.masses, e.acc, L);
}
{
  const d = demoSnapshot(100_000, 6);
  const m = meshForces(d.positions, d.masses, boxMake(1), null, { mesh: 64 });
  writeFileSync(join(dir, 'large-with-acc.csv'), csv(d.positions, d.masses, m.acc, false));
}
{
  const n = 1_000_000;
  const u = seededUniform(3 * n, 11);
  const table = new Float64Array(4 * n);
  for (let i = 0; i < n; i++) {
    table[4 * i] = u[3 * i];
    table[4 * i + 1] = u[3 * i + 1];
    table[4 * i + 2] = u[3 * i + 2];
    table[4 * i + 3] = 1 / n;
  }
  writeFileSync(join(dir, 'million.npy'), npyBytes(table, [n, 4]));
}
console.log(`fixtures written to ${dir}`);

/** One component (0, 1, 2) of flat xyz. */
function component(xyz: Float64Array, c: number): Float64Array {
  return Float64Array.from({ length: xyz.length / 3 }, (_, i) => xyz[3 * i + c]);
}

/** The small snapshot as HDF5 (split positions, names of our own), .npz and a (N, 4) .npy. */
async function binaryFixtures(dir: string, positions: Float64Array, masses: Float64Array, acc: Float64Array, L: number): Promise<void> {
  const n = masses.length;
  const h5 = await hdf5Bytes((f) => {
    f.create_attribute('made_by', 'torusgrav browser-test fixtures');
    f.create_group('swarm');
    f.create_dataset({ name: 'swarm/east', data: component(positions, 0) });
    f.create_dataset({ name: 'swarm/north', data: component(positions, 1) });
    f.create_dataset({ name: 'swarm/up', data: component(positions, 2) });
    f.create_dataset({ name: 'swarm/heft', data: masses });
    f.create_dataset({ name: 'swarm/pull', data: acc, shape: [n, 3] });
    f.create_dataset({ name: 'swarm/tag', data: Int32Array.from({ length: n }, (_, i) => 1000 + i) });
    f.create_dataset({ name: 'swarm/blur', data: new Float64Array(n).fill(0.05) });
    const g = f.get('swarm');
    g.create_attribute('extent', L);
    g.create_attribute('epoch', 0.5);
  });
  writeFileSync(join(dir, 'swarm-split.h5'), h5);
  writeFileSync(
    join(dir, 'bodies.npz'),
    zipBytes([
      { name: 'pos.npy', data: npyBytes(positions, [n, 3]) },
      { name: 'mass.npy', data: npyBytes(masses, [n]) },
      { name: 'acc.npy', data: npyBytes(acc, [n, 3]) },
    ]),
  );
  const table = new Float64Array(4 * n);
  for (let i = 0; i < n; i++) table.set([positions[3 * i], positions[3 * i + 1], positions[3 * i + 2], masses[i]], 4 * i);
  writeFileSync(join(dir, 'table4.npy'), npyBytes(table, [n, 4]));
}
