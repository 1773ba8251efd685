import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { CancelledError, WorkerCrashError, computeClientCreate, type WorkerSpawn } from '../../app/web/worker/client';
import { handleRequest } from '../../app/web/worker/handleRequest';
import type { EwaldRequest, ForcesPayload, ResultReply, WorkerReply, WorkerRequest } from '../../app/web/worker/protocol';

/** A worker stand-in: records requests; the test replies or crashes it by hand. */
interface FakeWorker {
  requests: { request: WorkerRequest; transfer: Transferable[] }[];
  terminated: boolean;
  reply(r: WorkerReply): void;
  crash(message: string): void;
}

function fakeSpawner() {
  const workers: FakeWorker[] = [];
  const spawn: WorkerSpawn = (onReply, onCrash) => {
    const w: FakeWorker = { requests: [], terminated: false, reply: onReply, crash: onCrash };
    workers.push(w);
    return {
      post: (request, transfer) => w.requests.push({ request, transfer }),
      terminate: () => {
        w.terminated = true;
      },
    };
  };
  return { workers, spawn };
}

function body(n = 4): EwaldRequest {
  return { type: 'ewald', positions: new Float64Array(3 * n).fill(0.25), masses: new Float64Array(n).fill(1 / n), box: boxMake(1), targets: Int32Array.from([0, 1]), options: { tol: 1e-6 } };
}

function resultFor(id: number): ResultReply {
  const payload: ForcesPayload = { kind: 'forces', targets: Int32Array.from([0]), acc: Float64Array.from([1, 2, 3]), phi: null, ewald: null, mesh: null, wrapped: 0 };
  return { type: 'result', id, payload, workerMs: 12 };
}

describe('computeClientCreate(spawn)', () => {
  test('starts one worker at once and resolves run() with the worker’s payload and time', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    expect(workers).toHaveLength(1);
    const p = client.run(body());
    expect(client.busy()).toBe(true);
    const { request } = workers[0].requests[0];
    expect(request.type).toBe('ewald');
    workers[0].reply(resultFor(request.id));
    const out = await p;
    expect(Array.from((out.payload as ForcesPayload).acc)).toEqual([1, 2, 3]);
    expect(out.workerMs).toBe(12);
    expect(client.busy()).toBe(false);
  });

  test('moves every typed-array buffer of the request (transfer list), each once', () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const j = body();
    void client.run(j).catch(() => {});
    const { transfer } = workers[0].requests[0];
    expect(transfer).toEqual([j.positions.buffer, j.masses.buffer, j.targets!.buffer]);
  });

  test('passes progress of the current request to onProgress and ignores replies with another id', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const seen: number[] = [];
    const p = client.run(body(), (f) => seen.push(f));
    const id = workers[0].requests[0].request.id;
    workers[0].reply({ type: 'progress', id, fraction: 0.25 });
    workers[0].reply({ type: 'progress', id: id + 100, fraction: 0.9 });
    workers[0].reply(resultFor(id + 100));
    expect(client.busy()).toBe(true);
    workers[0].reply({ type: 'progress', id, fraction: 1 });
    workers[0].reply(resultFor(id));
    await p;
    expect(seen).toEqual([0.25, 1]);
  });

  test('cancel() rejects with CancelledError, terminates the worker and starts a fresh one', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const p = client.run(body());
    expect(client.cancel()).toBe(true);
    await expect(p).rejects.toBeInstanceOf(CancelledError);
    expect(workers[0].terminated).toBe(true);
    expect(workers).toHaveLength(2);
    expect(workers[1].terminated).toBe(false);
    workers[0].reply(resultFor(workers[0].requests[0].request.id));
    expect(client.cancel()).toBe(false);
    expect(workers).toHaveLength(2);
  });

  test('run() while a request is going cancels the first and sends the second to a fresh worker', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const first = client.run(body());
    const second = client.run(body());
    await expect(first).rejects.toBeInstanceOf(CancelledError);
    expect(workers[0].terminated).toBe(true);
    expect(workers[1].requests).toHaveLength(1);
    workers[1].reply(resultFor(workers[1].requests[0].request.id));
    await expect(second).resolves.toMatchObject({ workerMs: 12 });
  });

  test('a crashed worker fails the request with WorkerCrashError and is replaced; the next request works', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const p = client.run(body());
    workers[0].crash('compute worker failed: boom');
    await expect(p).rejects.toEqual(new WorkerCrashError('compute worker failed: boom'));
    expect(workers[0].terminated).toBe(true);
    expect(workers).toHaveLength(2);
    const q = client.run(body());
    workers[1].reply(resultFor(workers[1].requests[0].request.id));
    await expect(q).resolves.toMatchObject({ workerMs: 12 });
  });

  test('a worker that crashes while idle is dropped and replaced only at the next request (no restart loop)', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    workers[0].crash('compute worker failed to start or stopped with an error');
    expect(workers[0].terminated).toBe(true);
    expect(workers).toHaveLength(1);
    const p = client.run(body());
    expect(workers).toHaveLength(2);
    workers[1].reply(resultFor(workers[1].requests[0].request.id));
    await expect(p).resolves.toMatchObject({ workerMs: 12 });
  });

  test('an error reply rejects with the engine’s name and message and keeps the worker', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const p = client.run(body());
    const id = workers[0].requests[0].request.id;
    workers[0].reply({ type: 'error', id, name: 'EngineInputError', message: 'mass of particle 3 is not finite (NaN)' });
    await expect(p).rejects.toMatchObject({ name: 'EngineInputError', message: 'mass of particle 3 is not finite (NaN)' });
    expect(workers).toHaveLength(1);
    expect(workers[0].terminated).toBe(false);
  });

  test('dispose() cancels the request, terminates the worker for good, and later requests reject', async () => {
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    const p = client.run(body());
    client.dispose();
    await expect(p).rejects.toBeInstanceOf(CancelledError);
    expect(workers[0].terminated).toBe(true);
    await expect(client.run(body())).rejects.toThrow(/disposed/);
  });
});

