import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { targetsResolve } from '../../engine/targets';
import type { MethodOptions } from '../../app/web/methods/methodOptions';
import { methodPlan } from '../../app/web/methods/methodPlan';
import { COPY_SLICE, copyChunked } from '../../app/web/worker/chunkedCopy';
import { PlanWorkerError, type PlanSpawn, planClientCreate } from '../../app/web/worker/planClient';
import { type PlanHolder, planHandle } from '../../app/web/worker/planHandle';
import type { PlanReply, PlanRequest } from '../../app/web/worker/planProtocol';

const EWALD: MethodOptions = { method: 'ewald', options: { tol: 1e-6, G: 1, softening: { kind: 'none' } } };

/** Plan workers that run planHandle on a later task (like a real worker); each can be crashed by hand. */
function spawner() {
  const workers: { requests: PlanRequest[]; terminated: boolean; crash: (reason: string) => void; hold: boolean; held: (() => void)[] }[] = [];
  const spawn: PlanSpawn = (onReply, onCrash) => {
    const holder: PlanHolder = { data: null };
    const w = { requests: [] as PlanRequest[], terminated: false, crash: onCrash, hold: false, held: [] as (() => void)[] };
    workers.push(w);
    return {
      post(req) {
        w.requests.push(req);
        const answer = () => {
          if (w.terminated) return;
          const out = planHandle(holder, req);
          if (out) onReply(structuredClone(out.reply) as PlanReply);
        };
        if (w.hold) w.held.push(answer);
        else setTimeout(answer, 1);
      },
      terminate() {
        w.terminated = true;
      },
    };
  };
  return { workers, spawn };
}

describe('planHandle (the plan worker without the worker)', () => {
  test('answers a method plan equal to methodPlan on the page, and a sample equal to targetsResolve', () => {
    const d = demoSnapshot(3000, 4);
    const holder: PlanHolder = { data: null };
    expect(planHandle(holder, { type: 'data', id: 0, dataId: 7, n: 3000 })).toBeNull();
    expect(planHandle(holder, { type: 'dataPart', id: 0, dataId: 7, array: 'positions', offset: 0, values: d.positions.slice(0, 5000) })).toBeNull();
    planHandle(holder, { type: 'dataPart', id: 0, dataId: 7, array: 'positions', offset: 5000, values: d.positions.slice(5000) });
    planHandle(holder, { type: 'dataPart', id: 0, dataId: 7, array: 'masses', offset: 0, values: d.masses.slice() });
    expect(Array.from(holder.data!.positions)).toEqual(Array.from(d.positions));
    const out = planHandle(holder, { type: 'method', id: 1, dataId: 7, box: boxMake(1), method: EWALD, targets: 500 })!;
    expect(out.reply).toEqual({ type: 'method', id: 1, plan: methodPlan(EWALD, d.positions, d.masses, boxMake(1), 500) });
    const s = planHandle(holder, { type: 'sample', id: 2, n: 3000, count: 100, seed: 9 })!;
    expect(s.reply.type === 'sample' && Array.from(s.reply.indices)).toEqual(Array.from(targetsResolve({ kind: 'sample', count: 100, seed: 9 }, 3000)));
    expect(s.transfer).toHaveLength(1);
  });

  test('a plan for a snapshot it does not hold, or a bad request, is an error reply naming the problem', () => {
    const holder: PlanHolder = { data: null };
    const out = planHandle(holder, { type: 'method', id: 3, dataId: 1, box: boxMake(1), method: EWALD, targets: 5 })!;
    expect(out.reply).toMatchObject({ type: 'error', id: 3, message: expect.stringMatching(/snapshot 1 was not sent/) });
    const part = planHandle(holder, { type: 'dataPart', id: 5, dataId: 2, array: 'masses', offset: 0, values: new Float64Array(2) })!;
    expect(part.reply).toMatchObject({ type: 'error', id: 5, message: expect.stringMatching(/without its announcement/) });
    const bad = planHandle(holder, { type: 'sample', id: 4, n: 10, count: 0, seed: 1 })!;
    expect(bad.reply).toMatchObject({ type: 'error', id: 4, message: expect.stringMatching(/positive integer/) });
  });
});

