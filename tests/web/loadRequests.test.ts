import { describe, expect, test } from 'vitest';
import { snapshotDescribe } from '../../engine/formats/registry';
import { SnapshotFormatError } from '../../engine/formats/snapshot';
import { bytesSource } from '../../engine/formats/byteSource';
import { LIMIT_ADVICE, accelerationNames, describeRun, loadRun, progressSource } from '../../app/web/worker/loadRequests';
import { hdf5Bytes, npyBytes, seededUniform } from '../engine/formats/fixtures';

/** A Blob of bytes (copied into an ArrayBuffer-backed array, as Blob's typing wants). */
function blobOf(bytes: Uint8Array): Blob {
  return new Blob([new Uint8Array(bytes)]);
}

const N = 50;
const u = seededUniform(3 * N, 9);
const comp = (c: number) => Float64Array.from({ length: N }, (_, i) => u[3 * i + c]);

function h5(masses: Float64Array = new Float64Array(N).fill(0.5)): Promise<Uint8Array> {
  return hdf5Bytes((f) => {
    f.create_group('swarm');
    f.create_dataset({ name: 'swarm/east', data: comp(0) });
    f.create_dataset({ name: 'swarm/north', data: comp(1) });
    f.create_dataset({ name: 'swarm/up', data: comp(2) });
    f.create_dataset({ name: 'swarm/heft', data: masses });
    f.create_dataset({ name: 'swarm/pull', data: u.map((v) => -v), shape: [N, 3] });
    f.get('swarm').create_attribute('extent', 4);
  });
}

const splitMapping = { positions: ['/swarm/east', '/swarm/north', '/swarm/up'] as const, mass: '/swarm/heft', accelerations: '/swarm/pull', box: '/swarm#extent' };
const noProgress = () => {};

describe('describeRun (worker describe request)', () => {
  test('a File/Blob is described exactly like the same bytes', async () => {
    const bytes = await h5();
    const { description } = await describeRun({ type: 'describe', file: blobOf(bytes), fileName: 's.h5' }, noProgress);
    const direct = await snapshotDescribe(bytes, 's.h5');
    expect(description.signature).toBe(direct.signature);
    expect(description.arrays.map((a) => a.name)).toEqual(direct.arrays.map((a) => a.name));
    expect(description.attributes.map((a) => a.ref)).toEqual(['/swarm#extent']);
  });
});