describe('computeClientCreate over a real message channel and handleRequest', () => {
  const ports: MessagePort[] = [];
  afterEach(() => {
    for (const p of ports.splice(0)) p.close();
  });

  /** Page ↔ "worker" over node's MessageChannel: structured clone with real transfers. */
  const channelSpawn: WorkerSpawn = (onReply) => {
    const { port1, port2 } = new MessageChannel();
    ports.push(port1, port2);
    port2.on('message', (req: WorkerRequest) => void handleRequest(req, (reply, transfer) => port2.postMessage(reply, transfer as ArrayBuffer[])));
    port1.on('message', onReply);
    return { post: (request, transfer) => port1.postMessage(request, transfer as ArrayBuffer[]), terminate: () => port1.close() };
  };

  test('the request’s buffers are moved (detached on the page) and the result equals ewaldForces', async () => {
    const d = demoSnapshot(256, 9);
    const ref = ewaldForces(d.positions, d.masses, boxMake(1), null, { tol: 1e-6 });
    const client = computeClientCreate(channelSpawn);
    const j: EwaldRequest = { type: 'ewald', positions: d.positions.slice(), masses: d.masses.slice(), box: boxMake(1), targets: null, options: { tol: 1e-6 } };
    const seen: number[] = [];
    const p = client.run(j, (f) => seen.push(f));
    expect(j.positions.byteLength).toBe(0);
    expect(j.masses.byteLength).toBe(0);
    const out = (await p).payload as ForcesPayload;
    expect(Array.from(out.acc)).toEqual(Array.from(ref.acc));
    expect(Array.from(out.phi!)).toEqual(Array.from(ref.phi));
    expect(out.ewald!.predictedRelativeError).toBe(ref.params.predictedRelativeError);
    expect(seen[seen.length - 1]).toBe(1);
    client.dispose();
  });
});

describe('the stop flag of a request (cross-origin isolated pages)', () => {
  afterEach(() => vi.unstubAllGlobals());

  test('each request carries its own shared flag, which Cancel sets before terminating the worker', () => {
    vi.stubGlobal('crossOriginIsolated', true);
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    void client.run(body()).catch(() => undefined);
    const stop = workers[0].requests[0].request.stop!;
    expect(stop).toBeInstanceOf(SharedArrayBuffer);
    expect(new Int32Array(stop)[0]).toBe(0);
    expect(workers[0].requests[0].transfer).not.toContain(stop);
    client.cancel();
    expect(new Int32Array(stop)[0]).toBe(1);
    expect(workers[0].terminated).toBe(true);
    void client.run(body()).catch(() => undefined); // the next request has a fresh, clear flag
    expect(new Int32Array(workers[1].requests[0].request.stop!)[0]).toBe(0);
    client.dispose();
  });

  test('without cross-origin isolation no flag is sent', () => {
    vi.stubGlobal('crossOriginIsolated', false);
    const { workers, spawn } = fakeSpawner();
    const client = computeClientCreate(spawn);
    void client.run(body()).catch(() => undefined);
    expect(workers[0].requests[0].request.stop).toBeUndefined();
    client.dispose();
  });
});