describe('planClientCreate(spawn)', () => {
  test('sends a snapshot once (a copy, moved), then only options; plans equal the page’s', async () => {
    const { workers, spawn } = spawner();
    const client = planClientCreate(spawn);
    expect(workers).toHaveLength(0); // started at the first request
    const d = demoSnapshot(2000, 1);
    const data = { positions: d.positions, masses: d.masses };
    const mesh: MethodOptions = { method: 'mesh', options: { mesh: 16, G: 1 } };
    const [p1, p2] = await Promise.all([client.methodPlan(data, boxMake(1), EWALD, 2000), client.methodPlan(data, boxMake(1), mesh, 2000)]);
    expect(p1).toEqual(methodPlan(EWALD, d.positions, d.masses, boxMake(1), 2000));
    expect(p2).toEqual(methodPlan(mesh, d.positions, d.masses, boxMake(1), 2000));
    expect(workers[0].requests.map((r) => r.type)).toEqual(['data', 'dataPart', 'dataPart', 'method', 'method']);
    const sent = workers[0].requests[1] as Extract<PlanRequest, { type: 'dataPart' }>;
    expect(sent.values.buffer).not.toBe(d.positions.buffer); // a copy moves, the page keeps its own
    expect(d.positions.byteLength).toBe(6000 * 8);
    // another snapshot is sent in its turn, in slices of COPY_SLICE numbers
    const e = demoSnapshot(30_000, 2);
    await client.methodPlan({ positions: e.positions, masses: e.masses }, boxMake(1), EWALD, 10);
    const parts = workers[0].requests.slice(5).map((r) => (r.type === 'dataPart' ? `${r.array}@${r.offset}` : r.type));
    expect(parts).toEqual(['data', 'positions@0', `positions@${COPY_SLICE}`, 'masses@0', 'method']);
    expect(Array.from(await client.sample(1000, 10, 3))).toEqual(Array.from(targetsResolve({ kind: 'sample', count: 10, seed: 3 }, 1000)));
  });

  test('a crash fails what is pending with the reason; the next request goes to a fresh worker with the snapshot again', async () => {
    const { workers, spawn } = spawner();
    const client = planClientCreate(spawn);
    const d = demoSnapshot(500, 1);
    const data = { positions: d.positions, masses: d.masses };
    await client.methodPlan(data, boxMake(1), EWALD, 5);
    workers[0].hold = true;
    const p = client.methodPlan(data, boxMake(1), EWALD, 6);
    await new Promise((r) => setTimeout(r, 5));
    workers[0].crash('it ended without an error message');
    await expect(p).rejects.toEqual(new PlanWorkerError('the planning worker stopped: it ended without an error message'));
    expect(workers[0].terminated).toBe(true);
    await expect(client.methodPlan(data, boxMake(1), EWALD, 7)).resolves.toEqual(methodPlan(EWALD, d.positions, d.masses, boxMake(1), 7));
    expect(workers).toHaveLength(2);
    expect(workers[1].requests.map((r) => r.type)).toEqual(['data', 'dataPart', 'dataPart', 'method']);
  });

  test('an error reply rejects with its name and message; dispose rejects what is pending and later requests', async () => {
    const { workers, spawn } = spawner();
    const client = planClientCreate(spawn);
    await expect(client.sample(10, 0, 1)).rejects.toMatchObject({ message: expect.stringMatching(/positive integer/) });
    workers[0].hold = true;
    const p = client.sample(100, 5, 1);
    await new Promise((r) => setTimeout(r, 5));
    client.dispose();
    await expect(p).rejects.toThrow(/disposed/);
    await expect(client.sample(100, 5, 1)).rejects.toThrow(/disposed/);
  });
});

describe('copyChunked(a, slice)', () => {
  test('copies in slices (yielding between them) and equals slice(); small arrays are copied at once', async () => {
    const a = Float64Array.from({ length: 1000 }, (_, i) => Math.sin(i));
    let done = false;
    const copying = copyChunked(a, 64).then((c) => {
      done = true;
      return c;
    });
    // the copy ends its task after the first slice: other tasks run before it is done
    let other = false;
    setImmediate(() => (other = true));
    for (let i = 0; i < 10; i++) await Promise.resolve();
    expect(done).toBe(false);
    const c = await copying;
    expect(other).toBe(true);
    expect(c).not.toBe(a);
    expect(Array.from(c)).toEqual(Array.from(a));
    const b = Int32Array.from([1, 2, 3]);
    const cb = await copyChunked(b, 64);
    expect(cb).toBeInstanceOf(Int32Array);
    expect(Array.from(cb)).toEqual([1, 2, 3]);
  });
});
