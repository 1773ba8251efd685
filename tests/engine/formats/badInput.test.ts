/**
 * Bad input to every binary reader: each case ends in one SnapshotFormatError whose one-line message
 * names the file and the place (array or dataset, particle, column, byte) and says what to do.
 */
import { gzipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { snapshotDescribe, snapshotLoad } from '../../../engine/formats/registry';
import { type ColumnMapping, SnapshotFormatError } from '../../../engine/formats/snapshot';
import { hdf5Bytes, npyBytes, seededUniform, zipBytes } from './fixtures';

const N = 20;
const pos = seededUniform(3 * N, 5);

/** Loads and expects a SnapshotFormatError whose message contains every text in `says`. */
async function refused(bytes: Uint8Array, name: string, says: readonly (string | RegExp)[], mapping: ColumnMapping = {}, maxBytes?: number) {
  let err: unknown = null;
  try {
    await snapshotLoad(bytes, name, mapping, maxBytes ? { maxBytes } : {});
  } catch (e) {
    err = e;
  }
  expect(err, 'expected a SnapshotFormatError').toBeInstanceOf(SnapshotFormatError);
  const m = (err as Error).message;
  expect(m.startsWith(`${name}: `), m).toBe(true);
  expect(m).not.toMatch(/\n/);
  for (const s of says) {
    if (typeof s === 'string') expect(m).toContain(s);
    else expect(m).toMatch(s);
  }
  return m;
}

describe('.npy bad input', () => {
  const good = npyBytes(pos, [N, 3]);
  it('a wrong magic number (file named .npy)', async () => {
    const b = good.slice();
    b[1] = 0x41;
    await refused(b, 'a.npy', ['wrong magic number (93 41 55 4d 50 59)', 'not a NumPy array file']);
  });
  it('a truncated header and truncated data', async () => {
    await refused(good.slice(0, 40), 'a.npy', ['header is cut off', 'truncated']);
    await refused(good.slice(0, good.length - 5), 'a.npy', ['data are cut off', `shape (${N}, 3) float64`, '480 bytes', 'only 475']);
  });
  it('bytes after the data', async () => {
    const b = new Uint8Array(good.length + 8);
    b.set(good);
    await refused(b, 'a.npy', ['8 bytes follow the data', 'not one .npy array']);
  });
  it('NaN and Inf, naming the particle and column', async () => {
    const bad = pos.slice();
    bad[3 * 7 + 2] = NaN;
    await refused(npyBytes(bad, [N, 3]), 'a.npy', ['the array, particle 7, column "2"', 'NaN is not a finite number']);
    bad[3 * 7 + 2] = 0.5;
    bad[3 * 11] = -Infinity;
    await refused(npyBytes(bad, [N, 3], { fortran: true }), 'a.npy', ['particle 11, column "0"', '-Infinity']);
  });
  it('complex and string dtypes, and a structured dtype', async () => {
    await refused(npyBytes(pos, [N, 3], { type: 'c16' }), 'a.npy', ['complex numbers (complex128)', 'real part']);
    await refused(npyBytes(pos, [N, 3], { type: 'U8' }), 'a.npy', ['text (unicode string)', 'astype(float)']);
    // A structured dtype: the header's descr replaced by a field list of the same length.
    const structured = npyBytes(pos, [N, 3]);
    const header = new TextDecoder('latin1').decode(structured.subarray(10, 10 + structured[8]));
    const swapped = header.replace("'<f8',", "[('x', '<f8')],").replace(/ {9}\n$/, '\n');
    expect(swapped.length).toBe(header.length);
    structured.set(new TextEncoder().encode(swapped), 10);
    await refused(structured, 'a.npy', ['structured (fields x)', 'own array']);
  });
  it('shapes that cannot hold positions: 1-D, 3-D, (N,2)', async () => {
    await refused(npyBytes(pos.subarray(0, N), [N]), 'a.npy', ['shape (20,)', 'positions need (N, 3)']);
    await refused(npyBytes(pos.subarray(0, 24), [2, 3, 4]), 'a.npy', ['3 dimensions']);
    await refused(npyBytes(pos.subarray(0, 2 * N), [N, 2]), 'a.npy', ['positions need (N, 3)']);
  });
  it('a column number that does not exist, and a name in a .npy mapping', async () => {
    await refused(good, 'a.npy', ['column 5', 'columns 0 to 2'], { positions: [0, 1, 5] });
    await refused(good, 'a.npy', ['has no names', 'by number'], { mass: 'm' });
  });
  it('a file above the load limit, with the limit stated', async () => {
    await refused(good, 'a.npy', ['480 bytes', 'above the load limit of 100 bytes', 'subsample'], {}, 100);
  });
});

describe('.npz bad input', () => {
  const members = [
    { name: 'pos.npy', data: npyBytes(pos, [N, 3]), deflate: true },
    { name: 'mass.npy', data: npyBytes(new Float64Array(N - 1).fill(1), [N - 1]) },
  ];
  it('mismatched array lengths', async () => {
    await refused(zipBytes(members), 'a.npz', ['mismatched lengths', 'array "pos"', `have ${N} rows`, 'array "mass"', `have ${N - 1}`, 'one row per particle'], { mass: 'mass' });
  });
  it('a truncated archive (no end record), and a member that runs past the end', async () => {
    const z = zipBytes(members);
    await refused(z.slice(0, z.length - 30), 'a.npz', ['no end-of-directory record', 'truncated']);
  });
  it('damaged deflated data and a stored member that fails its CRC-32', async () => {
    const z = zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [N, 3]) }]);
    const flipped = z.slice();
    flipped[200] ^= 0xff; // inside the stored data
    await refused(flipped, 'a.npz', ['array "pos"', 'CRC-32', 'corrupt']);
    const d = zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [N, 3]), deflate: true }]);
    const bad = d.slice();
    for (let i = 40; i < 60; i++) bad[i] = 0xff;
    await refused(bad, 'a.npz', ['array "pos"']);
  });
  it('no N×3 array: lists what the file has', async () => {
    const z = zipBytes([{ name: 'a.npy', data: npyBytes(pos, [3 * N]) }]);
    await refused(z, 'a.npz', ['no array of shape (N, 3)', 'a (60,) float64', 'choose the positions']);
  });
  it('an array name that does not exist', async () => {
    await refused(zipBytes(members), 'a.npz', ['no array "velocities"', 'pos (20, 3) float64'], { accelerations: 'velocities' });
  });
});

