import { describe, expect, test } from 'vitest';
import { snapshotDescribe } from '../../engine/formats/registry';
import type { SnapshotDescription } from '../../engine/formats/description';
import { UNIT_PRESETS } from '../../engine/units';
import {
  type LoadChoice,
  type MappingDraft,
  boxOptions,
  choiceFromDraft,
  choiceWords,
  draftFromChoice,
  fieldOptions,
  loadDecide,
  mappingFits,
  proposalChoice,
  refDecode,
  refEncode,
  vectorOptions,
} from '../../app/web/loading/mappingChoice';
import { hdf5Bytes, npyBytes, seededUniform, zipBytes } from '../engine/formats/fixtures';

const enc = new TextEncoder();
const N = 6;
const u = seededUniform(3 * N, 3);

async function h5Split(): Promise<SnapshotDescription> {
  const bytes = await hdf5Bytes((f) => {
    f.create_group('swarm');
    for (const [i, name] of ['east', 'north', 'up'].entries()) f.create_dataset({ name: `swarm/${name}`, data: Float64Array.from({ length: N }, (_, j) => u[3 * j + i]) });
    f.create_dataset({ name: 'swarm/pull', data: u, shape: [N, 3] });
    f.create_dataset({ name: 'swarm/heft', data: new Float64Array(N).fill(2) });
    f.get('swarm').create_attribute('extent', 4);
    f.create_attribute('note', 'text, not a box');
  });
  return snapshotDescribe(bytes, 'split.h5');
}

const npz = () =>
  snapshotDescribe(
    zipBytes([
      { name: 'pos.npy', data: npyBytes(u, [N, 3]) },
      { name: 'mass.npy', data: npyBytes(new Float64Array(N).fill(1), [N]) },
    ]),
    'b.npz',
  );

describe('fieldOptions / vectorOptions / boxOptions', () => {
  test('text with a header: columns by name; without: by number; no whole-vector arrays', async () => {
    const withHeader = await snapshotDescribe(enc.encode('x,y,z,m\n1,2,3,4\n'), 'a.csv');
    expect(fieldOptions(withHeader).map((o) => o.ref)).toEqual(['x', 'y', 'z', 'm']);
    expect(vectorOptions(withHeader)).toEqual([]);
    const bare = await snapshotDescribe(enc.encode('1 2 3 4 5\n6 7 8 9 10\n'), 'a.txt');
    expect(fieldOptions(bare).map((o) => o.ref)).toEqual([0, 1, 2, 3, 4]);
  });

  test('.npy (N, 4): its four columns by number', async () => {
    const d = await snapshotDescribe(npyBytes(new Float64Array(4 * N), [N, 4]), 'a.npy');
    expect(fieldOptions(d).map((o) => o.ref)).toEqual([0, 1, 2, 3]);
    expect(vectorOptions(d)).toEqual([]);
  });

  test('HDF5: 1-D datasets, each column of a 2-D one, N×3 datasets as vectors, positive numeric attributes as boxes', async () => {
    const d = await h5Split();
    expect(fieldOptions(d).map((o) => o.ref)).toEqual(['/swarm/east', '/swarm/heft', '/swarm/north', '/swarm/pull[0]', '/swarm/pull[1]', '/swarm/pull[2]', '/swarm/up']);
    expect(vectorOptions(d).map((o) => o.ref)).toEqual(['/swarm/pull']);
    expect(boxOptions(d)).toEqual([{ value: '/swarm#extent', label: '/swarm#extent = 4' }]);
  });

  test('references are encoded so that column 0 and an array named "0" differ', () => {
    expect(refEncode(0)).not.toBe(refEncode('0'));
    expect(refDecode(refEncode(0))).toBe(0);
    expect(refDecode(refEncode('/a/b[2]'))).toBe('/a/b[2]');
    expect(() => refDecode('[1,2]')).toThrow(RangeError);
  });
});

