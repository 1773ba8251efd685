/**
 * The built CLI reads every format: the same snapshot as CSV, tab text (.gz), .npy, .npz and HDF5 gives
 * byte-identical output; the mapping options, --box @PATH, --units, --every and --accelerations reach
 * the engine; and bad binary input is one line naming file and place, exit 2, no output file.
 */
import { readFileSync, readdirSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'fflate';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { unitsG } from '../../engine/units';
import { hdf5Bytes, npyBytes, tableText, zipBytes } from '../engine/formats/fixtures';
import { cli, cliEnsureBuilt, forcesOutput, tempDir, tempDirsRemove } from './cliHarness';

const N = 300;
const demo = demoSnapshot(N, 5);
const pos = demo.positions;
const mass = demo.masses;
const col = (d: number) => Float64Array.from({ length: N }, (_, i) => pos[3 * i + d]);
const xyzm = Float64Array.from({ length: 4 * N }, (_, e) => (e % 4 < 3 ? pos[3 * Math.floor(e / 4) + (e % 4)] : mass[Math.floor(e / 4)]));
let dir: string;
let reference: string;

const forces = (file: string, out: string, ...extra: string[]) => cli(['forces', join(dir, file), '--box', '1', '--threads', '1', '--out', join(dir, out), ...extra], dir);

beforeAll(async () => {
  cliEnsureBuilt();
  dir = tempDir();
  writeFileSync(join(dir, 's.csv'), tableText(['x', 'y', 'z', 'm'], [col(0), col(1), col(2), mass]));
  writeFileSync(join(dir, 's.tsv.gz'), gzipSync(new TextEncoder().encode(tableText(['x', 'y', 'z', 'mass'], [col(0), col(1), col(2), mass], '\t'))));
  writeFileSync(join(dir, 's.npy'), npyBytes(xyzm, [N, 4], { fortran: true }));
  writeFileSync(join(dir, 's.npz'), zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [N, 3]), deflate: true }, { name: 'mass.npy', data: npyBytes(mass, [N]) }], true));
  writeFileSync(
    join(dir, 's.h5'),
    await hdf5Bytes((f) => {
      f.create_group('bodies');
      f.get('bodies').create_dataset({ name: 'pos', data: pos, shape: [N, 3], dtype: '<d' });
      f.get('bodies').create_dataset({ name: 'mass', data: mass, shape: [N], dtype: '<d' });
      f.get('bodies').create_dataset({ name: 'id', data: Int32Array.from({ length: N }, (_, i) => 5000 + i), shape: [N], dtype: '<i' });
      f.get('bodies').create_attribute('side', 1.0);
      f.create_dataset({ name: 'flat_z', data: col(2), shape: [N], dtype: '<d' });
    }),
  );
  const r = forces('s.csv', 'ref.csv');
  expect(r.code, r.stderr).toBe(0);
  reference = readFileSync(join(dir, 'ref.csv'), 'utf8');
}, 120_000);

afterAll(tempDirsRemove);