describe('loadRun (worker load request)', () => {
  test('split x, y, z datasets, masses, N×3 accelerations and the box from an attribute, read from a Blob', async () => {
    const p = await loadRun({ type: 'load', file: blobOf(await h5()), fileName: 's.h5', mapping: splitMapping, box: null }, noProgress);
    expect(p.count).toBe(N);
    expect(Array.from(p.positions)).toEqual(Array.from(u));
    expect(Array.from(p.masses)).toEqual(new Array(N).fill(0.5));
    expect(Array.from(p.accelerations!)).toEqual(Array.from(u).map((v) => -v));
    expect(p.box).toEqual({ lx: 4, ly: 4, lz: 4 });
    expect(p.boxFrom).toBe('file');
    expect(p.boxText).toBe('4');
    expect(p.outside).toBe(0);
    expect(p.accelerationColumns).toEqual(['/swarm/pull x', 'y', 'z']);
    expect(p.sources.masses).toBe('dataset "/swarm/heft"');
  });

  test('the typed box is used when the file names none; otherwise it is guessed (and counted particles outside)', async () => {
    const table = new Float64Array(4 * N);
    for (let i = 0; i < N; i++) table.set([3 * u[3 * i], 3 * u[3 * i + 1], 3 * u[3 * i + 2], 1], 4 * i);
    const file = blobOf(npyBytes(table, [N, 4]));
    const typed = await loadRun({ type: 'load', file, fileName: 't.npy', mapping: { positions: [0, 1, 2], mass: 3 }, box: { lx: 2, ly: 2, lz: 2 } }, noProgress);
    expect(typed.boxFrom).toBe('typed');
    expect(typed.boxText).toBe('2');
    let outside = 0;
    for (let i = 0; i < N; i++) if ([0, 1, 2].some((d) => table[4 * i + d] >= 2)) outside++;
    expect(outside).toBeGreaterThan(0);
    expect(typed.outside).toBe(outside);
    const guessed = await loadRun({ type: 'load', file, fileName: 't.npy', mapping: { positions: [0, 1, 2], mass: 3 }, box: null }, noProgress);
    expect(guessed.boxFrom).toBe('guessed');
    expect(guessed.boxText).toBe('5'); // coordinates below 3: the next of 1, 2, 2.5, 5 × 10^k above the largest
    expect(guessed.outside).toBe(0);
  });

  test('progress rises to 1 and never falls; subsampling keeps every K-th particle', async () => {
    const seen: number[] = [];
    const p = await loadRun({ type: 'load', file: blobOf(await h5()), fileName: 's.h5', mapping: splitMapping, box: null, every: 5 }, (f) => seen.push(f));
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(p.count).toBe(N / 5);
    expect(p.total).toBe(N);
    expect(p.every).toBe(5);
    expect(p.positions[3]).toBe(u[15]);
  });

  test('a zero mass is refused naming the file, the dataset and the particle', async () => {
    const m = new Float64Array(N).fill(1);
    m[7] = 0;
    const run = loadRun({ type: 'load', file: blobOf(await h5(m)), fileName: 's.h5', mapping: splitMapping, box: null }, noProgress);
    await expect(run).rejects.toThrow(SnapshotFormatError);
    await expect(run).rejects.toThrow(/^s\.h5: dataset "\/swarm\/heft", particle 7: mass 0/);
  });

  test('a file above the load limit is refused with the limit and what to do in the page', async () => {
    const run = loadRun({ type: 'load', file: blobOf(npyBytes(u, [N, 3])), fileName: 'big.npy', mapping: {}, box: null, maxBytes: 100 }, noProgress);
    await expect(run).rejects.toThrow(/^big\.npy: .*above the load limit of 100 bytes/);
    await expect(run).rejects.toThrow(LIMIT_ADVICE);
  });
});

describe('progressSource(source, report)', () => {
  test('reports the furthest byte read as a fraction of the size, once per advance', async () => {
    const seen: number[] = [];
    const s = progressSource({ ...bytesSource(new Uint8Array(100)), bytes: undefined }, (f) => seen.push(f));
    await s.read(0, 10);
    await s.read(0, 5); // not further
    await s.read(10, 40);
    await s.read(50, 100); // clipped at the end
    expect(seen).toEqual([0.1, 0.5, 1]);
  });
});

describe('accelerationNames(ref)', () => {
  test('three columns keep their names; one N×3 array is named once', () => {
    expect(accelerationNames(['ax', 'ay', 'az'])).toEqual(['ax', 'ay', 'az']);
    expect(accelerationNames([4, 5, 6])).toEqual(['col 4', 'col 5', 'col 6']);
    expect(accelerationNames('/run/acc')).toEqual(['/run/acc x', 'y', 'z']);
    expect(accelerationNames(undefined)).toBeNull();
  });
});

describe('gzip-compressed text through the worker requests', () => {
  test('a .csv.gz Blob is described (header found) and loaded to the same numbers as the plain text', async () => {
    const { gzipSync } = await import('fflate');
    let text = 'x,y,z,m,eps\n';
    for (let i = 0; i < N; i++) text += `${u[3 * i]},${u[3 * i + 1]},${u[3 * i + 2]},${i + 1},0.01\n`;
    const gz = blobOf(gzipSync(new TextEncoder().encode(text)));
    const { description } = await describeRun({ type: 'describe', file: gz, fileName: 's.csv.gz' }, noProgress);
    expect(description.text).toMatchObject({ header: true, gzip: true, columns: ['x', 'y', 'z', 'm', 'eps'] });
    expect(description.proposal.mapping).toMatchObject({ positions: ['x', 'y', 'z'], mass: 'm', softening: 'eps' });
    const p = await loadRun({ type: 'load', file: gz, fileName: 's.csv.gz', mapping: description.proposal.mapping, box: null }, noProgress);
    expect(Array.from(p.positions)).toEqual(Array.from(u));
    expect(Array.from(p.masses)).toEqual(Array.from({ length: N }, (_, i) => i + 1));
    expect(Array.from(p.softening!)).toEqual(new Array(N).fill(0.01));
  });
});
