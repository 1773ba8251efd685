import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { handleRequest, progressThrottle } from '../../app/web/worker/handleRequest';
import type { EwaldReply, WorkerReply, WorkerRequest } from '../../app/web/worker/protocol';

function collect(request: WorkerRequest) {
  const posts: { reply: WorkerReply; transfer: Transferable[] }[] = [];
  handleRequest(request, (reply, transfer) => posts.push({ reply, transfer }));
  return posts;
}

function demoRequest(n: number, targets: Int32Array | null = null): WorkerRequest {
  const d = demoSnapshot(n, 3);
  return { type: 'ewald', id: 7, positions: d.positions, masses: d.masses, box: boxMake(d.box), targets, options: { tol: 1e-5 } };
}

describe('progressThrottle(send, step)', () => {
  test('passes a fraction only when it grew by step since the last one passed, and always passes 1', () => {
    const sent: number[] = [];
    const p = progressThrottle((f) => sent.push(f), 0.02);
    for (const f of [0, 0.01, 0.019, 0.02, 0.03, 0.5, 0.515, 0.99, 1]) p(f);
    expect(sent).toEqual([0, 0.02, 0.5, 0.99, 1]);
  });
});

describe('handleRequest(ewald request, post)', () => {
  test('replies with exactly the accelerations and potentials of ewaldForces on the same input', () => {
    const req = demoRequest(300);
    const ref = ewaldForces(req.positions.slice(), req.masses.slice(), req.box, null, req.options);
    const posts = collect(req);
    const last = posts[posts.length - 1].reply as EwaldReply;
    expect(last.type).toBe('result');
    expect(last.id).toBe(7);
    expect(Array.from(last.acc)).toEqual(Array.from(ref.acc));
    expect(Array.from(last.phi)).toEqual(Array.from(ref.phi));
    expect(Array.from(last.targets)).toEqual(Array.from(ref.targets));
    expect(last.params).toEqual(ref.params);
    expect(last.wrapped).toBe(0);
    expect(last.workerMs).toBeGreaterThanOrEqual(0);
  });

  test('moves the result buffers (targets, acc, phi) in the transfer list', () => {
    const posts = collect(demoRequest(100));
    const { reply, transfer } = posts[posts.length - 1];
    const r = reply as EwaldReply;
    expect(transfer).toHaveLength(3);
    expect(transfer).toContain(r.acc.buffer);
    expect(transfer).toContain(r.phi.buffer);
    expect(transfer).toContain(r.targets.buffer);
  });

  test('sends progress in steps of at least 2 %, increasing, ending at 1 before the result', () => {
    const posts = collect(demoRequest(2000));
    const fractions = posts.filter((p) => p.reply.type === 'progress').map((p) => (p.reply as { fraction: number }).fraction);
    expect(posts[posts.length - 1].reply.type).toBe('result');
    expect(fractions.length).toBeGreaterThan(3);
    expect(fractions[fractions.length - 1]).toBe(1);
    for (let i = 1; i < fractions.length; i++) {
      expect(fractions[i]).toBeGreaterThan(fractions[i - 1]);
      if (fractions[i] < 1) expect(fractions[i] - fractions[i - 1]).toBeGreaterThanOrEqual(0.02);
    }
    for (const p of posts) if (p.reply.type === 'progress') expect(p.reply.id).toBe(7);
  });

  test('computes only the requested targets, in their order', () => {
    const targets = Int32Array.from([5, 17, 42]);
    const req = demoRequest(200, targets);
    const ref = ewaldForces(req.positions.slice(), req.masses.slice(), req.box, Int32Array.from([5, 17, 42]), req.options);
    const last = collect(req).pop()!.reply as EwaldReply;
    expect(Array.from(last.targets)).toEqual([5, 17, 42]);
    expect(last.acc).toHaveLength(9);
    expect(Array.from(last.acc)).toEqual(Array.from(ref.acc));
  });

  test('turns an engine input error into one error reply naming the particle (NaN coordinate)', () => {
    const req = demoRequest(50);
    req.positions[3 * 12 + 1] = NaN;
    const posts = collect(req);
    expect(posts).toHaveLength(1);
    const r = posts[0].reply;
    expect(r.type).toBe('error');
    if (r.type !== 'error') return;
    expect(r.id).toBe(7);
    expect(r.name).toBe('EngineInputError');
    expect(r.message).toBe('coordinate y of particle 12 is not finite (NaN)');
  });

  test('turns an option error into an error reply (tolerance out of range)', () => {
    const req = { ...demoRequest(50), options: { tol: 2 } };
    const r = collect(req)[0].reply;
    expect(r.type).toBe('error');
    if (r.type === 'error') expect(r.message).toMatch(/tolerance must lie in \(0, 1\), got 2/);
  });

  test('answers an unknown request type with an error reply, without throwing', () => {
    const posts = collect({ type: 'nonsense', id: 3 } as unknown as WorkerRequest);
    expect(posts).toEqual([{ reply: { type: 'error', id: 3, name: 'RequestError', message: 'unknown request type "nonsense"' }, transfer: [] }]);
  });
});