describe('draftFromChoice / choiceFromDraft', () => {
  test('the form of a proposal gives the proposal back (text, .npy, .npz, HDF5)', async () => {
    const files = [
      await snapshotDescribe(enc.encode('id,x,y,z,mass,ax,ay,az\n1,1,2,3,4,5,6,7\n'), 'a.csv'),
      await snapshotDescribe(npyBytes(new Float64Array(4 * N), [N, 4]), 'a.npy'),
      await npz(),
      await h5Split(),
    ];
    for (const d of files) {
      const c = proposalChoice(d, '1');
      const back = choiceFromDraft(draftFromChoice(d, c));
      expect(back.mapping.positions).toEqual(d.proposal.mapping.positions);
      expect(back.mapping.mass ?? null).toEqual(d.proposal.mapping.mass ?? null);
      expect(back.mapping.accelerations).toEqual(d.proposal.mapping.accelerations);
      expect(back.mapping.ids).toEqual(d.proposal.mapping.ids);
      expect(back.G).toBe('1');
      expect(back.units).toBe('G1');
    }
  });

  test('split positions, a mass dataset, N×3 accelerations and the box from an attribute', async () => {
    const d = await h5Split();
    const f: MappingDraft = {
      ...draftFromChoice(d, proposalChoice(d, '1')),
      positionsMode: 'three',
      px: refEncode('/swarm/east'),
      py: refEncode('/swarm/north'),
      pz: refEncode('/swarm/up'),
      mass: refEncode('/swarm/heft'),
      accMode: 'one',
      acc: refEncode('/swarm/pull'),
      boxMode: 'file',
      boxRef: '/swarm#extent',
      units: 'kpc-kms-1e10msun',
    };
    const c = choiceFromDraft(f);
    expect(c.mapping).toEqual({ positions: ['/swarm/east', '/swarm/north', '/swarm/up'], mass: '/swarm/heft', accelerations: '/swarm/pull', box: '/swarm#extent' });
    expect(c.boxText).toBeNull();
    expect(Number(c.G)).toBe(UNIT_PRESETS.find((p) => p.name === 'kpc-kms-1e10msun')!.G);
    expect(mappingFits(d, c.mapping)).toBe(true);
  });

  test('unit masses carry the typed mass; a typed box is kept as text; custom G is read', async () => {
    const d = await npz();
    const base = draftFromChoice(d, proposalChoice(d, '1'));
    const c = choiceFromDraft({ ...base, mass: '', massDefault: '2.5', boxMode: 'typed', boxText: ' 10,20,30 ', units: 'custom', G: '4.3e-6', every: '3' });
    expect(c.mapping.mass).toBeNull();
    expect(c.mapping.massDefault).toBe(2.5);
    expect(c.boxText).toBe('10,20,30');
    expect(c.G).toBe('0.0000043');
    expect(c.every).toBe(3);
  });

  test('every mistake is one line naming the field', async () => {
    const d = await h5Split();
    const base = draftFromChoice(d, proposalChoice(d, '1'));
    const cases: [Partial<MappingDraft>, RegExp][] = [
      [{ positionsMode: 'one', positions: '' }, /^positions: choose an array/],
      [{ positionsMode: 'three', px: refEncode('/swarm/east'), py: '', pz: refEncode('/swarm/up') }, /^positions: choose all three/],
      [{ positionsMode: 'three', px: refEncode('/swarm/east'), py: refEncode('/swarm/east'), pz: refEncode('/swarm/up') }, /^positions: x, y and z must be three different/],
      [{ mass: '', massDefault: '0' }, /^mass of every particle: expected a positive number, got "0"/],
      [{ accMode: 'three', ax: '', ay: '', az: '' }, /^accelerations: choose all three/],
      [{ boxMode: 'typed', boxText: '1,2' }, /^box: expected one positive side or three/],
      [{ boxMode: 'file', boxRef: '' }, /^box: this file has no entry/],
      [{ units: 'custom', G: '-1' }, /^G: expected a positive number/],
      [{ units: 'furlongs' }, /^units: unknown preset "furlongs"/],
      [{ every: '0' }, /^keep every: expected a whole number of at least 1, got "0"/],
      [{ every: '1.5' }, /^keep every:/],
    ];
    for (const [patch, re] of cases) expect(() => choiceFromDraft({ ...base, ...patch })).toThrow(re);
  });
});

