import { beforeEach, describe, expect, test } from 'vitest';
import type { ComputeClient, Outcome } from '../../app/web/worker/client';
import { CancelledError } from '../../app/web/worker/client';
import { requestRun } from '../../app/web/worker/handleRequest';
import type { RequestBody } from '../../app/web/worker/protocol';
import { refEncode } from '../../app/web/loading/mappingChoice';
import { MAPPINGS_KEY, mappingsAll } from '../../app/web/loading/mappingMemory';
import { fileOpen, loadLimitSet, loadStore, mappingCancel, mappingChange, mappingConfirm, mappingEdit } from '../../app/web/state/loadActions';
import { computeClientSet } from '../../app/web/state/pipeline';
import { DEFAULT_DRAFT } from '../../app/web/state/settings';
import { appReset, appStore } from '../../app/web/state/store';
import { hdf5Bytes, seededUniform } from '../engine/formats/fixtures';

/** A Blob of bytes (copied into an ArrayBuffer-backed array, as Blob's typing wants). */
function blobOf(bytes: Uint8Array): Blob {
  return new Blob([new Uint8Array(bytes)]);
}

/** A client running the worker's request handler in this thread, recording request types. */
function inlineClient() {
  const types: string[] = [];
  let current: { reject: (e: Error) => void } | null = null;
  const client: ComputeClient = {
    run(body: RequestBody, onProgress) {
      current?.reject(new CancelledError());
      types.push(body.type);
      return new Promise<Outcome>((resolve, reject) => {
        current = { reject };
        requestRun(body, (f) => onProgress?.(f)).then(
          (payload) => {
            current = null;
            resolve({ payload, workerMs: 1 });
          },
          (e) => {
            current = null;
            reject(e);
          },
        );
      });
    },
    cancel: () => false,
    busy: () => current !== null,
    dispose: () => {},
  };
  return { client, types };
}

// local storage for the remembered mappings (this suite runs in Node)
const storage = new Map<string, string>();
(globalThis as { localStorage?: unknown }).localStorage = { getItem: (k: string) => storage.get(k) ?? null, setItem: (k: string, v: string) => void storage.set(k, v), removeItem: (k: string) => void storage.delete(k) };

const N = 64;
const u = seededUniform(3 * N, 21);
const comp = (c: number) => Float64Array.from({ length: N }, (_, i) => 10 * u[3 * i + c]);

function h5(masses: Float64Array = new Float64Array(N).fill(1 / N)): Promise<Uint8Array> {
  return hdf5Bytes((f) => {
    f.create_group('flock');
    f.create_dataset({ name: 'flock/east', data: comp(0) });
    f.create_dataset({ name: 'flock/north', data: comp(1) });
    f.create_dataset({ name: 'flock/up', data: comp(2) });
    f.create_dataset({ name: 'flock/heft', data: masses });
    f.get('flock').create_attribute('extent', 10);
  });
}

function mapSplit(): void {
  mappingEdit({
    positionsMode: 'three',
    px: refEncode('/flock/east'),
    py: refEncode('/flock/north'),
    pz: refEncode('/flock/up'),
    mass: refEncode('/flock/heft'),
    boxMode: 'file',
    boxRef: '/flock#extent',
  });
}

let c = inlineClient();

beforeEach(() => {
  storage.clear();
  appReset({ ...DEFAULT_DRAFT, n: '200' });
  loadStore.setState({ step: null, used: null }, true);
  c = inlineClient();
  computeClientSet(c.client);
});