describe('torusgrav forces on every format', () => {
  for (const file of ['s.tsv.gz', 's.npy', 's.npz', 's.h5']) {
    it(`${file} gives the same output as the CSV, byte for byte`, () => {
      const r = forces(file, `${file}.out.csv`);
      expect(r.code, r.stderr).toBe(0);
      expect(readFileSync(join(dir, `${file}.out.csv`), 'utf8')).toBe(reference);
      expect(r.stderr).toContain(`N=${N}`);
    });
  }

  it('mapping options: HDF5 positions from two datasets, --box @/bodies#side, --ids; the summary names the sources', () => {
    const r = cli(['forces', join(dir, 's.h5'), '--positions', '/bodies/pos[0],/bodies/pos[1],/flat_z', '--masses', '/bodies/mass', '--ids', '/bodies/id', '--box', '@/bodies#side', '--threads', '1', '--out', join(dir, 'map.csv')], dir);
    expect(r.code, r.stderr).toBe(0);
    const out = forcesOutput(readFileSync(join(dir, 'map.csv'), 'utf8'));
    const ref = forcesOutput(reference);
    expect(out.ids).toEqual(Array.from({ length: N }, (_, i) => 5000 + i));
    expect(out.acc).toEqual(ref.acc);
    expect(r.stderr).toContain('box 1 (from /bodies#side)');
    expect(r.stderr).toContain('positions from dataset "/bodies/pos" column 0 / dataset "/bodies/pos" column 1 / dataset "/flat_z"');
  });

  it('--accelerations adds rel_err and error percentiles; the reference itself gives rel_err at rounding level', () => {
    const ref = forcesOutput(reference);
    const k = 7;
    const block = new Float64Array(k * N);
    for (let i = 0; i < N; i++) block.set([pos[3 * i], pos[3 * i + 1], pos[3 * i + 2], mass[i], ref.acc[3 * i], ref.acc[3 * i + 1], ref.acc[3 * i + 2]], k * i);
    writeFileSync(join(dir, 'acc.npy'), npyBytes(block, [N, k]));
    const r = forces('acc.npy', 'acc.csv', '--positions', '0,1,2', '--masses', '3', '--accelerations', '4,5,6');
    expect(r.code, r.stderr).toBe(0);
    const text = readFileSync(join(dir, 'acc.csv'), 'utf8');
    expect(text.split('\n')[0]).toBe('id,ax,ay,az,phi,rel_err');
    const errs = text.trim().split('\n').slice(1).map((l) => Number(l.split(',')[5]));
    expect(Math.max(...errs)).toBeLessThan(1e-15);
    expect(r.stderr).toMatch(/relative error of the file's accelerations \(the array, columns 4, 5, 6\) against the reference: 50% .*, 90% .*, 99% .*, max /);
  });

  it('--units PRESET sets G exactly as --G with the derived value would', () => {
    const a = forces('s.npy', 'u1.csv', '--units', 'kpc-kms-msun');
    const b = forces('s.npy', 'u2.csv', '--G', String(unitsG('kpc-kms-msun')));
    expect(a.code, a.stderr).toBe(0);
    expect(b.code, b.stderr).toBe(0);
    expect(readFileSync(join(dir, 'u1.csv'), 'utf8')).toBe(readFileSync(join(dir, 'u2.csv'), 'utf8'));
    expect(a.stderr).toContain('G=4.30092e-6 (kpc, km/s, M☉)');
  });

  it('--every K keeps particles 0, K, 2K, … (ids are file rows), and lets a file over --max-size through', () => {
    const over = forces('s.npy', 'big.csv', '--max-size', '5KB');
    expect(over.code).toBe(2);
    expect(over.stderr).toContain('above the load limit of 4.9 KiB; raise it with --max-size SIZE');
    const r = forces('s.npy', 'every.csv', '--max-size', '5KB', '--every', '2');
    expect(r.code, r.stderr).toBe(0);
    const out = forcesOutput(readFileSync(join(dir, 'every.csv'), 'utf8'));
    expect(out.ids).toEqual(Array.from({ length: N / 2 }, (_, i) => 2 * i));
    expect(r.stderr).toContain(`N=${N / 2} (one in 2 of ${N}, masses scaled by 2)`);
  });
});

interface Case {
  readonly what: string;
  /** File name and content (bytes), or a sparse file of that many bytes. */
  readonly file: string;
  readonly content: () => Uint8Array | Promise<Uint8Array> | { sparse: number; head?: Uint8Array };
  readonly args?: readonly string[];
  readonly says: readonly string[];
}

const nanPositions = () => {
  const b = pos.slice();
  b[3 * 17 + 1] = NaN;
  return npyBytes(b, [N, 3]);
};

const CASES: readonly Case[] = [
  { what: 'a .npy with a wrong magic number', file: 'bad.npy', content: () => new TextEncoder().encode('not numpy at all\n'), says: ['bad.npy', 'wrong magic number', 'not a NumPy array file'] },
  { what: 'a truncated .npy', file: 'cut.npy', content: () => npyBytes(pos, [N, 3]).slice(0, 3000), says: ['cut.npy', 'data are cut off', 'partial download'] },
  { what: 'NaN in a .npy, row and column given', file: 'nan.npy', content: nanPositions, says: ['nan.npy', 'particle 17', 'column "1"', 'not a finite number'] },
  { what: 'a complex .npy', file: 'c.npy', content: () => npyBytes(pos, [N, 3], { type: 'c16' }), says: ['c.npy', 'complex numbers', 'real part'] },
  {
    what: 'an HDF5 file with no N×3 dataset',
    file: 'flat.h5',
    content: () => hdf5Bytes((f) => f.create_dataset({ name: 'only', data: mass, shape: [N], dtype: '<d' })),
    says: ['flat.h5', 'no dataset of shape (N, 3)', '/only (300,) float64', 'choose the positions'],
  },
  {
    what: 'mismatched array lengths in an .npz',
    file: 'mm.npz',
    content: () => zipBytes([{ name: 'pos.npy', data: npyBytes(pos, [N, 3]) }, { name: 'mass.npy', data: npyBytes(mass.subarray(1), [N - 1]) }]),
    says: ['mm.npz', 'mismatched lengths', 'array "mass"', `have ${N - 1}`],
  },
  { what: 'a zero mass', file: 'zero.csv', content: () => new TextEncoder().encode('x,y,z,m\n0.1,0.2,0.3,1\n0.4,0.5,0.6,0\n'), says: ['zero.csv', 'line 3 (particle 1)', 'column "m"', 'mass 0'] },
  {
    what: 'duplicate positions in a .npy without softening',
    file: 'dup.npy',
    content: () => npyBytes([0.1, 0.2, 0.3, 0.5, 0.5, 0.5, 0.1, 0.2, 0.3], [3, 3]),
    says: ['dup.npy', 'particle 0 and particle 2 sit at the same position', '--softening'],
  },
  {
    what: 'a 2 GB .npy (sparse) refused with the limit stated',
    file: 'huge.npy',
    content: () => ({ sparse: 2e9, head: npyBytes([], [Math.floor((2e9 - 128) / 24), 3], { headerOnly: true }) }),
    says: ['huge.npy', 'above the load limit of 1.00 GiB', '--max-size', '--every K'],
  },
  { what: 'a 2 GB text file (sparse) refused with the limit stated', file: 'huge.csv', content: () => ({ sparse: 2e9 }), says: ['huge.csv', '1.86 GiB', 'above the load limit of 1.00 GiB', '--every K'] },
  { what: 'a --positions dataset that does not exist', file: 's2.h5', content: () => hdf5Bytes((f) => f.create_dataset({ name: 'p', data: pos, shape: [N, 3], dtype: '<d' })), args: ['--positions', '/q'], says: ['s2.h5', 'no dataset "/q"', '/p (300, 3)'] },
  { what: '--positions with two parts', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--positions', 'x,y'], says: ['--positions', 'three columns'] },
  { what: '--box @PATH for a text file', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--box', '@/box'], says: ['ok.csv', 'no named entries', 'box'] },
  { what: 'an unknown --units preset', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--units', 'furlongs'], says: ['--units', '"furlongs"', 'kpc-kms-msun'] },
  { what: '--units with --G', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--units', 'si', '--G', '2'], says: ['--units', '--G', 'not both'] },
  { what: '--softening-column without a kernel', file: 'eps.csv', content: () => new TextEncoder().encode('x,y,z,eps\n0.1,0.2,0.3,0.01\n'), args: ['--softening-column', 'eps'], says: ['--softening-column', 'plummer'] },
  {
    what: 'per-particle softening lengths that vary',
    file: 'eps.csv',
    content: () => new TextEncoder().encode('x,y,z,eps\n0.1,0.2,0.3,0.01\n0.5,0.5,0.5,0.02\n'),
    args: ['--softening-column', 'eps', '--softening', 'plummer'],
    says: ['eps.csv', 'vary from 0.01 (line 2 (particle 0)) to 0.02 (line 3 (particle 1))', '--softening plummer:LENGTH'],
  },
  { what: '--every 0', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--every', '0'], says: ['--every', 'integer'] },
  { what: '--max-size junk', file: 'ok.csv', content: () => new TextEncoder().encode('x,y,z\n0.1,0.2,0.3\n'), args: ['--max-size', 'lots'], says: ['--max-size', '2GiB'] },
];

describe('bad input in any format: exit 2, one line naming file and place, no output file', () => {
  for (const c of CASES) {
    it(c.what, async () => {
      const d = tempDir();
      const path = join(d, c.file);
      const content = await c.content();
      if (content instanceof Uint8Array) writeFileSync(path, content);
      else {
        // Text: rows beyond the 4096 bytes a reader sniffs, then zeros.
        const head = content.head ?? new TextEncoder().encode('x,y,z\n' + '0.1,0.2,0.3\n'.repeat(400));
        writeFileSync(path, head);
        truncateSync(path, content.sparse);
      }
      const box = c.args?.includes('--box') ? [] : ['--box', '1'];
      const r = cli(['forces', path, ...box, '--out', join(d, 'out.csv'), ...(c.args ?? [])], d);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      const lines = r.stderr.split('\n').filter((l) => l.length > 0);
      expect(lines.length, r.stderr).toBe(1);
      for (const s of c.says) expect(lines[0]).toContain(s);
      expect(readdirSync(d)).not.toContain('out.csv');
    });
  }
});