describe('HDF5 bad input', () => {
  const file = () =>
    hdf5Bytes((f) => {
      f.create_group('g');
      f.get('g').create_dataset({ name: 'pos', data: pos, shape: [N, 3], dtype: '<d' });
      f.get('g').create_dataset({ name: 'c', data: new Float64Array(2 * N), shape: [N, 2], dtype: '<d' });
    });
  it('a wrong magic number, a truncated file, and an empty file', async () => {
    const b = await file();
    const wrong = b.slice();
    wrong[0] = 0;
    await refused(wrong, 'a.h5', ['wrong magic number (00 48 44 46', 'not an HDF5 file']);
    await refused(b.slice(0, 1500), 'a.h5', ['cannot open the HDF5 file', 'truncated']);
    await refused(new Uint8Array(0), 'a.h5', ['wrong magic number (empty file)']);
  });
  it('a file with no N×3 dataset lists its datasets', async () => {
    const b = await hdf5Bytes((f) => f.create_dataset({ name: 'm', data: new Float64Array(N), shape: [N], dtype: '<d' }));
    await refused(b, 'a.h5', ['no dataset of shape (N, 3)', '/m (20,) float64', 'choose the positions yourself']);
  });
  it('a dataset path that does not exist, an N×2 dataset for positions, a missing box attribute', async () => {
    const b = await file();
    await refused(b, 'a.h5', ['no dataset "/g/mass"'], { mass: '/g/mass' });
    await refused(b, 'a.h5', ['dataset "/g/c"', 'shape (20, 2)'], { positions: '/g/c' });
    await refused(b, 'a.h5', ['no box entry "/g#side"'], { box: '/g#side' });
  });
  it('describe lists a complex dataset as unusable, and loading it as masses says why', async () => {
    const b = await hdf5Bytes((f) => {
      f.create_dataset({ name: 'pos', data: pos, shape: [N, 3], dtype: '<d' });
      f.create_dataset({ name: 'names', data: Array.from({ length: N }, (_, i) => `p${i}`) });
    });
    const d = await snapshotDescribe(b, 'a.h5');
    const names = d.arrays.find((a) => a.name === '/names')!;
    expect(names.usable).toBe(false);
    expect(names.kind).toBe('string');
    await refused(b, 'a.h5', ['dataset "/names"', 'holds strings'], { mass: '/names' });
  });
});

describe('text bad input beyond the CSV cases', () => {
  it('truncated gzip', async () => {
    const gz = gzipSync(new TextEncoder().encode('x y z\n' + '0.1 0.2 0.3\n'.repeat(200)));
    await refused(gz.slice(0, gz.length - 9), 'a.txt.gz', ['gzip data is damaged', 'truncated or corrupt']);
  });
  it('a tab-separated row with a missing cell, naming line and column', async () => {
    await refused(new TextEncoder().encode('x\ty\tz\n1\t2\t3\n1\t\t3\n'), 'a.tsv', ['line 3 (particle 1)', 'column "y"', 'empty']);
  });
  it('a whitespace-separated row that is too short', async () => {
    await refused(new TextEncoder().encode('x y z\n1 2 3\n4 5\n'), 'a.txt', ['line 3 (particle 1)', 'column "z"', 'only 2 cells']);
  });
  it('a box reference for a text file', async () => {
    await refused(new TextEncoder().encode('x,y,z\n1,2,3\n'), 'a.csv', ['no named entries', 'enter the box'], { box: '/box' });
  });
});
