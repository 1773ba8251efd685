/**
 * Every format and variant round-trips to the same arrays: fixtures written by tests/fixtures.ts (not by
 * the readers), read back through snapshotLoad, compared element by element (exactly for float64 and
 * integers; float32 against Math.fround of the values written).
 */
import { gzipSync, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { blobSource, bytesSource } from '../../../engine/formats/byteSource';
import { snapshotLoad } from '../../../engine/formats/registry';
import type { ColumnMapping } from '../../../engine/formats/snapshot';
import { hdf5Bytes, npyBytes, seededUniform, tableText, zipBytes } from './fixtures';

const N = 257;
const pos = seededUniform(3 * N, 11);
const mass = seededUniform(N, 12).map((m) => m + 0.5);
const acc = seededUniform(3 * N, 13).map((a) => a - 0.5);
const ids = Float64Array.from({ length: N }, (_, i) => 1000 + 7 * i);
const col = (a: Float64Array, d: number) => Float64Array.from({ length: N }, (_, i) => a[3 * i + d]);
/** Rows of x,y,z,m as one row-major (N,4) block. */
const xyzm = Float64Array.from({ length: 4 * N }, (_, e) => (e % 4 < 3 ? pos[3 * Math.floor(e / 4) + (e % 4)] : mass[Math.floor(e / 4)]));

async function load(bytes: Uint8Array, name: string, mapping: ColumnMapping = {}, every = 1) {
  return snapshotLoad(bytes, name, mapping, { every });
}

describe('.npy round trips (numpy.lib.format 1.0/2.0/3.0)', () => {
  for (const version of [1, 2, 3] as const) {
    for (const fortran of [false, true]) {
      for (const bigEndian of [false, true]) {
        it(`float64 (N,4) x,y,z,m, version ${version}, ${fortran ? 'Fortran' : 'C'} order, ${bigEndian ? 'big' : 'little'}-endian`, async () => {
          const s = await load(npyBytes(xyzm, [N, 4], { version, fortran, bigEndian }), 's.npy');
          expect(s.format).toBe('npy');
          expect(s.positions).toEqual(pos);
          expect(s.masses).toEqual(mass);
        });
      }
    }
  }

  it('float32 (N,3): the float32 values exactly, masses 1', async () => {
    for (const bigEndian of [false, true]) {
      const s = await load(npyBytes(pos, [N, 3], { type: 'f4', bigEndian }), 's.npy');
      expect(s.positions).toEqual(pos.map(Math.fround));
      expect(s.masses).toEqual(new Float64Array(N).fill(1));
    }
  });

  it('(N,k) with columns chosen by number, including accelerations and integer-valued ids', async () => {
    const k = 9;
    const block = new Float64Array(k * N);
    for (let i = 0; i < N; i++) block.set([ids[i], mass[i], pos[3 * i], pos[3 * i + 1], pos[3 * i + 2], acc[3 * i], acc[3 * i + 1], acc[3 * i + 2], 0], k * i);
    for (const fortran of [false, true]) {
      const s = await load(npyBytes(block, [N, k], { fortran }), 's.npy', { positions: [2, 3, 4], mass: 1, accelerations: [5, 6, 7], ids: 0 });
      expect(s.positions).toEqual(pos);
      expect(s.masses).toEqual(mass);
      expect(s.accelerations).toEqual(acc);
      expect(s.ids).toEqual(ids);
    }
  });

  it('integer arrays read as numbers (int32, int64, uint16)', async () => {
    const ints = Float64Array.from({ length: 3 * N }, (_, i) => (i * 37) % 1000);
    for (const type of ['i4', 'i8', 'u2'] as const) {
      const s = await load(npyBytes(ints, [N, 3], { type }), 's.npy');
      expect(s.positions).toEqual(ints);
    }
  });

  it('subsampling keeps rows 0, K, 2K, … and scales masses by N/N_kept', async () => {
    const s = await load(npyBytes(xyzm, [N, 4], { fortran: true }), 's.npy', {}, 10);
    const kept = Math.ceil(N / 10);
    expect(s.count).toBe(kept);
    expect(s.total).toBe(N);
    for (let p = 0; p < kept; p++) {
      expect(s.positions[3 * p + 2]).toBe(pos[3 * 10 * p + 2]);
      expect(s.masses[p]).toBeCloseTo((mass[10 * p] * N) / kept, 12);
    }
  });
});

describe('.npz round trips', () => {
  const members = (deflate: boolean) => [
    { name: 'pos.npy', data: npyBytes(pos, [N, 3]), deflate },
    { name: 'mass.npy', data: npyBytes(mass, [N]), deflate },
    { name: 'acc.npy', data: npyBytes(acc, [N, 3], { type: 'f8', bigEndian: true }), deflate },
    { name: 'ids.npy', data: npyBytes(ids, [N], { type: 'i8' }), deflate },
    { name: 'box.npy', data: npyBytes([2.5], []), deflate },
  ];
  for (const deflate of [false, true]) {
    for (const zip64 of [false, true]) {
      it(`${deflate ? 'deflated' : 'stored'} members${zip64 ? ' with zip64 extra fields (as numpy.savez writes)' : ''}: one array per field`, async () => {
        const s = await load(zipBytes(members(deflate), zip64), 's.npz', { accelerations: 'acc', ids: 'ids', box: 'box' });
        expect(s.format).toBe('npz');
        expect(s.positions).toEqual(pos);
        expect(s.masses).toEqual(mass);
        expect(s.accelerations).toEqual(acc);
        expect(s.ids).toEqual(ids);
        expect(s.box).toEqual({ lx: 2.5, ly: 2.5, lz: 2.5 });
      });
    }
  }

  it('positions split into x, y, z arrays (found without a mapping), written by a second zip writer (fflate)', async () => {
    const z = zipSync({ 'x.npy': npyBytes(col(pos, 0), [N]), 'y.npy': npyBytes(col(pos, 1), [N]), 'z.npy': [npyBytes(col(pos, 2), [N]), { level: 0 }], 'm.npy': npyBytes(mass, [N]) });
    const s = await load(z, 's.npz');
    expect(s.positions).toEqual(pos);
    expect(s.masses).toEqual(mass);
  });

  it('a column of a 2-D member picked with name[k]', async () => {
    const s = await load(zipBytes([{ name: 'data.npy', data: npyBytes(xyzm, [N, 4]) }]), 's.npz', { positions: ['data[0]', 'data[1]', 'data[2]'], mass: 'data[3]' });
    expect(s.positions).toEqual(pos);
    expect(s.masses).toEqual(mass);
  });
});

describe('HDF5 round trips (fixtures written by h5wasm)', () => {
  it('N×3 positions, masses, accelerations, int64 ids and the box from an attribute, in nested groups', async () => {
    const bytes = await hdf5Bytes((f) => {
      f.create_group('run');
      f.get('run').create_group('bodies');
      const g = f.get('run/bodies');
      g.create_dataset({ name: 'pos', data: pos, shape: [N, 3], dtype: '<d' });
      g.create_dataset({ name: 'mass', data: mass, shape: [N], dtype: '<d' });
      g.create_dataset({ name: 'acc', data: Float32Array.from(acc), shape: [N, 3], dtype: '<f' });
      g.create_dataset({ name: 'id', data: BigInt64Array.from(ids, (v) => BigInt(v)), shape: [N], dtype: '<q' });
      g.create_attribute('side', 3.5);
    });
    const s = await load(bytes, 's.h5', { accelerations: '/run/bodies/acc', ids: '/run/bodies/id', box: '/run/bodies#side' });
    expect(s.format).toBe('hdf5');
    expect(s.positions).toEqual(pos);
    expect(s.masses).toEqual(mass);
    expect(s.accelerations).toEqual(acc.map(Math.fround));
    expect(s.ids).toEqual(ids);
    expect(s.box).toEqual({ lx: 3.5, ly: 3.5, lz: 3.5 });
  });

  it('positions split into separate x, y, z datasets; box of three sides from a root attribute; every K-th row', async () => {
    const bytes = await hdf5Bytes((f) => {
      f.create_group('p');
      for (let d = 0; d < 3; d++) f.get('p').create_dataset({ name: 'xyz'[d], data: col(pos, d), shape: [N], dtype: '<d' });
      f.create_attribute('box_size', [1, 2, 3], [3], '<d');
    });
    const s = await load(bytes, 's.h5', { box: '#box_size' });
    expect(s.positions).toEqual(pos);
    expect(s.box).toEqual({ lx: 1, ly: 2, lz: 3 });
    const sub = await load(bytes, 's.h5', {}, 4);
    expect(sub.count).toBe(Math.ceil(N / 4));
    expect(sub.positions.subarray(0, 6)).toEqual(Float64Array.of(pos[0], pos[1], pos[2], pos[12], pos[13], pos[14]));
  });
});

describe('text round trips (comma, tab, whitespace, gzip, comment header)', () => {
  const names = ['x', 'y', 'z', 'm'];
  const cols = [col(pos, 0), col(pos, 1), col(pos, 2), mass];
  const variants: [string, string, Uint8Array][] = [
    ['comma', 's.csv', new TextEncoder().encode(tableText(names, cols, ','))],
    ['tab', 's.tsv', new TextEncoder().encode(tableText(names, cols, '\t'))],
    ['whitespace (aligned with runs of spaces)', 's.txt', new TextEncoder().encode(tableText(names, cols, '   ').replace(/^/gm, '  '))],
    ['numpy.savetxt style: "# x y z m" above the data', 's.dat', new TextEncoder().encode('# written by a test\n# ' + tableText(names, cols, ' '))],
    ['gzip-compressed CSV', 's.csv.gz', gzipSync(new TextEncoder().encode(tableText(names, cols, ',')))],
  ];
  for (const [what, name, bytes] of variants) {
    it(what, async () => {
      const s = await load(bytes, name);
      expect(s.format).toBe('text');
      expect(s.positions).toEqual(pos);
      expect(s.masses).toEqual(mass);
    });
  }

  it('headerless whitespace text with columns chosen by number, streamed from a Blob in pieces', async () => {
    const text = tableText(['a', 'b', 'c', 'd'], [mass, col(pos, 0), col(pos, 1), col(pos, 2)], ' ').split('\n').slice(1).join('\n');
    const s = await snapshotLoad(blobSource(new Blob([text])), 's.txt', { positions: [1, 2, 3], mass: 0 });
    expect(s.positions).toEqual(pos);
    expect(s.masses).toEqual(mass);
    const again = await snapshotLoad(bytesSource(new TextEncoder().encode(text)), 's.txt', { positions: ['1', '2', '3'], mass: '0' });
    expect(again.positions).toEqual(pos);
  });
});
