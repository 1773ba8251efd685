import { describe, expect, test } from 'vitest';
import { boxMake } from '../../engine/box';
import { demoSnapshot } from '../../engine/demo/demoSnapshot';
import { ewaldForces } from '../../engine/ewald/ewald';
import { meshForces } from '../../engine/codeUnderTest/meshForces';
import { errorReport } from '../../engine/stats/errorReport';
import { neighboursFind } from '../../engine/stats/neighbours';
import { handleRequest, progressThrottle } from '../../app/web/worker/handleRequest';
import type { ComparePayload, DemoPayload, DescribePayload, ForcesPayload, LoadPayload, NeighboursPayload, ResultReply, SweepPayload, WorkerReply, WorkerRequest } from '../../app/web/worker/protocol';

async function collect(request: WorkerRequest) {
  const posts: { reply: WorkerReply; transfer: Transferable[] }[] = [];
  await handleRequest(request, (reply, transfer) => posts.push({ reply, transfer }));
  return posts;
}

async function result<P>(request: WorkerRequest): Promise<{ payload: P; transfer: Transferable[]; reply: ResultReply }> {
  const posts = await collect(request);
  const last = posts[posts.length - 1];
  if (last.reply.type !== 'result') throw new Error(`expected a result, got ${JSON.stringify(last.reply)}`);
  return { payload: last.reply.payload as P, transfer: last.transfer, reply: last.reply };
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

describe('handleRequest(ewald)', () => {
  test('replies with exactly the accelerations and potentials of ewaldForces on the same input', async () => {
    const req = demoRequest(300);
    if (req.type !== 'ewald') throw new Error();
    const ref = ewaldForces(req.positions.slice(), req.masses.slice(), req.box, null, req.options);
    const { payload, reply } = await result<ForcesPayload>(req);
    expect(reply.id).toBe(7);
    expect(payload.kind).toBe('forces');
    expect(Array.from(payload.acc)).toEqual(Array.from(ref.acc));
    expect(Array.from(payload.phi!)).toEqual(Array.from(ref.phi));
    expect(payload.ewald).toEqual(ref.params);
    expect(reply.workerMs).toBeGreaterThanOrEqual(0);
  });

  test('moves the result buffers (targets, acc, phi) in the transfer list', async () => {
    const { payload, transfer } = await result<ForcesPayload>(demoRequest(100));
    expect(transfer).toHaveLength(3);
    expect(transfer).toContain(payload.acc.buffer);
    expect(transfer).toContain(payload.phi!.buffer);
    expect(transfer).toContain(payload.targets.buffer);
  });

  test('sends progress in steps of at least 2 %, increasing, ending at 1 before the result', async () => {
    const posts = await collect(demoRequest(2000));
    const fractions = posts.filter((p) => p.reply.type === 'progress').map((p) => (p.reply as { fraction: number }).fraction);
    expect(posts[posts.length - 1].reply.type).toBe('result');
    expect(fractions.length).toBeGreaterThan(3);
    expect(fractions[fractions.length - 1]).toBe(1);
    for (let i = 1; i < fractions.length; i++) {
      expect(fractions[i]).toBeGreaterThan(fractions[i - 1]);
      if (fractions[i] < 1) expect(fractions[i] - fractions[i - 1]).toBeGreaterThanOrEqual(0.02);
    }
  });

  test('turns an engine input error into one error reply naming the particle (NaN coordinate)', async () => {
    const req = demoRequest(50);
    if (req.type !== 'ewald') throw new Error();
    req.positions[3 * 12 + 1] = NaN;
    const posts = await collect(req);
    expect(posts).toHaveLength(1);
    expect(posts[0].reply).toEqual({ type: 'error', id: 7, name: 'EngineInputError', message: 'coordinate y of particle 12 is not finite (NaN)' });
  });

  test('answers an unknown request type with an error reply, without throwing', async () => {
    const posts = await collect({ type: 'nonsense', id: 3 } as unknown as WorkerRequest);
    expect(posts).toEqual([{ reply: { type: 'error', id: 3, name: 'RequestError', message: 'unknown request type "nonsense"' }, transfer: [] }]);
  });
});

describe('handleRequest(mesh, sweep, neighbours, compare, describe, load)', () => {
  const d = demoSnapshot(500, 2);
  const box = boxMake(1);

  test('demo replies with the engine’s demo snapshot', async () => {
    const { payload } = await result<DemoPayload>({ type: 'demo', id: 11, n: 700, seed: 3 });
    const ref = demoSnapshot(700, 3);
    expect(Array.from(payload.positions)).toEqual(Array.from(ref.positions));
    expect(Array.from(payload.masses)).toEqual(Array.from(ref.masses));
  });

  test('mesh replies with meshForces for the targets', async () => {
    const targets = Int32Array.from([3, 40, 499]);
    const ref = meshForces(d.positions, d.masses, box, targets.slice(), { mesh: 16 });
    const { payload } = await result<ForcesPayload>({ type: 'mesh', id: 1, positions: d.positions.slice(), masses: d.masses.slice(), box, targets, options: { mesh: 16 } });
    expect(Array.from(payload.acc)).toEqual(Array.from(ref.acc));
    expect(payload.mesh).toEqual({ mesh: 16, cell: [1 / 16, 1 / 16, 1 / 16], G: 1 });
    expect(payload.phi).toBeNull();
  });

  test('sweep replies with one acceleration set per parameter set, in order, equal to single runs', async () => {
    const targets = Int32Array.from([1, 2]);
    const { payload } = await result<SweepPayload>({ type: 'sweep', method: 'ewald', id: 2, positions: d.positions.slice(), masses: d.masses.slice(), box, targets, options: [{ tol: 1e-3 }, { tol: 1e-8 }] });
    expect(payload.acc).toHaveLength(2);
    const ref = ewaldForces(d.positions, d.masses, box, Int32Array.from([1, 2]), { tol: 1e-8 });
    expect(Array.from(payload.acc[1])).toEqual(Array.from(ref.acc));
    expect(payload.ewald[0]!.tol).toBe(1e-3);
  });

  test('neighbours in chunks of targets equals one neighboursFind over them all (9000 targets)', async () => {
    const big = demoSnapshot(9000, 4);
    const nb = await result<NeighboursPayload>({ type: 'neighbours', id: 9, positions: big.positions.slice(), box, targets: null, k: 16 });
    const ref = neighboursFind(big.positions, box, null, 16);
    expect(Array.from(nb.payload.kth)).toEqual(Array.from(ref.kth));
    expect(Array.from(nb.payload.density)).toEqual(Array.from(ref.density));
  });

  test('neighbours replies with neighboursFind; compare with errorReport', async () => {
    const nb = await result<NeighboursPayload>({ type: 'neighbours', id: 3, positions: d.positions.slice(), box, targets: null, k: 8 });
    const ref = neighboursFind(d.positions, box, null, 8);
    expect(Array.from(nb.payload.nearest)).toEqual(Array.from(ref.nearest));
    const a = Float64Array.from({ length: 30 }, (_, i) => i + 1), b = Float64Array.from({ length: 30 }, (_, i) => i + 1.5);
    const cmp = await result<ComparePayload>({ type: 'compare', id: 4, accA: a.slice(), accB: b.slice(), worst: 5 });
    const r = errorReport(a, b, 5);
    expect(Array.from(cmp.payload.relative)).toEqual(Array.from(r.relative));
    expect(cmp.payload.summary.percentiles).toEqual(r.summary.percentiles);
    expect(cmp.transfer).toContain(cmp.payload.summary.worst.buffer);
  });

  test('describe proposes ax, ay, az and id from the header; load reads them with that mapping', async () => {
    const text = 'id,x,y,z,m,ax,ay,az\n7,0.1,0.2,0.3,2,1,2,3\n9,0.4,0.5,0.6,1,-1,-2,-3\n';
    const file = new Blob([text]);
    const { payload: described } = await result<DescribePayload>({ type: 'describe', id: 4, file, fileName: 'two.csv' });
    const mapping = described.description.proposal.mapping;
    expect(mapping).toEqual({ positions: ['x', 'y', 'z'], mass: 'm', accelerations: ['ax', 'ay', 'az'], ids: 'id' });
    const { payload } = await result<LoadPayload>({ type: 'load', id: 5, file, fileName: 'two.csv', mapping, box: null });
    expect(payload.count).toBe(2);
    expect(Array.from(payload.positions)).toEqual([0.1, 0.2, 0.3, 0.4, 0.5, 0.6]);
    expect(Array.from(payload.masses)).toEqual([2, 1]);
    expect(Array.from(payload.accelerations!)).toEqual([1, 2, 3, -1, -2, -3]);
    expect(payload.accelerationColumns).toEqual(['ax', 'ay', 'az']);
    expect(Array.from(payload.ids!)).toEqual([7, 9]);
  });

  test('load turns a bad cell into one error reply naming file, line and column', async () => {
    const posts = (await collect({ type: 'load', id: 6, file: new TextEncoder().encode('x,y,z\n0.1,0.2,oops\n'), fileName: 'bad.csv', mapping: {}, box: null })).filter((p) => p.reply.type !== 'progress');
    expect(posts).toHaveLength(1);
    const r = posts[0].reply;
    expect(r.type).toBe('error');
    if (r.type === 'error') {
      expect(r.name).toBe('SnapshotFormatError');
      expect(r.message).toMatch(/^bad\.csv: line 2 \(particle 0\), column "z": /);
    }
  });
});
