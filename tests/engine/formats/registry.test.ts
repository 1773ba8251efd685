import { describe, expect, it } from 'vitest';
import { csvReader } from '../../../engine/formats/csv';
import type { SnapshotReader } from '../../../engine/formats/reader';
import { SNAPSHOT_READERS, snapshotRead, snapshotReaderFind } from '../../../engine/formats/registry';
import { SnapshotFormatError } from '../../../engine/formats/snapshot';

const enc = new TextEncoder();

describe('snapshotReaderFind(bytes, fileName, readers)', () => {
  it('knows the text, .npy, .npz and HDF5 readers, binary formats first', () => {
    expect(SNAPSHOT_READERS.map((r) => r.name)).toEqual(['npy', 'npz', 'hdf5', 'text']);
    expect(SNAPSHOT_READERS).toContain(csvReader);
    expect(snapshotReaderFind(enc.encode('x,y,z\n'), 'a.csv').name).toBe('text');
    expect(snapshotReaderFind(new Uint8Array([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]), 'a.dat').name).toBe('npy');
    expect(snapshotReaderFind(new Uint8Array([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a, 0]), 'snap').name).toBe('hdf5');
    expect(snapshotReaderFind(new Uint8Array([0x50, 0x4b, 3, 4, 0]), 'snap.npz').name).toBe('npz');
  });

  it('hands a binary-named file with the wrong content to its reader (which then names the wrong magic)', () => {
    expect(snapshotReaderFind(new Uint8Array([1, 2, 3, 0]), 'snap.npy').name).toBe('npy');
    expect(snapshotReaderFind(new Uint8Array([1, 2, 3, 0]), 'snap.h5').name).toBe('hdf5');
  });

  it('refuses bytes no reader claims, with a one-line message naming the file and the known formats', () => {
    let err: unknown;
    try {
      snapshotReaderFind(new Uint8Array([0x7f, 0x45, 0x4c, 0x46, 0, 1, 2]), 'snap.bin');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SnapshotFormatError);
    expect((err as Error).message).toMatch(/^snap\.bin: not a snapshot format .*npy .*npz .*hdf5 .*text/);
    expect((err as Error).message).not.toMatch(/\n/);
  });

  it('lets a later format take over by being earlier in the list, without touching the CSV reader', async () => {
    const fake: SnapshotReader = {
      name: 'fake',
      description: 'test format',
      extensions: ['.fake'],
      sniff: (_b, f) => f.endsWith('.fake'),
      read: async () => ({ format: 'fake', count: 1, positions: new Float64Array(3), masses: Float64Array.of(1), columns: [], massColumn: null }),
    };
    const readers = [fake, ...SNAPSHOT_READERS];
    expect((await snapshotRead(enc.encode('x,y,z\n'), 'a.fake', {}, readers)).format).toBe('fake');
    expect((await snapshotRead(enc.encode('x,y,z\n1,2,3\n'), 'a.csv', {}, readers)).format).toBe('text');
  });
});
