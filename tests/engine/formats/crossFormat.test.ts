/**
 * The same snapshot written as CSV, tab text, .npy, .npz and HDF5 loads to identical arrays and so
 * gives identical periodic forces (bit for bit: same inputs, same deterministic engine).
 */
import { describe, expect, it } from 'vitest';
import { ewaldForces } from '../../../engine/ewald/ewald';
import { snapshotLoad } from '../../../engine/formats/registry';
import { hdf5Bytes, npyBytes, seededUniform, tableText, zipBytes } from './fixtures';

describe('one snapshot in every format', () => {
  it('CSV, tab text, .npy (N,4), .npz (pos, mass) and HDF5 give identical arrays and identical Ewald forces', async () => {
    const n = 96;
    const pos = seededUniform(3 * n, 21);
    const mass = seededUniform(n, 22).map((m) => 0.5 + m);
    const col = (d: number) => Float64Array.from({ length: n }, (_, i) => pos[3 * i + d]);
    const xyzm = Float64Array.from({ length: 4 * n }, (_, e) => (e % 4 < 3 ? pos[3 * Math.floor(e / 4) + (e % 4)] : mass[Math.floor(e / 4)]));
    const files: [string, Uint8Array][] = [
      ['s.csv', new TextEncoder().encode(tableText(['x', 'y', 'z', 'mass'], [col(0), col(1), col(2), mass]))],
      ['s.tsv', new TextEncoder().encode(tableText(['x', 'y', 'z', 'm'], [col(0), col(1), col(2), mass], '\t'))],
      ['s.npy', npyBytes(xyzm, [n, 4], { fortran: true })],
      ['s.npz', zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [n, 3]), deflate: true }, { name: 'mass.npy', data: npyBytes(mass, [n]) }], true)],
      [
        's.h5',
        await hdf5Bytes((f) => {
          f.create_group('b');
          f.get('b').create_dataset({ name: 'pos', data: pos, shape: [n, 3], dtype: '<d' });
          f.get('b').create_dataset({ name: 'mass', data: mass, shape: [n], dtype: '<d' });
        }),
      ],
    ];
    const box = { lx: 1, ly: 1, lz: 1 };
    const ref = ewaldForces(pos, mass, box, null, { tol: 1e-8 });
    for (const [name, bytes] of files) {
      const s = await snapshotLoad(bytes, name);
      expect(s.positions, name).toEqual(pos);
      expect(s.masses, name).toEqual(mass);
      const r = ewaldForces(s.positions, s.masses, box, null, { tol: 1e-8 });
      expect(r.acc, name).toEqual(ref.acc);
      expect(r.phi, name).toEqual(ref.phi);
    }
  });
});
