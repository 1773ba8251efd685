import { describe, expect, test } from 'vitest';
import type { LoadChoice } from '../../app/web/loading/mappingChoice';
import { type KeyValueStore, MAPPINGS_KEPT, MAPPINGS_KEY, mappingForget, mappingRecall, mappingRemember, mappingWellFormed, mappingsAll } from '../../app/web/loading/mappingMemory';

function memoryStore(): KeyValueStore & { map: Map<string, string> } {
  const map = new Map<string, string>();
  return { map, getItem: (k) => map.get(k) ?? null, setItem: (k, v) => void map.set(k, v) };
}

const choice = (x: string): LoadChoice => ({ mapping: { positions: [`${x}/x`, `${x}/y`, `${x}/z`], mass: null, massDefault: 1 }, boxText: '10', units: 'G1', G: '1', every: 1 });

describe('remembered mappings (local storage by structure signature)', () => {
  test('recall gives the mapping confirmed for the same signature, and nothing for another', () => {
    const s = memoryStore();
    mappingRemember({ signature: 'hdf5-aaaa', fileName: 'one.h5', savedAt: 1, choice: choice('/a') }, s);
    mappingRemember({ signature: 'npz-bbbb', fileName: 'two.npz', savedAt: 2, choice: choice('/b') }, s);
    expect(mappingRecall('hdf5-aaaa', s)?.choice).toEqual(choice('/a'));
    expect(mappingRecall('npz-bbbb', s)?.fileName).toBe('two.npz');
    expect(mappingRecall('hdf5-cccc', s)).toBeNull();
    // the stored form is plain JSON under one key
    expect(JSON.parse(s.map.get(MAPPINGS_KEY)!)).toHaveLength(2);
  });

  test('confirming again for a signature replaces the earlier mapping', () => {
    const s = memoryStore();
    mappingRemember({ signature: 'sig', fileName: 'a.h5', savedAt: 1, choice: choice('/a') }, s);
    mappingRemember({ signature: 'sig', fileName: 'b.h5', savedAt: 2, choice: choice('/b') }, s);
    expect(mappingsAll(s)).toHaveLength(1);
    expect(mappingRecall('sig', s)?.choice.mapping.positions).toEqual(['/b/x', '/b/y', '/b/z']);
  });

  test(`keeps the ${MAPPINGS_KEPT} newest`, () => {
    const s = memoryStore();
    for (let i = 0; i < MAPPINGS_KEPT + 5; i++) mappingRemember({ signature: `sig${i}`, fileName: 'f', savedAt: i, choice: choice(`/g${i}`) }, s);
    const all = mappingsAll(s);
    expect(all).toHaveLength(MAPPINGS_KEPT);
    expect(all[0].signature).toBe(`sig${MAPPINGS_KEPT + 4}`);
    expect(mappingRecall('sig4', s)).toBeNull();
    expect(mappingRecall('sig5', s)).not.toBeNull();
  });

  test('forget removes one signature', () => {
    const s = memoryStore();
    mappingRemember({ signature: 'a', fileName: 'f', savedAt: 1, choice: choice('/a') }, s);
    mappingRemember({ signature: 'b', fileName: 'f', savedAt: 2, choice: choice('/b') }, s);
    mappingForget('a', s);
    expect(mappingsAll(s).map((e) => e.signature)).toEqual(['b']);
  });

  test('damaged storage is ignored: not JSON, not a list, malformed entries', () => {
    const s = memoryStore();
    s.map.set(MAPPINGS_KEY, '{not json');
    expect(mappingsAll(s)).toEqual([]);
    s.map.set(MAPPINGS_KEY, '{"a":1}');
    expect(mappingsAll(s)).toEqual([]);
    const good = { signature: 'ok', fileName: 'f', savedAt: 3, choice: choice('/ok') };
    s.map.set(MAPPINGS_KEY, JSON.stringify([{ signature: 'x' }, { ...good, signature: 'bad', choice: { ...choice('/x'), every: 0 } }, { ...good, signature: 'bad2', choice: { ...choice('/x'), mapping: { positions: [1, 2] } } }, good]));
    expect(mappingsAll(s).map((e) => e.signature)).toEqual(['ok']);
    mappingRemember({ signature: 'new', fileName: 'f', savedAt: 4, choice: choice('/n') }, s);
    expect(mappingsAll(s).map((e) => e.signature)).toEqual(['new', 'ok']);
  });

  test('a store that refuses writes (quota, private mode) or is missing does not throw', () => {
    const full: KeyValueStore = {
      getItem: () => null,
      setItem: () => {
        throw new Error('QuotaExceededError');
      },
    };
    expect(() => mappingRemember({ signature: 's', fileName: 'f', savedAt: 1, choice: choice('/a') }, full)).not.toThrow();
    expect(mappingRecall('s', null)).toBeNull();
    expect(() => mappingRemember({ signature: 's', fileName: 'f', savedAt: 1, choice: choice('/a') }, null)).not.toThrow();
  });

  test('mappingWellFormed accepts mappings of every format and rejects broken ones', () => {
    expect(mappingWellFormed({ positions: [0, 1, 2], mass: 3 })).toBe(true);
    expect(mappingWellFormed({ positions: '/pos', mass: null, massDefault: 2, accelerations: ['ax', 'ay', 'az'], ids: 'id', softening: 'eps', box: '/#L' })).toBe(true);
    expect(mappingWellFormed({ mass: 'm' })).toBe(false);
    expect(mappingWellFormed({ positions: [0, 1] })).toBe(false);
    expect(mappingWellFormed({ positions: [0, 1, -2] })).toBe(false);
    expect(mappingWellFormed({ positions: 'p', massDefault: -1 })).toBe(false);
    expect(mappingWellFormed({ positions: 'p', box: 3 })).toBe(false);
    expect(mappingWellFormed(null)).toBe(false);
  });
});