describe('fileOpen → mapping step → mappingConfirm', () => {
  test('a new HDF5 layout opens the mapping step; the confirmed mapping loads, computes and is remembered', async () => {
    const file = blobOf(await h5());
    expect(await fileOpen(file, 'flock.h5')).toBeNull();
    const step = loadStore.getState().step!;
    expect(step.fileName).toBe('flock.h5');
    expect(step.description.format).toBe('hdf5');
    expect(appStore.getState().snapshot).toBeNull(); // nothing loaded while asking
    expect(c.types).toEqual(['describe']);
    mapSplit();
    const snap = await mappingConfirm();
    expect(snap!.n).toBe(N);
    expect(snap!.box).toEqual({ lx: 10, ly: 10, lz: 10 });
    expect(snap!.boxGuessed).toBe(false);
    expect(Array.from(snap!.positions.subarray(0, 3))).toEqual([comp(0)[0], comp(1)[0], comp(2)[0]]);
    const s = appStore.getState();
    expect(s.status).toBe('done');
    expect(s.draft.box).toBe('10');
    expect(loadStore.getState().step).toBeNull();
    expect(loadStore.getState().used!.how).toBe('confirmed');
    expect(c.types.slice(0, 2)).toEqual(['describe', 'load']);
    expect(mappingsAll().map((e) => e.signature)).toEqual([step.description.signature]);

    // the same layout again (another N would do too): loaded at once with the remembered mapping
    c.types.length = 0;
    const again = await fileOpen(file, 'flock-2.h5');
    expect(again!.n).toBe(N);
    expect(loadStore.getState().step).toBeNull();
    expect(loadStore.getState().used!.how).toBe('remembered');
    expect(c.types.slice(0, 2)).toEqual(['describe', 'load']);

    // "change mapping" reopens the step with the mapping used
    mappingChange();
    expect(loadStore.getState().step!.draft.px).toBe(refEncode('/flock/east'));
    mappingCancel();
    expect(loadStore.getState().step).toBeNull();
    expect(appStore.getState().snapshot!.n).toBe(N);
  });

  test('a mistake in the form stays in the step as one line; nothing is loaded or remembered', async () => {
    await fileOpen(blobOf(await h5()), 'flock.h5');
    mapSplit();
    mappingEdit({ boxMode: 'typed', boxText: 'big' });
    expect(await mappingConfirm()).toBeNull();
    expect(loadStore.getState().step!.error).toMatch(/^box: expected one positive side/);
    expect(appStore.getState().snapshot).toBeNull();
    expect(storage.has(MAPPINGS_KEY)).toBe(false);
    expect(c.types).toEqual(['describe']);
  });

  test('a load that fails after confirming reopens the step with the reason; the previous snapshot stays', async () => {
    const m = new Float64Array(N).fill(1);
    m[5] = -1;
    await fileOpen(new TextEncoder().encode('x,y,z\n1,2,3\n4,5,6\n'), 'before.csv');
    const before = appStore.getState().snapshot!;
    expect(before.n).toBe(2);
    await fileOpen(blobOf(await h5(m)), 'negative.h5');
    mapSplit();
    expect(await mappingConfirm()).toBeNull();
    const s = appStore.getState();
    expect(s.status).toBe('error');
    expect(s.message).toMatch(/^negative\.h5: dataset "\/flock\/heft", particle 5: mass -1 is negative/);
    expect(s.snapshot).toBe(before);
    expect(loadStore.getState().step!.error).toBe(s.message);
  });

  test('a file no reader takes gets one line naming it; no step opens and the snapshot stays', async () => {
    await fileOpen(new TextEncoder().encode('x,y,z\n1,2,3\n4,5,6\n'), 'before.csv');
    const before = appStore.getState().snapshot!;
    await fileOpen(new Uint8Array([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0, 0, 0]), 'program.bin');
    const s = appStore.getState();
    expect(s.status).toBe('error');
    expect(s.message).toMatch(/^program\.bin: not a snapshot format torusgrav reads/);
    expect(s.snapshot).toBe(before);
    expect(loadStore.getState().step).toBeNull();
  });

  test('a file above the load limit opens the mapping step with the limit; keeping every K-th particle loads it', async () => {
    let text = 'x,y,z\n';
    for (let i = 0; i < 100; i++) text += `${u[3 * i % u.length]},${u[(3 * i + 1) % u.length]},${(i + 0.5) / 100}\n`;
    const bytes = new TextEncoder().encode(text);
    loadLimitSet(Math.ceil(bytes.length / 3));
    try {
      expect(await fileOpen(bytes, 'wide.csv')).toBeNull();
      const step = loadStore.getState().step!;
      expect(step.error).toMatch(/^wide\.csv: .*above the load limit .*keep every K-th particle/);
      expect(appStore.getState().status).toBe('error');
      mappingEdit({ every: '4' });
      const snap = await mappingConfirm();
      expect(snap!.n).toBe(25);
      expect(snap!.positions[2]).toBe(0.005);
      expect(snap!.positions[5]).toBe(0.045);
      expect(snap!.source).toContain('1 in 4 of 100 particles');
    } finally {
      loadLimitSet(undefined);
    }
  });

  test('text whose header names x, y, z loads in one step (describe, load), bytes given as a Uint8Array', async () => {
    const bytes = new TextEncoder().encode('x,y,z,mass\n1,2,3,1\n4,5,6,2\n7,8,9,1\n');
    const snap = await fileOpen(bytes, 'three.csv');
    expect(snap!.n).toBe(3);
    expect(Array.from(snap!.masses)).toEqual([1, 2, 1]);
    expect(loadStore.getState().used!.how).toBe('header');
    expect(bytes.length).toBeGreaterThan(0); // the caller's bytes were not moved away
    expect(c.types.slice(0, 2)).toEqual(['describe', 'load']);
  });
});
