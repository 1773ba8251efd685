/**
 * snapshotDescribe(…).proposal and the structure signature: choices from shapes, types and names only
 * (no particular code's layout), and a signature that ignores N but not the layout.
 */
import { describe, expect, it } from 'vitest';
import { snapshotDescribe } from '../../../engine/formats/registry';
import { snapshotStructureSignature, structureText } from '../../../engine/formats/signature';
import { hdf5Bytes, npyBytes, seededUniform, zipBytes } from './fixtures';

const enc = new TextEncoder();

async function h5(n: number, build: (n: number) => (f: import('./fixtures').H5File) => void) {
  return snapshotDescribe(await hdf5Bytes(build(n)), 's.h5');
}

const layout = (n: number) => (f: import('./fixtures').H5File) => {
  f.create_group('sim');
  f.get('sim').create_group('stars');
  const g = f.get('sim/stars');
  g.create_dataset({ name: 'velocity', data: seededUniform(3 * n, 1), shape: [n, 3], dtype: '<d' });
  g.create_dataset({ name: 'coordinates', data: seededUniform(3 * n, 2), shape: [n, 3], dtype: '<d' });
  g.create_dataset({ name: 'grav_acc', data: seededUniform(3 * n, 3), shape: [n, 3], dtype: '<f' });
  g.create_dataset({ name: 'masses', data: seededUniform(n, 4), shape: [n], dtype: '<d' });
  g.create_dataset({ name: 'particle_ids', data: Int32Array.from({ length: n }, (_, i) => i), shape: [n], dtype: '<i' });
  g.create_dataset({ name: 'softening_length', data: new Float64Array(n).fill(0.01), shape: [n], dtype: '<d' });
  g.create_dataset({ name: 'other', data: seededUniform(n + 1, 5), shape: [n + 1], dtype: '<d' });
  f.create_attribute('BoxSize', 50.0);
  f.create_attribute('Redshift', 0.0);
};

describe('snapshotDescribe(bytes, name).proposal', () => {
  it('HDF5: positions by shape and name (not velocities), accelerations, masses, ids, softening, box; all datasets and attributes listed', async () => {
    const d = await h5(40, layout);
    expect(d.format).toBe('hdf5');
    expect(d.arrays.map((a) => a.name).sort()).toEqual(
      ['/sim/stars/coordinates', '/sim/stars/grav_acc', '/sim/stars/masses', '/sim/stars/other', '/sim/stars/particle_ids', '/sim/stars/softening_length', '/sim/stars/velocity'].sort(),
    );
    expect(d.arrays.find((a) => a.name === '/sim/stars/grav_acc')).toMatchObject({ shape: [40, 3], dtype: 'float32', kind: 'float', usable: true });
    expect(d.attributes.map((a) => a.ref).sort()).toEqual(['/#BoxSize', '/#Redshift']);
    const p = d.proposal;
    expect(p.complete).toBe(true);
    expect(p.count).toBe(40);
    expect(p.mapping).toEqual({
      positions: '/sim/stars/coordinates',
      mass: '/sim/stars/masses',
      accelerations: '/sim/stars/grav_acc',
      ids: '/sim/stars/particle_ids',
      softening: '/sim/stars/softening_length',
      box: '/#BoxSize',
    });
    expect(p.candidates.positions).not.toContain('/sim/stars/velocity');
    expect(p.candidates.box).toEqual([{ ref: '/#BoxSize', value: 50 }]);
  });

  it('text: x,y,z by name, ax,ay,az as accelerations, pos_x-style triples', async () => {
    const d = await snapshotDescribe(enc.encode('id,pos_x,pos_y,pos_z,mass,ax,ay,az\n1,0,0,0,1,0,0,0\n'), 's.csv');
    expect(d.text).toMatchObject({ delimiter: 'comma', header: true });
    expect(d.proposal.mapping).toEqual({ positions: ['pos_x', 'pos_y', 'pos_z'], mass: 'mass', accelerations: ['ax', 'ay', 'az'], ids: 'id' });
    const headerless = await snapshotDescribe(enc.encode('1 2 3 4\n5 6 7 8\n'), 's.txt');
    expect(headerless.proposal).toMatchObject({ complete: false, mapping: { positions: [0, 1, 2], mass: 3 } });
    expect(headerless.proposal.notes[0]).toMatch(/no header row/);
  });

  it('.npy: (N,3) and (N,4) are certain, (N,7) is a guess to confirm, (N,) has no positions', async () => {
    const v = seededUniform(70, 1);
    expect((await snapshotDescribe(npyBytes(v.subarray(0, 30), [10, 3]), 'a.npy')).proposal).toMatchObject({ complete: true, mapping: { positions: [0, 1, 2] } });
    expect((await snapshotDescribe(npyBytes(v.subarray(0, 40), [10, 4]), 'a.npy')).proposal).toMatchObject({ complete: true, mapping: { positions: [0, 1, 2], mass: 3 } });
    expect((await snapshotDescribe(npyBytes(v, [10, 7]), 'a.npy')).proposal).toMatchObject({ complete: false, mapping: { positions: [0, 1, 2] } });
    expect((await snapshotDescribe(npyBytes(v.subarray(0, 10), [10]), 'a.npy')).proposal.complete).toBe(false);
  });

  it('.npz: a box array of one number is offered with its value', async () => {
    const z = zipBytes([
      { name: 'pos.npy', data: npyBytes(seededUniform(30, 1), [10, 3]) },
      { name: 'boxsize.npy', data: npyBytes([4], []) },
    ]);
    const d = await snapshotDescribe(z, 's.npz');
    expect(d.proposal.mapping).toEqual({ positions: 'pos', box: 'boxsize' });
    expect(d.arrays.find((a) => a.name === 'boxsize')).toMatchObject({ value: 4, usable: false });
  });
});

describe('snapshotStructureSignature(description)', () => {
  it('is the same for two files of one layout with different N, and differs when a dataset, a type kind or an attribute changes', async () => {
    const a = await h5(30, layout);
    const b = await h5(55, layout);
    expect(a.signature).toBe(b.signature);
    expect(snapshotStructureSignature(a)).toBe(a.signature);
    expect(a.signature).toMatch(/^hdf5-[0-9a-f]{16}$/);
    const c = await h5(30, (n) => (f) => {
      layout(n)(f);
      f.create_attribute('Extra', 1.0);
    });
    expect(c.signature).not.toBe(a.signature);
    expect(structureText(c.format, c.arrays, c.attributes)).toContain('attr /#Extra');
  });

  it('text: same header (any case) and delimiter → same signature; another delimiter → another', async () => {
    const s1 = await snapshotDescribe(enc.encode('x,y,z\n1,2,3\n'), 'a.csv');
    const s2 = await snapshotDescribe(enc.encode('X,Y,Z\n1,2,3\n4,5,6\n'), 'b.csv');
    const s3 = await snapshotDescribe(enc.encode('x\ty\tz\n1\t2\t3\n'), 'c.tsv');
    expect(s1.signature).toBe(s2.signature);
    expect(s3.signature).not.toBe(s1.signature);
  });
});