describe('mappingFits(description, mapping)', () => {
  test('true only when every reference names something the file has', async () => {
    const d = await h5Split();
    expect(mappingFits(d, { positions: '/swarm/pull' })).toBe(true);
    expect(mappingFits(d, { positions: ['/swarm/east', '/swarm/north', '/swarm/up'], mass: '/swarm/pull[1]' })).toBe(true);
    expect(mappingFits(d, { positions: ['/swarm/east', '/swarm/north', '/swarm/gone'] })).toBe(false);
    expect(mappingFits(d, { positions: '/swarm/pull', mass: '/swarm/pull[3]' })).toBe(false);
    expect(mappingFits(d, { positions: '/swarm/pull', box: '/swarm#side' })).toBe(false);
    expect(mappingFits(d, { positions: '/swarm/pull', box: '/swarm#extent' })).toBe(true);
    expect(mappingFits(d, { mass: '/swarm/heft' })).toBe(false); // no positions
    const npy = await snapshotDescribe(npyBytes(new Float64Array(4 * N), [N, 4]), 'a.npy');
    expect(mappingFits(npy, { positions: [0, 1, 2], mass: 3 })).toBe(true);
    expect(mappingFits(npy, { positions: [0, 1, 2], mass: 4 })).toBe(false);
    const text = await snapshotDescribe(enc.encode('X,Y,Z\n1,2,3\n'), 'a.csv');
    expect(mappingFits(text, { positions: ['x', 'y', 'z'] })).toBe(true); // header names ignore case
    expect(mappingFits(text, { positions: ['x', 'y', 'w'] })).toBe(false);
  });
});

describe('loadDecide(description, remembered, G)', () => {
  test('text whose header names the positions loads at once with the proposal (ax, ay, az and id included)', async () => {
    const d = await snapshotDescribe(enc.encode('id,x,y,z,m,ax,ay,az\n1,1,2,3,4,5,6,7\n'), 'a.csv');
    const r = loadDecide(d, null, '1');
    expect(r.kind).toBe('direct');
    if (r.kind === 'direct') expect(r.how).toBe('header');
    expect(r.choice.mapping).toEqual({ positions: ['x', 'y', 'z'], mass: 'm', accelerations: ['ax', 'ay', 'az'], ids: 'id' });
  });

  test('text without a header, and binary files seen for the first time, ask', async () => {
    expect(loadDecide(await snapshotDescribe(enc.encode('1 2 3\n4 5 6\n'), 'a.txt'), null, '1').kind).toBe('ask');
    expect(loadDecide(await npz(), null, '1').kind).toBe('ask');
    expect(loadDecide(await h5Split(), null, '1').kind).toBe('ask');
  });

  test('a remembered mapping that fits loads at once; one that does not fit asks, starting from the proposal', async () => {
    const d = await h5Split();
    const remembered: LoadChoice = { mapping: { positions: ['/swarm/east', '/swarm/north', '/swarm/up'], box: '/swarm#extent' }, boxText: null, units: 'G1', G: '1', every: 1 };
    const r = loadDecide(d, remembered, '1');
    expect(r).toEqual({ kind: 'direct', choice: remembered, how: 'remembered' });
    const stale: LoadChoice = { ...remembered, mapping: { positions: ['/old/x', '/old/y', '/old/z'] } };
    const s = loadDecide(d, stale, '1');
    expect(s.kind).toBe('ask');
    expect(s.choice.mapping).toEqual(d.proposal.mapping);
  });

  test('the current G is kept, as its preset when it is one', async () => {
    const d = await npz();
    const pc = UNIT_PRESETS.find((p) => p.name === 'pc-kms-msun')!;
    expect(proposalChoice(d, String(pc.G)).units).toBe('pc-kms-msun');
    expect(proposalChoice(d, '2')).toMatchObject({ units: 'custom', G: '2' });
  });
});

describe('choiceWords(choice)', () => {
  test('names every quantity that was mapped, the box and the units', () => {
    const words = choiceWords({ mapping: { positions: ['/s/e', '/s/n', '/s/u'], mass: null, massDefault: 2, accelerations: '/s/pull', ids: 3, box: '/s#extent' }, boxText: null, units: 'kpc-kms-msun', G: '4.3e-6', every: 2 });
    expect(words).toEqual(['positions /s/e, /s/n, /s/u', 'masses 2 each', 'accelerations /s/pull (N×3)', 'ids column 3', 'box from /s#extent', 'kpc, km/s, M☉', '1 particle in 2 kept']);
  });
});
