/**
 * Property tests: random bytes and mutated valid files (flipped, overwritten, cut or inserted bytes)
 * given to every reader end in a SnapshotFormatError or a valid snapshot (N ≥ 1, finite numbers, arrays
 * of matching lengths) — never another exception, and never a hang (each run is timed).
 */
import fc from 'fast-check';
import { gzipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { snapshotDescribe, snapshotLoad } from '../../../engine/formats/registry';
import { SnapshotFormatError } from '../../../engine/formats/snapshot';
import { hdf5Bytes, npyBytes, seededUniform, tableText, zipBytes } from './fixtures';

const N = 12;
const pos = seededUniform(3 * N, 3);
const mass = seededUniform(N, 4).map((m) => m + 0.1);
const col = (d: number) => Float64Array.from({ length: N }, (_, i) => pos[3 * i + d]);

/** Loads (and describes) and checks the outcome is a typed error or a valid snapshot, within 2 s. */
async function outcomeOk(bytes: Uint8Array, name: string): Promise<boolean> {
  const t0 = performance.now();
  for (const run of [() => snapshotDescribe(bytes, name), () => snapshotLoad(bytes, name)]) {
    try {
      const r = await run();
      if ('count' in r) {
        const s = r;
        if (!(s.count >= 1) || s.positions.length !== 3 * s.count || s.masses.length !== s.count) return false;
        if (!s.positions.every(Number.isFinite) || !s.masses.every(Number.isFinite)) return false;
      }
    } catch (e) {
      if (!(e instanceof SnapshotFormatError)) {
        throw new Error(`${name}: ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`);
      }
      if (/\n/.test(e.message)) return false;
    }
  }
  return performance.now() - t0 < 2000;
}

/** A mutation of `base`: some bytes overwritten, then possibly cut short or given inserted bytes. */
function mutated(base: Uint8Array) {
  return fc
    .record({
      writes: fc.array(fc.tuple(fc.nat(base.length - 1), fc.integer({ min: 0, max: 255 })), { maxLength: 8 }),
      cut: fc.option(fc.nat(base.length)),
      insert: fc.option(fc.tuple(fc.nat(base.length), fc.uint8Array({ maxLength: 16 }))),
    })
    .map(({ writes, cut, insert }) => {
      let b = base.slice();
      for (const [at, v] of writes) b[at] = v;
      if (insert) {
        const [at, extra] = insert;
        const c = new Uint8Array(b.length + extra.length);
        c.set(b.subarray(0, at));
        c.set(extra, at);
        c.set(b.subarray(at), at + extra.length);
        b = c;
      }
      if (cut !== null) b = b.subarray(0, cut);
      return b;
    });
}

const csv = new TextEncoder().encode(tableText(['x', 'y', 'z', 'm'], [col(0), col(1), col(2), mass]));
const txt = new TextEncoder().encode('# x y z m\n' + tableText(['x', 'y', 'z', 'm'], [col(0), col(1), col(2), mass], ' ').split('\n').slice(1).join('\n'));
const npy = npyBytes(Float64Array.from({ length: 4 * N }, (_, e) => (e % 4 < 3 ? pos[3 * Math.floor(e / 4) + (e % 4)] : mass[Math.floor(e / 4)])), [N, 4]);
const npz = (deflate: boolean) => zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [N, 3]), deflate }, { name: 'mass.npy', data: npyBytes(mass, [N]), deflate }], true);

describe('random and mutated input to every reader: a typed error or a valid result', () => {
  it('random bytes under every file name', async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 600 }), fc.constantFrom('r.csv', 'r.txt', 'r.npy', 'r.npz', 'r.h5', 'r.csv.gz', 'r'), (b, name) => outcomeOk(b, name)),
      { numRuns: 250 },
    );
  });

  it('random bytes after a valid magic number (.npy, zip, HDF5, gzip)', async () => {
    const magics: [string, number[]][] = [
      ['m.npy', [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]],
      ['m.npz', [0x50, 0x4b, 3, 4]],
      ['m.h5', [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]],
      ['m.csv.gz', [0x1f, 0x8b, 8, 0]],
    ];
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...magics), fc.uint8Array({ maxLength: 400 }), ([name, magic], rest) => {
        const b = new Uint8Array(magic.length + rest.length);
        b.set(magic);
        b.set(rest, magic.length);
        return outcomeOk(b, name);
      }),
      { numRuns: 200 },
    );
  });

  it('mutated CSV, whitespace text and gzip text', async () => {
    await fc.assert(fc.asyncProperty(mutated(csv), (b) => outcomeOk(b, 'm.csv')), { numRuns: 200 });
    await fc.assert(fc.asyncProperty(mutated(txt), (b) => outcomeOk(b, 'm.txt')), { numRuns: 150 });
    await fc.assert(fc.asyncProperty(mutated(gzipSync(csv)), (b) => outcomeOk(b, 'm.csv.gz')), { numRuns: 150 });
  });

  it('mutated .npy and .npz (stored and deflated)', async () => {
    await fc.assert(fc.asyncProperty(mutated(npy), (b) => outcomeOk(b, 'm.npy')), { numRuns: 300 });
    await fc.assert(fc.asyncProperty(mutated(npz(false)), (b) => outcomeOk(b, 'm.npz')), { numRuns: 200 });
    await fc.assert(fc.asyncProperty(mutated(npz(true)), (b) => outcomeOk(b, 'm.npz')), { numRuns: 200 });
  });

  it('mutated HDF5', async () => {
    const h5 = await hdf5Bytes((f) => {
      f.create_group('b');
      f.get('b').create_dataset({ name: 'pos', data: pos, shape: [N, 3], dtype: '<d' });
      f.get('b').create_dataset({ name: 'mass', data: mass, shape: [N], dtype: '<d' });
      f.get('b').create_attribute('side', 1.0);
    });
    await fc.assert(fc.asyncProperty(mutated(h5), (b) => outcomeOk(b, 'm.h5')), { numRuns: 120 });
    expect(h5.length).toBeGreaterThan(0);
  }, 60_000);
});
